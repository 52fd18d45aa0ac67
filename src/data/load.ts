/**
 * The loader's public entry points:
 *
 *   loadTable(source, options)  → Table                       (cells as read)
 *   loadSeries(source, options) → { series: Series[], report } (regular, no NaN)
 *
 * `source` is a path, or `{ name, bytes }` for bytes already read (standard input is
 * `{ name: '-', bytes }`). Every user-caused problem is thrown as a CertaError naming the file,
 * row and column; nothing is printed.
 */
import { periodStart, type Frequency } from './calendar.js';
import { parseDelimited, sniffDelimiter } from './csv.js';
import { kindFrequency, type DateFormat } from './dates.js';
import { DataError, isCertaError, UsageError, type CertaError } from './errors.js';
import { inferFrequency, type FrequencyEvidence, type StampRun } from './frequency.js';
import { parseJsonRecords } from './json.js';
import { detectLayout, type Layout } from './layout.js';
import { cellNumber, isMissingText, numberExpectation, numberHint, type DecimalMark } from './numbers.js';
import { detectDecimalComma } from './decimal-comma.js';
import { regularise, sortAndResolveDuplicates, type DuplicatePolicyName, type PartialPolicyName, type RawSeries, type SeriesReport } from './regularise.js';
import type { AggregatorName } from './aggregators.js';
import type { GapPolicyName } from './gaps.js';
import type { Series } from './series.js';
import { selectSeries, type SeriesPatternMiss } from './series-pattern.js';
import { decodeText, readSource, sniffFormat, type TableSource } from './source.js';
import { offsetText, snapToMidnight, type SnapReport } from './snap.js';
import { parseTimeColumn } from './time-column.js';
import type { Cell, Table, TableFormat } from './table.js';
import { parseXlsx } from './xlsx.js';

export interface TableOptions {
  /** Override the sniffed format. */
  format?: TableFormat;
  /** Override the sniffed delimiter (CSV/TSV). */
  delimiter?: string;
  /** Sheet to read from a workbook (default: the first). */
  sheet?: string;
}

/** How number cells were read: the decimal mark, and whether it was given, detected or the default. */
export interface DecimalReport {
  mark: DecimalMark;
  source: 'option' | 'detected' | 'default';
  /** The columns that showed decimal commas, when detected. */
  columns: string[];
}

export interface LoadOptions extends TableOptions {
  /**
   * With several series: a series whose duplicates or gaps cannot be resolved is left out and
   * listed in `report.failed` instead of failing the file (a file of one series still fails).
   */
  keepGoing?: boolean;
  time?: string;
  value?: string;
  inputs?: string[];
  id?: string;
  /** Keep only these series: names (columns in wide layout, ids in long layout) and globs, comma-separated (series-pattern.ts). */
  series?: string;
  dateFormat?: DateFormat;
  /** Aggregate to this (coarser) frequency. */
  freq?: Frequency;
  /** The frequency of a file with a single time stamp per series, when the stamps start its periods (frequency.ts `InferOptions.single`; certa update passes the model's). */
  singleStampFrequency?: Frequency;
  /** How `freq` combines periods (default sum). */
  aggregate?: AggregatorName;
  /** Rows sharing a time stamp (default error). */
  duplicates?: DuplicatePolicyName;
  /** Interior gaps (default interpolate, at most 3 periods). */
  gaps?: GapPolicyName;
  /** Decimal mark of number cells (default: `.`, or `,` when detected, decimal-comma.ts). */
  decimal?: DecimalMark;
  /** Incomplete periods at either end after `freq` folded the data (default drop). */
  partial?: PartialPolicyName;
  /** Season length in observations, for every stage after loading (default: from the frequency). */
  season?: number | null;
}

export interface LoadReport {
  source: string;
  format: TableFormat;
  delimiter: string | null;
  sheet: string | null;
  /** Every sheet of a workbook with its data rows (empty for other formats). */
  sheets: { name: string; rows: number }[];
  decimal: DecimalReport;
  /** Data rows read. */
  rows: number;
  columns: string[];
  layout: Layout;
  /** How the time cells were read, e.g. "dates" or "months (YYYY-MM)". */
  timeForm: string;
  /** Instants near midnight moved to it (snap.ts), or null. */
  snapped: SnapReport | null;
  /** The data's own frequency and the evidence for it. */
  frequency: FrequencyEvidence;
  /** The season of the series (in observations) and where it came from. */
  season: { length: number | null; source: 'frequency' | 'option' };
  /** Set when `--freq` folded the data into a coarser frequency. */
  aggregated: { from: Frequency; to: Frequency; by: AggregatorName } | null;
  series: SeriesReport[];
  notes: string[];
  /**
   * Series left out because they could not be read (with `keepGoing`): their position among
   * the file's series (0-based, file order) and the error. Empty otherwise.
   */
  failed: LoadFailure[];
}

/** A series whose own cells could not be read (with keepGoing), kept with its error. */
interface ReadFailure {
  name: string;
  failure: CertaError;
}

/** A series of a file that could not be read, kept with its position (see `LoadOptions.keepGoing`). */
export interface LoadFailure {
  index: number;
  name: string;
  error: CertaError;
}

export async function loadTable(source: string | TableSource, options: TableOptions = {}): Promise<Table> {
  const src = typeof source === 'string' ? await readSource(source) : source;
  const format = options.format ?? sniffFormat(src);
  if (format === 'xlsx') return parseXlsx(src.bytes, src.name, options.sheet);
  if (options.sheet !== undefined) {
    throw new UsageError('sheet-not-workbook', '--sheet applies only to .xlsx workbooks', { file: src.name, found: `a ${format.toUpperCase()} file` });
  }
  const text = decodeText(src);
  if (format === 'json') return parseJsonRecords(text, src.name);
  const delimiter = options.delimiter ?? (format === 'tsv' ? '\t' : sniffDelimiter(text));
  return parseDelimited(text, delimiter, src.name, delimiter === '\t' ? 'tsv' : 'csv');
}

export async function loadSeries(source: string | TableSource, options: LoadOptions = {}): Promise<{ series: Series[]; report: LoadReport }> {
  const table = await loadTable(source, options);
  return seriesFromTable(table, options);
}

/** The second half of loadSeries, for a table already in memory. */
export function seriesFromTable(table: Table, options: LoadOptions = {}): { series: Series[]; report: LoadReport } {
  const file = table.source;
  const detected = options.decimal === undefined ? detectDecimalComma(table) : null;
  const decimal: DecimalReport = options.decimal !== undefined
    ? { mark: options.decimal, source: 'option', columns: [] }
    : detected
      ? { mark: ',', source: 'detected', columns: detected }
      : { mark: '.', source: 'default', columns: [] };
  const layout = detectLayout(table, { ...options, decimal: decimal.mark });
  const col = (name: string): Cell[] => table.columns[table.header.indexOf(name)];
  const notes: string[] = [];

  const timeCol = parseTimeColumn(col(layout.time), table.rows, { file, column: layout.time }, options.dateFormat ?? 'auto');
  const { times } = timeCol;
  if (layout.passedOver.length > 0) notes.push(`time column "${layout.time}" chosen over ${layout.passedOver.map((c) => `"${c}"`).join(', ')}: its times are finer`);
  const snapped = timeCol.kind === 'datetime' ? snapToMidnight(times) : null;
  if (snapped) {
    timeCol.kind = 'date';
    const range = snapped.minOffset === snapped.maxOffset ? offsetText(snapped.minOffset) : `${offsetText(snapped.minOffset)} to ${offsetText(snapped.maxOffset)}`;
    notes.push(`${snapped.moved} time stamp${snapped.moved === 1 ? '' : 's'} at ${range} hours from midnight (UTC) moved to that midnight, read as local midnights`);
  }

  // Rows with no time: skipped when the whole row is empty, refused otherwise.
  const keep: number[] = [];
  let skipped = 0;
  for (let r = 0; r < times.length; r++) {
    if (times[r] === times[r]) {
      keep.push(r);
      continue;
    }
    if (table.columns.every((c) => c[r] === null || (typeof c[r] === 'string' && isMissingText(c[r] as string)))) {
      skipped++;
      continue;
    }
    throw new DataError('time-missing', 'the row has values but no time', {
      file,
      row: table.rows[r],
      column: layout.time,
      found: String(col(layout.time)[r] ?? ''),
      expected: 'a time in every row that has values',
    });
  }
  if (skipped > 0) notes.push(`${skipped} empty row${skipped === 1 ? '' : 's'} skipped`);
  const all = keep.length === times.length;

  const numbers = (name: string, idx: ArrayLike<number>): Float64Array => {
    const cells = col(name);
    const out = new Float64Array(idx.length);
    for (let i = 0; i < idx.length; i++) {
      const r = idx[i];
      const v = cellNumber(cells[r], decimal.mark);
      if (v === undefined) {
        const hint = numberHint(String(cells[r]), decimal.mark) ?? (layout.kind === 'wide' && i === 0 ? 'name the value columns with --value, or an id column with --id for long layout' : undefined);
        throw new DataError('value-not-number', 'the cell is not a number', {
          file,
          row: table.rows[r],
          column: name,
          found: String(cells[r]),
          expected: numberExpectation(String(cells[r]), decimal.mark),
          ...(hint ? { hint } : {}),
        });
      }
      out[i] = v;
    }
    return out;
  };

  // With keepGoing, a series whose own cells are not numbers is left out (its error kept) and the
  // others are read; without it, the first such cell stops the file as before.
  const perSeries = options.keepGoing === true;
  /** The numbers of one series' own column or rows, or its error when perSeries. */
  const ownNumbers = (name: string, read: () => Float64Array): Float64Array | ReadFailure => {
    if (!perSeries) return read();
    try {
      return read();
    } catch (e) {
      if (!isCertaError(e)) throw e;
      return { failure: e, name };
    }
  };
  let raws: (RawSeries | ReadFailure)[];
  if (layout.kind === 'wide') {
    const idx = all ? Int32Array.from({ length: times.length }, (_, i) => i) : Int32Array.from(keep);
    const t = all ? times : Float64Array.from(idx, (r) => times[r]);
    const rows = Int32Array.from(idx, (r) => table.rows[r]);
    let names = layout.values;
    if (options.series !== undefined) {
      const picked = selectSeries(options.series, names);
      if ('miss' in picked) throw unknownSeries(file, picked.miss, names, 'column');
      names = picked.indices.map((i) => names[i]);
    }
    const inputs = layout.inputs.map((name) => ({ name, values: numbers(name, idx) }));
    raws = names.map((name) => {
      const values = ownNumbers(name, () => numbers(name, idx));
      return values instanceof Float64Array ? { name, times: t, values, inputs, rows } : values;
    });
  } else {
    raws = groupLong(table, layout, keep, times, numbers, options.series, perSeries);
  }

  const labelFreq = kindFrequency(timeCol.kind);
  const duplicatePolicy = options.duplicates ?? 'error';
  const collect = options.keepGoing === true && raws.length > 1;
  const failed: LoadFailure[] = [];
  /** Runs `step` for series `index`; with `collect`, a user error leaves the series out instead. */
  const attempt = <T>(index: number, name: string, step: () => T): T | undefined => {
    if (!collect) return step();
    try {
      return step();
    } catch (e) {
      if (!isCertaError(e)) throw e;
      failed.push({ index, name, error: e });
      return undefined;
    }
  };
  const resolvedAt = raws.map((raw, index) =>
    attempt(index, raw.name, () => {
      if ('failure' in raw) throw raw.failure;
      return sortAndResolveDuplicates(raw, duplicatePolicy, { file, timeColumn: layout.time, valueColumn: layout.kind === 'wide' ? raw.name : layout.values[0] }, labelFreq);
    }),
  );
  const positions = resolvedAt.flatMap((r, i) => (r ? [i] : []));
  const resolved = resolvedAt.filter((r): r is NonNullable<typeof r> => r !== undefined);
  if (resolved.length === 0 && failed.length > 0) throw failed[0].error;
  if (resolved.some((r) => r.sorted)) notes.push('rows were not in time order; sorted by time');
  for (const r of resolved) {
    if (r.shortEnds.length === 0) continue;
    const listed = r.shortEnds.map((e) => `${e.time} (${e.rows} row${e.rows === 1 ? '' : 's'}, most have ${e.typical})`).join(', ');
    notes.push(`warning: series "${r.series.name}": --duplicates ${duplicatePolicy} combined fewer rows at the ends than elsewhere: ${listed}; a finer time column with --freq drops incomplete periods`);
  }

  const runs: StampRun[] = (layout.kind === 'wide' ? resolved.slice(0, 1) : resolved).map((r) => ({ name: r.series.name, times: r.series.times, rows: r.series.rows }));
  const evidence = inferFrequency(runs, timeCol.kind, { file, column: layout.time }, { target: options.freq, single: options.singleStampFrequency });
  const f = evidence.frequency;
  if (runs.some((run) => run.times.some((t) => periodStart(t, f) !== t))) notes.push(`time stamps moved to the start of their ${f === 'daily' ? 'day' : f.replace(/ly$/, '')}`);

  const aggregate = options.aggregate ?? 'sum';
  const gaps = options.gaps ?? 'interpolate';
  const series: Series[] = [];
  const reports: SeriesReport[] = [];
  for (let j = 0; j < resolved.length; j++) {
    const r = resolved[j];
    const where = { file, timeColumn: layout.time, valueColumn: layout.kind === 'wide' ? r.series.name : layout.values[0] };
    const out = attempt(positions[j], r.series.name, () =>
      regularise(
        r.series,
        { frequency: f, step: evidence.step, freq: options.freq, aggregate, duplicates: duplicatePolicy, gaps, partial: options.partial, season: options.season },
        where,
        r.duplicates,
      ),
    );
    if (!out) continue;
    series.push(out.series);
    reports.push(out.report);
    const { leading, trailing } = out.report.trimmed;
    if (leading + trailing > 0) {
      notes.push(`series "${r.series.name}": trimmed ${leading} leading and ${trailing} trailing period${leading + trailing === 1 ? '' : 's'} with missing values`);
    }
    const partial = out.report.partialPeriods;
    if (partial.length > 0) {
      const listed = (ps: typeof partial) => ps.map((p) => `${p.time} (${p.observed} of ${p.expected})`).join(', ');
      const dropped = partial.filter((p) => p.dropped);
      const kept = partial.filter((p) => !p.dropped);
      if (dropped.length > 0) notes.push(`warning: series "${r.series.name}": dropped incomplete period${dropped.length === 1 ? '' : 's'} at the ends: ${listed(dropped)}`);
      if (kept.length > 0) notes.push(`warning: series "${r.series.name}": incomplete period${kept.length === 1 ? '' : 's'} kept (${options.aggregate ?? 'sum'} of fewer observations): ${listed(kept)}`);
    }
  }
  if (series.length === 0 && failed.length > 0) throw failed[0].error;
  if (decimal.source === 'detected') notes.push(`numbers read with decimal commas: the file is semicolon-delimited and every value of ${decimal.columns.map((c) => `"${c}"`).join(', ')} has one comma`);
  if (layout.ignored.length > 0) notes.push(`columns not used: ${layout.ignored.map((c) => `"${c}"`).join(', ')}`);
  const target = options.freq ?? f;
  const report: LoadReport = {
    source: file,
    format: table.format,
    delimiter: table.delimiter ?? null,
    sheet: table.sheet ?? null,
    sheets: table.sheets ?? [],
    decimal,
    rows: table.rows.length,
    columns: table.header,
    layout,
    timeForm: timeCol.form,
    snapped,
    frequency: evidence,
    season: { length: series[0]?.season ?? null, source: options.season !== undefined ? 'option' : 'frequency' },
    aggregated: target !== f ? { from: f, to: target, by: aggregate } : null,
    series: reports,
    notes,
    failed: failed.sort((a, b) => a.index - b.index),
  };
  return { series, report };
}

function unknownSeries(file: string, miss: SeriesPatternMiss, names: string[], what: 'column' | 'id'): UsageError {
  const shown = names.slice(0, 10).map((n) => `"${n}"`).join(', ') + (names.length > 10 ? `, … (${names.length} in all)` : '');
  return new UsageError('series-unknown', miss.glob ? `no series matches the pattern "${miss.item}"` : `no series named "${miss.item}"`, {
    file,
    found: miss.item,
    expected: `a series ${what === 'column' ? 'column' : 'id'}: ${shown}`,
  });
}

/** Long layout: rows grouped by id (first-seen order), by a counting sort over row indices. */
function groupLong(
  table: Table,
  layout: Layout,
  keep: number[],
  times: Float64Array,
  numbers: (name: string, idx: ArrayLike<number>) => Float64Array,
  only: string | undefined,
  perSeries = false,
): (RawSeries | ReadFailure)[] {
  const idCells = table.columns[table.header.indexOf(layout.id as string)];
  const groupIndex = new Map<string, number>();
  const names: string[] = [];
  const groupOf = new Int32Array(keep.length);
  const counts: number[] = [];
  let lastCell: Cell | undefined;
  let lastGroup = 0;
  for (let i = 0; i < keep.length; i++) {
    const r = keep[i];
    const cell = idCells[r];
    if (cell === null || (typeof cell === 'string' && cell.trim() === '')) {
      throw new DataError('id-missing', 'the row has no series id', {
        file: table.source,
        row: table.rows[r],
        column: layout.id as string,
        expected: 'an id in every row (long layout)',
      });
    }
    // Rows of one series usually come together: compare with the previous cell first.
    if (cell === lastCell) {
      groupOf[i] = lastGroup;
      counts[lastGroup]++;
      continue;
    }
    const key = typeof cell === 'string' ? cell.trim() : String(cell);
    let g = groupIndex.get(key);
    if (g === undefined) {
      g = names.length;
      groupIndex.set(key, g);
      names.push(key);
      counts.push(0);
    }
    groupOf[i] = g;
    counts[g]++;
    lastCell = cell;
    lastGroup = g;
  }
  let wanted: number[] = names.map((_, g) => g);
  if (only !== undefined) {
    const picked = selectSeries(only, names);
    if ('miss' in picked) throw unknownSeries(table.source, picked.miss, names, 'id');
    wanted = picked.indices;
  }
  const offsets = new Int32Array(names.length + 1);
  for (let g = 0; g < names.length; g++) offsets[g + 1] = offsets[g] + counts[g];
  const fill = offsets.slice(0, names.length);
  const order = new Int32Array(keep.length);
  for (let i = 0; i < keep.length; i++) order[fill[groupOf[i]]++] = keep[i];
  const value = layout.values[0];
  const columns = [value, ...layout.inputs];
  let all: Float64Array[];
  /** Per group, the error of its first unreadable cell (only when perSeries and a cell failed). */
  const broken = new Map<number, CertaError>();
  try {
    all = columns.map((name) => numbers(name, order));
  } catch (e) {
    if (!perSeries || !isCertaError(e)) throw e;
    // Read group by group, so each series' own first bad cell is named and the others are kept.
    all = columns.map(() => new Float64Array(order.length));
    for (const g of wanted) {
      const part = order.subarray(offsets[g], offsets[g + 1]);
      try {
        columns.forEach((name, c) => all[c].set(numbers(name, part), offsets[g]));
      } catch (err) {
        if (!isCertaError(err)) throw err;
        broken.set(g, err);
      }
    }
  }
  const allValues = all[0];
  const allInputs = layout.inputs.map((name, c) => ({ name, values: all[c + 1] }));
  const allTimes = new Float64Array(order.length);
  const allRows = new Int32Array(order.length);
  for (let i = 0; i < order.length; i++) {
    allTimes[i] = times[order[i]];
    allRows[i] = table.rows[order[i]];
  }
  return wanted.map((g): RawSeries | ReadFailure => {
    const failure = broken.get(g);
    if (failure) return { name: names[g], failure };
    const a = offsets[g];
    const b = offsets[g + 1];
    return {
      name: names[g],
      times: allTimes.subarray(a, b),
      values: allValues.subarray(a, b),
      inputs: allInputs.map((x) => ({ name: x.name, values: x.values.subarray(a, b) })),
      rows: allRows.subarray(a, b),
    };
  });
}


