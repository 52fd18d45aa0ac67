/**
 * Tables as text: CSV (RFC 4180) and canonical JSON, byte-stable for the same input.
 *
 * The library returns strings; callers write files (atomically) themselves.
 */

/** One table cell. `null` (and a NaN number) means missing. */
export type Cell = string | number | null;

/** A tidy table: named columns, one row per observation, every row as long as `columns`. */
export interface Table {
  columns: string[];
  rows: Cell[][];
}

/**
 * A number as CSV and reports write it: the shortest decimal string that reads back to the same
 * double (ECMAScript Number::toString, ECMA-262 §6.1.6.1.20 — locale-free, exponent form
 * `1e-7` / `1.5e+21` outside [1e-6, 1e21)), with these fixed choices: −0 is written `0`,
 * NaN is written as the empty string (missing), ±∞ as `Infinity` / `-Infinity` (read back by
 * JavaScript `Number()` and Python `float()`).
 * @example formatNumber(0.1 + 0.2) === '0.30000000000000004'
 */
export function formatNumber(x: number): string {
  // finite and not zero: the common case, one test
  if (x - x === 0 && x !== 0) return String(x);
  if (x === 0) return '0';
  if (Number.isNaN(x)) return '';
  return x > 0 ? 'Infinity' : '-Infinity';
}

/**
 * Whether text would be read as a formula by a spreadsheet: it starts with `=`, `+`, `-`, `@`,
 * a tab or a carriage return (the characters a spreadsheet treats as the start of a formula or
 * strips before one; OWASP, "CSV Injection"), and it is not a plain decimal number such as
 * `-12.5` or `+3e4` (which a spreadsheet reads as that number, never as a formula).
 */
export function readsAsFormula(text: string): boolean {
  if (!/^[=+\-@\t\r]/.test(text)) return false;
  return !/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(text);
}

/**
 * One CSV field, RFC 4180 section 2, with text neutralised against formula injection first:
 * text for which `readsAsFormula` holds gets a leading apostrophe (`=SUM(A1)` is written
 * `'=SUM(A1)`), which a spreadsheet shows as text and does not evaluate. Numbers (`Cell` of type
 * number) are never altered, so `-3.5` stays `-3.5`. Then a field containing a comma, a double
 * quote, CR or LF is enclosed in double quotes, with each inner double quote doubled. Missing
 * (null, NaN) is the empty field; an empty string is written `""` so it stays distinguishable
 * from missing.
 * @example csvField('=1+2') === "'=1+2"; csvField(-2) === '-2'; csvField('a"b') === '"a""b"'
 */
export function csvField(value: Cell): string {
  if (value === null) return '';
  if (typeof value === 'number') return formatNumber(value);
  return textField(value);
}

/** `csvField` of a text. */
function textField(value: string): string {
  if (value === '') return '""';
  const first = value.charCodeAt(0);
  // = + - @ tab CR: only these can start a formula (readsAsFormula)
  const text = (first === 61 || first === 43 || first === 45 || first === 64 || first === 9 || first === 13) && readsAsFormula(value) ? `'${value}` : value;
  if (QUOTED.test(text)) return `"${text.replace(/"/g, '""')}"`;
  return text;
}

const QUOTED = /[",\r\n]/;

export interface CsvOptions {
  /** Record separator; RFC 4180 prescribes CRLF (the default). */
  newline?: '\r\n' | '\n';
}

/**
 * A CSV document (RFC 4180): a header record of `columns`, then one record per row, each record
 * ended by the newline (also the last). Fields are quoted as `csvField` says.
 * A row whose length differs from `columns` is a caller bug (`RangeError`).
 * @example toCsv(['a', 'b'], [[1, 'x,y']]) === 'a,b\r\n1,"x,y"\r\n'
 */
export function toCsv(columns: string[], rows: Cell[][], options: CsvOptions = {}): string {
  const nl = options.newline ?? '\r\n';
  const width = columns.length;
  let out = columns.map(csvField).join(',') + nl;
  // texts repeat down a column (series name, kind): each column remembers its last text's field
  const lastText: (string | undefined)[] = new Array(width).fill(undefined);
  const lastField: string[] = new Array(width).fill('');
  for (let i = 0; i < rows.length; i++) {
    const row = rows[i];
    if (row.length !== width) {
      throw new RangeError(`toCsv: row ${i + 1} has ${row.length} fields, the header has ${width}`);
    }
    let line = '';
    for (let j = 0; j < width; j++) {
      const v = row[j];
      let field: string;
      if (typeof v === 'number') field = formatNumber(v);
      else if (v === null) field = '';
      else if (v === lastText[j]) field = lastField[j];
      else {
        field = textField(v);
        lastText[j] = v;
        lastField[j] = field;
      }
      line = j === 0 ? field : `${line},${field}`;
    }
    out += line + nl;
  }
  return out;
}

/** `toCsv` of a `Table`. */
export function tableToCsv(table: Table, options: CsvOptions = {}): string {
  return toCsv(table.columns, table.rows, options);
}

/**
 * A tidy table from records (one object per row). Columns are `columns` if given, otherwise every
 * key in first-seen order over the records; a key a record lacks (or holds as undefined) is
 * missing (null).
 */
export function tableFromRecords(records: ReadonlyArray<Readonly<Record<string, Cell | undefined>>>, columns?: string[]): Table {
  let cols = columns;
  if (cols === undefined) {
    const seen = new Set<string>();
    for (const r of records) for (const k of Object.keys(r)) seen.add(k);
    cols = [...seen];
  }
  const names = cols;
  const rows = records.map((r) => names.map((c) => (Object.prototype.hasOwnProperty.call(r, c) ? (r[c] ?? null) : null)));
  return { columns: [...names], rows };
}

/**
 * A tidy table from aligned columns (name → values, e.g. time, actual, forecast arrays), in the
 * object's key order. Columns of different lengths are a caller bug (`RangeError`).
 */
export function tableFromColumns(data: Readonly<Record<string, ArrayLike<Cell>>>): Table {
  const columns = Object.keys(data);
  if (columns.length === 0) return { columns, rows: [] };
  const n = data[columns[0]].length;
  for (const c of columns) {
    if (data[c].length !== n) throw new RangeError(`tableFromColumns: column "${c}" has ${data[c].length} values, "${columns[0]}" has ${n}`);
  }
  const rows: Cell[][] = [];
  for (let i = 0; i < n; i++) rows.push(columns.map((c) => data[c][i]));
  return { columns, rows };
}

/**
 * Canonical JSON text: object keys sorted by UTF-16 code units at every depth (so the bytes do
 * not depend on how the object was built), typed arrays written as arrays, non-finite numbers
 * (NaN, ±∞, which JSON cannot hold) written as null, −0 as 0, `undefined` properties left out;
 * two-space indent and a final newline. Numbers use the same shortest round-trip form as
 * `formatNumber`.
 */
export function toJson(value: unknown): string {
  return `${JSON.stringify(canonical(value), null, 2)}\n`;
}

function canonical(value: unknown): unknown {
  if (typeof value === 'number') return Number.isFinite(value) ? (value === 0 ? 0 : value) : null;
  if (value === null || typeof value !== 'object') return value;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    return Array.from(value as unknown as ArrayLike<number>, (x) => canonical(x));
  }
  if (Array.isArray(value)) return value.map((x) => (x === undefined ? null : canonical(x)));
  const out: Record<string, unknown> = {};
  for (const key of Object.keys(value).sort()) {
    const v = (value as Record<string, unknown>)[key];
    if (v !== undefined) out[key] = canonical(v);
  }
  return out;
}
