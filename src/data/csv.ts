/**
 * Delimited text (CSV, TSV, `;` or `|` separated) → Table.
 *
 * A hand-rolled tokenizer over the decoded string: lines without a quote character are split by
 * `indexOf` on the delimiter (the fast path); a record containing `"` is read by a small state
 * machine (RFC 4180 quoting: a quoted field may hold delimiters and newlines, `""` is one quote).
 * CRLF and LF line ends are both accepted, blank lines are skipped, the first record is the
 * header. Every record must have as many fields as the header. Cost: one pass, O(length).
 */
import { DataError } from './errors.js';
import type { Table } from './table.js';

export const DELIMITERS = [',', ';', '\t', '|'] as const;
export type Delimiter = (typeof DELIMITERS)[number];

const QUOTE = 34;
const LF = 10;
const CR = 13;

/** Readable name of a delimiter for messages and reports. */
export function delimiterName(d: string): string {
  return d === '\t' ? 'tab' : d === ',' ? 'comma' : d === ';' ? 'semicolon' : d === '|' ? 'pipe' : JSON.stringify(d);
}

/**
 * Sniffs the delimiter from the first lines (up to 20, quotes respected): the candidate among
 * `,` `;` tab `|` that occurs the same non-zero number of times on most lines, the most frequent
 * winning ties; `,` when none occurs (a one-column file).
 */
export function sniffDelimiter(text: string): Delimiter {
  const lines: string[] = [];
  let pos = 0;
  while (lines.length < 20 && pos < text.length) {
    let nl = text.indexOf('\n', pos);
    if (nl < 0) nl = text.length;
    const line = text.slice(pos, nl);
    if (line.trim().length > 0) lines.push(line);
    pos = nl + 1;
  }
  let best: Delimiter = ',';
  let bestScore = 0;
  for (const d of DELIMITERS) {
    const counts = lines.map((l) => countOutsideQuotes(l, d));
    const first = counts[0] ?? 0;
    if (first === 0) continue;
    const agreeing = counts.filter((c) => c === first).length;
    const score = agreeing * 1000 + first;
    if (score > bestScore) {
      bestScore = score;
      best = d;
    }
  }
  return best;
}

function countOutsideQuotes(line: string, d: string): number {
  let n = 0;
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (ch === '"') quoted = !quoted;
    else if (!quoted && ch === d) n++;
  }
  return n;
}

/**
 * Tokenizes `text` (already decoded, BOM removed) with the given delimiter.
 * Throws DataError for an empty file, a header-only file, a record with the wrong number of
 * fields, an unterminated quote, or a blank or repeated column name.
 */
export function parseDelimited(text: string, delimiter: string, file: string, format: 'csv' | 'tsv'): Table {
  const d = delimiter.charCodeAt(0);
  const n = text.length;
  let pos = 0;
  let line = 1;
  let nextQuote = text.indexOf('"');
  if (nextQuote < 0) nextQuote = n;

  let width = -1;
  let header: string[] = [];
  let columns: string[][] = [];
  let pools: CellPool[] = [];
  const rows: number[] = [];
  let fields: string[] = [];

  while (pos < n) {
    let nl = text.indexOf('\n', pos);
    if (nl < 0) nl = n;
    const recordLine = line;
    let end = nl > pos && text.charCodeAt(nl - 1) === CR ? nl - 1 : nl;
    if (nextQuote < pos) {
      nextQuote = text.indexOf('"', pos);
      if (nextQuote < 0) nextQuote = n;
    }
    if (isBlank(text, pos, end)) {
      pos = nl + 1;
      line++;
      continue;
    }
    if (nextQuote >= end) {
      // Fast path: no quote in this line.
      if (width > 0) {
        let c = 0;
        let start = pos;
        while (true) {
          let k = text.indexOf(delimiter, start);
          if (k < 0 || k > end) k = end;
          if (c >= width) throw tooManyFields(file, recordLine, width, text.slice(pos, end));
          columns[c].push(pools[c].take(text.slice(start, k)));
          c++;
          if (k >= end) break;
          start = k + 1;
        }
        if (c !== width) throw tooFewFields(file, recordLine, width, c, text.slice(pos, end));
        rows.push(recordLine);
      } else {
        fields = text.slice(pos, end).split(delimiter);
        ({ header, columns, width } = startTable(fields, file, recordLine));
        pools = columns.map(() => new CellPool());
      }
      pos = nl + 1;
      line++;
      continue;
    }
    // Slow path: a record with quotes, possibly spanning lines.
    fields = [];
    let i = pos;
    let field = '';
    let lines = 0;
    while (true) {
      if (i < n && text.charCodeAt(i) === QUOTE) {
        const openedAt = line + lines;
        i++;
        while (true) {
          const q = text.indexOf('"', i);
          if (q < 0) {
            throw new DataError('csv-unterminated-quote', 'a quoted field is never closed', {
              file,
              row: openedAt,
              expected: 'a closing " before the end of the file',
              hint: 'write a quote inside a quoted field as ""',
            });
          }
          const piece = text.slice(i, q);
          lines += countNewlines(piece);
          field += piece;
          if (q + 1 < n && text.charCodeAt(q + 1) === QUOTE) {
            field += '"';
            i = q + 2;
          } else {
            i = q + 1;
            break;
          }
        }
        // After a closing quote: up to the next delimiter or line end, text is kept as is.
      }
      let k = i;
      while (k < n) {
        const ch = text.charCodeAt(k);
        if (ch === d || ch === LF || ch === QUOTE) break;
        k++;
      }
      if (k < n && text.charCodeAt(k) === QUOTE) {
        // A quote in the middle of an unquoted field: keep it literally.
        field += text.slice(i, k + 1);
        i = k + 1;
        continue;
      }
      let stop = k;
      if (k < n && text.charCodeAt(k) === LF && k > i && text.charCodeAt(k - 1) === CR) stop = k - 1;
      else if (k === n && k > i && text.charCodeAt(k - 1) === CR) stop = k - 1;
      field += text.slice(i, stop);
      fields.push(field);
      field = '';
      if (k < n && text.charCodeAt(k) === d) {
        i = k + 1;
        continue;
      }
      // End of record.
      pos = k + 1;
      line += lines + 1;
      break;
    }
    end = pos;
    if (width < 0) {
      ({ header, columns, width } = startTable(fields, file, recordLine));
      pools = columns.map(() => new CellPool());
      continue;
    }
    if (fields.length > width) throw tooManyFields(file, recordLine, width, fields.join(delimiter));
    if (fields.length < width) throw tooFewFields(file, recordLine, width, fields.length, fields.join(delimiter));
    for (let c = 0; c < width; c++) columns[c].push(pools[c].take(fields[c]));
    rows.push(recordLine);
  }

  if (width < 0) throw new DataError('file-empty', 'the file is empty', { file, expected: 'a header line and data rows' });
  if (rows.length === 0) {
    throw new DataError('file-no-rows', 'the file has a header but no data rows', {
      file,
      found: header.join(delimiter),
      expected: 'at least one data row under the header',
    });
  }
  return { source: file, format, delimiter, header, columns, rows: Int32Array.from(rows) };
}

/**
 * The cells of a column that repeat share one string: a long-layout file writes each series'
 * name and each time stamp again on many rows (10,000 series of 120 months hold 2.4 million such
 * cells and only 10,120 distinct texts), and keeping one copy of each lowers the memory the
 * table holds while the series are built from it. A column whose cells are mostly distinct (the
 * values) stops pooling after POOL_TRIAL cells, when more than half of them were new. The cells'
 * texts are the same either way.
 */
class CellPool {
  private seen: Map<string, string> | null = new Map();
  private cells = 0;

  take(cell: string): string {
    const seen = this.seen;
    if (seen === null) return cell;
    this.cells++;
    const known = seen.get(cell);
    if (known !== undefined) return known;
    seen.set(cell, cell);
    if (this.cells >= POOL_TRIAL && seen.size > this.cells / 2) this.seen = null;
    return cell;
  }
}
const POOL_TRIAL = 4096;

function startTable(fields: string[], file: string, line: number): { header: string[]; columns: string[][]; width: number } {
  const header = fields.map((f) => f.trim());
  checkHeader(header, file, line);
  return { header, columns: header.map(() => [] as string[]), width: header.length };
}

/** Column names must be non-empty and distinct. */
export function checkHeader(header: string[], file: string, row: number): void {
  const seen = new Map<string, number>();
  header.forEach((name, i) => {
    if (name.length === 0 && header.length > 1) {
      throw new DataError('header-blank', `column ${i + 1} has no name`, {
        file,
        row,
        found: header.join(','),
        expected: 'a name for every column in the header',
      });
    }
    if (seen.has(name)) {
      throw new DataError('header-repeated', `column name "${name}" appears twice`, {
        file,
        row,
        column: name,
        expected: 'distinct column names',
      });
    }
    seen.set(name, i);
  });
}

function isBlank(text: string, from: number, to: number): boolean {
  for (let i = from; i < to; i++) {
    const c = text.charCodeAt(i);
    if (c !== 32 && c !== 9) return false;
  }
  return true;
}

function countNewlines(s: string): number {
  let k = 0;
  for (let i = s.indexOf('\n'); i >= 0; i = s.indexOf('\n', i + 1)) k++;
  return k;
}

function tooManyFields(file: string, row: number, width: number, found: string): DataError {
  return new DataError('csv-too-many-fields', `the row has more fields than the header's ${width}`, {
    file,
    row,
    found,
    expected: `${width} fields`,
    hint: 'quote fields that contain the delimiter, e.g. "1,234"',
  });
}

function tooFewFields(file: string, row: number, width: number, count: number, found: string): DataError {
  return new DataError('csv-too-few-fields', `the row has ${count} field${count === 1 ? '' : 's'}, the header has ${width}`, {
    file,
    row,
    found,
    expected: `${width} fields (leave a field empty for a missing value)`,
  });
}
