/**
 * Which column is what. Two layouts:
 *   wide — a time column and one column per series (`date,north,south`);
 *   long — an id column, a time column and a value column (`region,date,sales`).
 * Options name columns explicitly (`--time`, `--id`, `--value`, `--inputs`); otherwise:
 *   time  — among the columns named like a time (date, time, period, month, year, …) whose cells
 *           read as times, the one with the finest times (a full date before a month before a
 *           year; the first on a tie), else the first column whose first cells read as calendar
 *           times;
 *   id    — the first other column whose cells are mostly text and repeat (long layout);
 *   value — in long layout the one numeric column left (or one named "value").
 * Long layout needs repeated time stamps. In wide layout every other column of numbers is a
 * series (`--value` keeps one); columns of mostly text are left out, with a note.
 */
import { DataError, UsageError } from './errors.js';
import { numericDayMonthFields, parseTimeText, type TimeKind } from './dates.js';
import { cellNumber, DECIMAL_COMMA_NUMBER, isMissingText, type DecimalMark } from './numbers.js';
import { ExcelSerial, type Cell, type Table } from './table.js';

export interface Layout {
  kind: 'wide' | 'long';
  time: string;
  /** The id column (long layout). */
  id: string | null;
  /** Series columns (wide) or the one value column (long). */
  values: string[];
  /** Exogenous input columns, in the order given. */
  inputs: string[];
  /** Columns present but not used. */
  ignored: string[];
  /** Other columns named like a time that were passed over for a finer one (detection only). */
  passedOver: string[];
}

export interface LayoutOptions {
  time?: string;
  value?: string;
  inputs?: string[];
  id?: string;
  /** Decimal mark of number cells (default `.`), which decides what counts as a number. */
  decimal?: DecimalMark;
}

const TIME_NAMES = /^(date|time|timestamp|datetime|date_?time|period|day|week|month|quarter|year|ds|when)$/i;
const TIME_WORDS = /(date|time|period|month|year)/i;
const SAMPLE = 200;

export function detectLayout(table: Table, options: LayoutOptions = {}): Layout {
  const decimal = options.decimal ?? '.';
  const looksLikeText = (cells: readonly Cell[]) => mostlyText(cells, decimal);
  const looksLikeId = (cells: readonly Cell[]) => isIdColumn(cells, decimal);
  const named = (name: string, option: string): number => {
    const c = table.header.indexOf(name);
    if (c < 0) {
      const close = table.header.find((h) => h.toLowerCase() === name.toLowerCase());
      throw new UsageError('column-unknown', `no column named "${name}" (${option})`, {
        file: table.source,
        found: name,
        expected: `one of ${table.header.map((h) => `"${h}"`).join(', ')}`,
        ...(close ? { hint: `column names are case-sensitive: did you mean "${close}"?` } : {}),
      });
    }
    return c;
  };
  const inputs = (options.inputs ?? []).map((n) => named(n, '--inputs'));
  const found = options.time !== undefined ? { column: named(options.time, '--time'), passedOver: [] as number[] } : findTimeColumn(table);
  const time = found.column;
  const passedOver = found.passedOver.map((c) => table.header[c]);
  if (inputs.includes(time)) throw sameColumn(table, table.header[time], '--time', '--inputs');
  // Time columns passed over for a finer one are neither ids nor series (unless named as inputs).
  const taken = new Set<number>([time, ...inputs]);
  const skipped = new Set<number>(found.passedOver.filter((c) => !inputs.includes(c)));

  let id: number | null = null;
  if (options.id !== undefined) {
    id = named(options.id, '--id');
    if (taken.has(id)) throw sameColumn(table, table.header[id], '--id', id === time ? '--time' : '--inputs');
  } else if (hasRepeats(table.columns[time])) {
    // Long layout only when time stamps repeat: otherwise a text column is a label, not an id.
    for (let c = 0; c < table.header.length; c++) {
      if (!taken.has(c) && !skipped.has(c) && (options.value === undefined || table.header[c] !== options.value) && looksLikeId(table.columns[c])) {
        id = c;
        break;
      }
    }
  }
  if (id !== null) taken.add(id);

  if (id === null) {
    let values: number[];
    if (options.value !== undefined) {
      const v = named(options.value, '--value');
      if (taken.has(v)) throw sameColumn(table, table.header[v], '--value', v === time ? '--time' : '--inputs');
      values = [v];
    } else values = table.header.map((_, c) => c).filter((c) => !taken.has(c) && !skipped.has(c) && !looksLikeText(table.columns[c]));
    if (values.length === 0) {
      const comma = decimal === '.' ? decimalCommaColumn(table, taken) : null;
      if (comma) {
        throw new DataError('layout-decimal-comma', `the file has no value column of numbers with "." as the decimal point: column "${comma.column}" holds decimal commas`, {
          file: table.source,
          row: table.rows[comma.row],
          column: comma.column,
          found: comma.text,
          expected: 'numbers such as 3.5, or decimal commas read with --decimal ,',
          hint: 'pass --decimal , to read "," as the decimal point',
        });
      }
      throw new DataError('layout-no-values', 'the file has no value column', {
        file: table.source,
        found: `columns ${table.header.map((h) => `"${h}"`).join(', ')}`,
        expected: 'a time column and at least one column of numbers',
      });
    }
    const used = new Set([...taken, ...values]);
    return {
      kind: 'wide',
      time: table.header[time],
      id: null,
      values: values.map((c) => table.header[c]),
      inputs: inputs.map((c) => table.header[c]),
      ignored: table.header.filter((_, c) => !used.has(c)),
      passedOver,
    };
  }

  let value: number;
  if (options.value !== undefined) {
    value = named(options.value, '--value');
    if (taken.has(value)) throw sameColumn(table, table.header[value], '--value', value === time ? '--time' : value === id ? '--id' : '--inputs');
  } else {
    const numeric = table.header.map((_, c) => c).filter((c) => !taken.has(c) && !skipped.has(c) && !looksLikeText(table.columns[c]));
    const byName = numeric.filter((c) => /^value$/i.test(table.header[c]));
    if (numeric.length === 1) value = numeric[0];
    else if (byName.length === 1) value = byName[0];
    else {
      throw new UsageError('layout-value-ambiguous', numeric.length === 0 ? 'the file has no numeric value column' : 'the file has several numeric columns; which holds the values?', {
        file: table.source,
        found: numeric.length === 0 ? `columns ${table.header.map((h) => `"${h}"`).join(', ')}` : numeric.map((c) => `"${table.header[c]}"`).join(', '),
        expected: `one value column beside the id "${table.header[id]}" and time "${table.header[time]}"`,
        hint: numeric.length === 0 ? 'name it with --value' : `pass --value ${quoteArg(table.header[numeric[0]])} (or another of them) for the values, and name any others with --inputs`,
      });
    }
  }
  const used = new Set([...taken, value]);
  return {
    kind: 'long',
    time: table.header[time],
    id: table.header[id],
    values: [table.header[value]],
    inputs: inputs.map((c) => table.header[c]),
    ignored: table.header.filter((_, c) => !used.has(c)),
    passedOver,
  };
}

function quoteArg(s: string): string {
  return /^[\w.-]+$/.test(s) ? s : JSON.stringify(s);
}

function sameColumn(table: Table, name: string, a: string, b: string): UsageError {
  return new UsageError('column-twice', `column "${name}" is named by both ${a} and ${b}`, {
    file: table.source,
    column: name,
    expected: 'each column in one role',
  });
}

function findTimeColumn(table: Table): { column: number; passedOver: number[] } {
  // Columns named like a time are taken when at least half of their first cells read as times
  // (the others then get their own message), the finest first; other columns only when all of
  // their first cells do.
  for (const pattern of [TIME_NAMES, TIME_WORDS]) {
    const named: number[] = [];
    for (let c = 0; c < table.header.length; c++) if (pattern.test(table.header[c]) && timeShare(table.columns[c], true) >= 0.5) named.push(c);
    if (named.length === 0) continue;
    let best = named[0];
    let bestRank = timeFineness(table.columns[best]);
    for (const c of named.slice(1)) {
      const rank = timeFineness(table.columns[c]);
      if (rank < bestRank) [best, bestRank] = [c, rank];
    }
    return { column: best, passedOver: named.filter((c) => c !== best) };
  }
  for (let c = 0; c < table.header.length; c++) if (timeShare(table.columns[c], c === 0) === 1) return { column: c, passedOver: [] };
  throw new UsageError('layout-no-time', 'no time column found', {
    file: table.source,
    found: `columns ${table.header.map((h) => `"${h}"`).join(', ')}`,
    expected: 'a column of dates or periods (e.g. 2021-03-05, 2021-03, 2021-Q1, 2021)',
    hint: 'add a column of dates or periods, or name an existing one with --time',
  });
}

/** Fineness of the times of a column's first present cells: 0 date-time … 5 year, 6 index or none. */
const KIND_FINENESS: Record<TimeKind, number> = { datetime: 0, date: 1, week: 2, month: 3, quarter: 4, year: 5, index: 6 };

function timeFineness(cells: readonly Cell[]): number {
  let finest = KIND_FINENESS.index;
  let seen = 0;
  for (let r = 0; r < cells.length && seen < 20; r++) {
    const c = cells[r];
    if (c === null || (typeof c === 'string' && isMissingText(c))) continue;
    seen++;
    let kind: TimeKind | null = null;
    if (c instanceof ExcelSerial) kind = Number.isInteger(c.serial) ? 'date' : 'datetime';
    else if (typeof c === 'number') kind = Number.isInteger(c) && c >= 1000 && c <= 9999 ? 'year' : 'index';
    else if (typeof c === 'string') kind = numericDayMonthFields(c.trim()) ? 'date' : parseTimeText(c.trim(), null)?.kind ?? null;
    if (kind !== null) finest = Math.min(finest, KIND_FINENESS[kind]);
  }
  return finest;
}

/** Share of the first present cells (up to 20) that read as times; integers count only when `integersToo`. */
function timeShare(cells: readonly Cell[], integersToo: boolean): number {
  let seen = 0;
  let times = 0;
  for (let r = 0; r < cells.length && seen < 20; r++) {
    const c = cells[r];
    if (c === null || (typeof c === 'string' && isMissingText(c))) continue;
    seen++;
    if (c instanceof ExcelSerial) times++;
    else if (typeof c === 'number') {
      if (integersToo && Number.isInteger(c)) times++;
    } else if (typeof c === 'string') {
      const s = c.trim();
      if (numericDayMonthFields(s)) times++;
      else {
        const p = parseTimeText(s, null);
        if (p && (integersToo || (p.kind !== 'index' && p.kind !== 'year'))) times++;
      }
    }
  }
  return seen > 0 ? times / seen : 0;
}

/** Some present cell value occurs twice. */
function hasRepeats(cells: readonly Cell[]): boolean {
  const seen = new Set<unknown>();
  for (const c of cells) {
    if (c === null) continue;
    const key = c instanceof ExcelSerial ? c.serial : c;
    if (seen.has(key)) return true;
    seen.add(key);
  }
  return false;
}

/** A column not yet taken whose text cells are mostly decimal-comma numbers, with its first such cell. */
function decimalCommaColumn(table: Table, taken: Set<number>): { column: string; row: number; text: string } | null {
  for (let c = 0; c < table.header.length; c++) {
    if (taken.has(c) || mostlyText(table.columns[c], ',')) continue;
    const cells = table.columns[c];
    const r = cells.findIndex((x) => typeof x === 'string' && DECIMAL_COMMA_NUMBER.test(x.trim()));
    if (r >= 0) return { column: table.header[c], row: r, text: String(cells[r]) };
  }
  return null;
}

/** Mostly non-numeric cells (more than half of the first present ones). */
function mostlyText(cells: readonly Cell[], decimal: DecimalMark): boolean {
  let text = 0;
  let seen = 0;
  for (let r = 0; r < cells.length && seen < SAMPLE; r++) {
    const c = cells[r];
    if (c === null || (typeof c === 'string' && isMissingText(c))) continue;
    seen++;
    if (cellNumber(c, decimal) === undefined) text++;
  }
  return seen > 0 && text * 2 > seen;
}

/** Text cells that repeat (fewer distinct values than rows, or a single value): an id column. */
function isIdColumn(cells: readonly Cell[], decimal: DecimalMark): boolean {
  if (!mostlyText(cells, decimal)) return false;
  const distinct = new Set<string>();
  let present = 0;
  for (const c of cells) {
    if (c === null) continue;
    present++;
    distinct.add(String(c));
    if (distinct.size > 10_000) return distinct.size < present;
  }
  return distinct.size < present || distinct.size === 1;
}
