/**
 * A whole time column → time stamps, with one interpretation for the column.
 *
 * Each distinct text is parsed once (long files repeat dates across series). `NN/NN/YYYY` cells
 * take the order given by `--date-format`, else the order the column itself settles (some first
 * field above 12 → day-first), else they are refused. A column of integers is years when every
 * one has four digits, an index otherwise. Calendar forms may be mixed (the frequency step
 * decides); an index may not be mixed with dates.
 */
import { DataError } from './errors.js';
import {
  EXPECTED_TIME,
  excelSerialToTime,
  isoDateFast,
  inferDayMonthOrder,
  numericDayMonthFields,
  parseTimeText,
  type DateFormat,
  type ParsedTime,
  type TimeKind,
  utcTime,
} from './dates.js';
import { isMissingText } from './numbers.js';
import { ExcelSerial, type Cell } from './table.js';

export interface TimeColumn {
  /** Time stamps; NaN where the cell is missing. */
  times: Float64Array;
  /** The finest kind seen (datetime finest, year coarsest). */
  kind: TimeKind;
  /** Readable description of the form read, e.g. "dates (YYYY-MM-DD)". */
  form: string;
  /** Day/month order used for `NN/NN/YYYY` cells, if any occurred. */
  order: 'DMY' | 'MDY' | null;
}

const FINENESS: Record<TimeKind, number> = { datetime: 0, date: 1, week: 2, month: 3, quarter: 4, year: 5, index: 6 };

export function parseTimeColumn(
  cells: readonly Cell[],
  rows: ArrayLike<number>,
  where: { file: string; column: string },
  format: DateFormat = 'auto',
): TimeColumn {
  const n = cells.length;
  const times = new Float64Array(n);
  const bad = (r: number, found: string, expected = EXPECTED_TIME, hint?: string): DataError =>
    new DataError('time-unreadable', 'the time cell cannot be read', {
      file: where.file,
      row: rows[r],
      column: where.column,
      found,
      expected,
      ...(hint ? { hint } : {}),
    });

  // Numbers-only formats first.
  if (format === 'index' || format === 'YYYY' || format === 'excel') {
    for (let r = 0; r < n; r++) {
      const c = cells[r];
      if (c === null || (typeof c === 'string' && isMissingText(c))) {
        times[r] = NaN;
        continue;
      }
      const v = c instanceof ExcelSerial ? c.serial : typeof c === 'number' ? c : typeof c === 'string' ? Number(c.trim()) : NaN;
      if (format === 'excel') {
        const t = excelSerialToTime(v, c instanceof ExcelSerial ? c.date1904 : false);
        if (t !== t) throw excelRefusal(bad, r, String(v));
        times[r] = t;
      } else if (!Number.isInteger(v) || (format === 'YYYY' && (v < 0 || v > 9999))) {
        throw bad(r, String(c), format === 'index' ? 'an integer index' : 'a four-digit year');
      } else {
        times[r] = format === 'index' ? v : utcTime(v, 0, 1);
      }
    }
    const kind: TimeKind = format === 'index' ? 'index' : format === 'YYYY' ? 'year' : finestExcelKind(times);
    return { times, kind, form: format === 'excel' ? 'Excel serial dates' : format === 'index' ? 'integer index' : 'years (YYYY)', order: null };
  }

  let order: 'DMY' | 'MDY' | null = format === 'DD/MM/YYYY' ? 'DMY' : format === 'MM/DD/YYYY' ? 'MDY' : null;
  if (order === null) {
    const slashCells: { text: string; row: number }[] = [];
    for (let r = 0; r < n; r++) {
      const c = cells[r];
      if (typeof c === 'string' && numericDayMonthFields(c.trim())) slashCells.push({ text: c.trim(), row: rows[r] });
    }
    if (slashCells.length > 0) {
      order = inferDayMonthOrder(slashCells, where);
      if (order === null) {
        const first = slashCells[0];
        throw new DataError('time-ambiguous', 'the day/month order of the dates is ambiguous', {
          file: where.file,
          row: first.row,
          column: where.column,
          found: first.text,
          expected: 'dates whose order is known',
          hint: 'pass --date-format DD/MM/YYYY (day first) or --date-format MM/DD/YYYY (month first)',
        });
      }
    }
  }

  const cache = new Map<string, ParsedTime | null>();
  const kinds = new Set<TimeKind>();
  let numbers = 0;
  let excelSerials = 0;
  let present = 0;
  let sawIsoDate = false;
  for (let r = 0; r < n; r++) {
    const c = cells[r];
    if (c === null) {
      times[r] = NaN;
      continue;
    }
    if (typeof c === 'string') {
      const fast = isoDateFast(c);
      if (fast === fast) {
        times[r] = fast;
        sawIsoDate = true;
        present++;
        continue;
      }
      let p = cache.get(c);
      if (p === undefined) {
        const s = c.trim();
        p = isMissingText(s) ? null : parseTimeText(s, order);
        if (p === null && !isMissingText(s)) throw bad(r, c);
        cache.set(c, p);
      }
      if (p === null) {
        times[r] = NaN;
        continue;
      }
      times[r] = p.t;
      kinds.add(p.kind);
    } else if (c instanceof ExcelSerial) {
      const t = excelSerialToTime(c.serial, c.date1904);
      if (t !== t) throw excelRefusal(bad, r, String(c.serial));
      times[r] = t;
      excelSerials++;
      kinds.add(Number.isInteger(c.serial) ? 'date' : 'datetime');
    } else if (typeof c === 'number') {
      if (!Number.isInteger(c)) throw bad(r, String(c), `${EXPECTED_TIME}; a fractional number is not a time`, 'for Excel serial day numbers pass --date-format excel');
      times[r] = c;
      numbers++;
      kinds.add(c >= 1000 && c <= 9999 ? 'year' : 'index');
    } else {
      throw bad(r, String(c));
    }
    present++;
  }
  if (sawIsoDate) kinds.add('date');
  if (present === 0) {
    throw new DataError('time-all-missing', 'the time column has no values', {
      file: where.file,
      column: where.column,
      expected: EXPECTED_TIME,
      hint: 'name the time column with --time',
    });
  }
  // Integers: years when all are four-digit, an index otherwise.
  if (kinds.has('index') && kinds.has('year') && onlyIntegers(cells)) {
    kinds.delete('year');
    for (let r = 0; r < n; r++) {
      const c = cells[r];
      if (times[r] === times[r]) times[r] = typeof c === 'number' ? c : Number(String(c).trim());
    }
  } else if (numbers > 0 && kinds.has('year') && !kinds.has('index')) {
    for (let r = 0; r < n; r++) if (typeof cells[r] === 'number') times[r] = utcTime(cells[r] as number, 0, 1);
  }
  if (kinds.has('index') && kinds.size > 1) {
    const r = firstOfKind(cells, 'index', order);
    throw new DataError('time-mixed-kinds', 'the time column mixes integer indices with dates', {
      file: where.file,
      row: rows[r],
      column: where.column,
      found: String(cells[r]),
      expected: 'either dates or integer indices throughout',
    });
  }
  let kind: TimeKind = 'index';
  for (const k of kinds) if (FINENESS[k] < FINENESS[kind]) kind = k;
  const form = excelSerials > 0 ? 'Excel dates' : describeForm(kinds, order);
  return { times, kind, form, order };
}

function excelRefusal(bad: (r: number, f: string, e?: string, h?: string) => DataError, r: number, found: string): DataError {
  return bad(
    r,
    found,
    'an Excel serial date of 1 (1900-01-01) or later, other than 60',
    'serial 60 is 1900-02-29, a day that did not exist (kept by the 1900 date system); correct the cell',
  );
}

function finestExcelKind(times: Float64Array): TimeKind {
  for (const t of times) if (t === t && t % 86_400_000 !== 0) return 'datetime';
  return 'date';
}

function onlyIntegers(cells: readonly Cell[]): boolean {
  for (const c of cells) {
    if (c === null) continue;
    if (typeof c === 'number') {
      if (!Number.isInteger(c)) return false;
    } else if (typeof c === 'string') {
      const s = c.trim();
      if (!isMissingText(s) && !/^-?\d+$/.test(s)) return false;
    } else return false;
  }
  return true;
}

function firstOfKind(cells: readonly Cell[], kind: TimeKind, order: 'DMY' | 'MDY' | null): number {
  for (let r = 0; r < cells.length; r++) {
    const c = cells[r];
    if (typeof c === 'number' && kind === 'index') return r;
    if (typeof c === 'string' && parseTimeText(c.trim(), order)?.kind === kind) return r;
  }
  return 0;
}

function describeForm(kinds: Set<TimeKind>, order: 'DMY' | 'MDY' | null): string {
  const names: Record<TimeKind, string> = {
    datetime: 'date-times',
    date: order === 'DMY' ? 'dates (DD/MM/YYYY)' : order === 'MDY' ? 'dates (MM/DD/YYYY)' : 'dates',
    week: 'ISO weeks (YYYY-Www)',
    month: 'months (YYYY-MM)',
    quarter: 'quarters (YYYY-Qn)',
    year: 'years (YYYY)',
    index: 'integer index',
  };
  return [...kinds].sort((a, b) => FINENESS[a] - FINENESS[b]).map((k) => names[k]).join(' and ');
}
