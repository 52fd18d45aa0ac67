/**
 * Time cells → time stamps (UTC epoch ms of the period start; the integer itself for index).
 *
 * Forms read, each tagged with the `TimeKind` it implies:
 *   - `2021-03-05`, `2021/03/05`, `2021-03-05T14:30`, `2021-03-05 14:30:00Z`, `…+02:00` → date / datetime
 *   - `2021` → year,  `2021-03` → month,  `2021-Q1` (also `2021Q1`, `2021 Q1`) → quarter
 *   - `2021-W09` (also `2021W09`, `2021-W09-1`) → week: the Monday of that ISO 8601 week
 *   - English month names: `Mar 2021`, `March 2021`, `Mar 5 2021`, `Mar 5, 2021`, `5 Mar 2021`, `5-Mar-2021`
 *   - `05/03/2021` (separators / - .) → only with a day/month order, given or inferred per column
 *   - Excel serial day numbers (from XLSX date cells, or a column read with `--date-format excel`)
 *   - integers that are not all four-digit years → index
 * Local times without an offset are read as UTC; times with an offset are converted to UTC.
 */
import { DataError } from './errors.js';

export type TimeKind = 'datetime' | 'date' | 'week' | 'month' | 'quarter' | 'year' | 'index';

/** The forms `--date-format` accepts. `auto` detects per column. */
export type DateFormat = 'auto' | 'DD/MM/YYYY' | 'MM/DD/YYYY' | 'YYYY' | 'index' | 'excel';

export const DATE_FORMATS: readonly DateFormat[] = ['auto', 'DD/MM/YYYY', 'MM/DD/YYYY', 'YYYY', 'index', 'excel'];

export interface ParsedTime {
  t: number;
  kind: TimeKind;
}

const DAY = 86_400_000;

/** Words describing what a time cell may look like, used in every "expected" of a bad date. */
export const EXPECTED_TIME =
  'a date or period such as 2021-03-05, 2021-03-05T14:00, 2021-03, 2021-Q1, 2021-W09, 2021, Mar 5 2021, or an integer index';

const MONTHS: Record<string, number> = {
  jan: 0, january: 0, feb: 1, february: 1, mar: 2, march: 2, apr: 3, april: 3, may: 4, jun: 5, june: 5,
  jul: 6, july: 6, aug: 7, august: 7, sep: 8, sept: 8, september: 8, oct: 9, october: 9,
  nov: 10, november: 10, dec: 11, december: 11,
};

const MONTH_DAYS = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

/** Gregorian leap year rule: divisible by 4, except centuries not divisible by 400. */
export function isLeapYear(y: number): boolean {
  return (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
}

/** Days in month m (0-based) of year y, Gregorian. */
export function daysInMonth(y: number, m: number): number {
  return m === 1 && isLeapYear(y) ? 29 : MONTH_DAYS[m];
}

/**
 * Days from 1970-01-01 to the proleptic Gregorian date y-(m+1)-d, by whole 400-year eras
 * (146 097 days each) and a March-based year, so leap days fall at the end of the year
 * (H. Hinnant, "chrono-Compatible Low-Level Date Algorithms", days_from_civil).
 */
export function daysFromCivil(y: number, m: number, d: number): number {
  const yy = m < 2 ? y - 1 : y;
  const era = Math.floor(yy / 400);
  const yoe = yy - era * 400; // [0, 399]
  const mp = (m + 10) % 12; // March = 0 (m is 0-based)
  const doy = Math.floor((153 * mp + 2) / 5) + d - 1; // [0, 365]
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy; // [0, 146096]
  return era * 146_097 + doe - 719_468;
}

/** UTC ms of a calendar date (month 0-based, in range; day valid); years 0..99 kept as written, unlike Date.UTC. */
export function utcTime(y: number, m: number, d: number, hh = 0, mm = 0, ss = 0, ms = 0): number {
  if (m < 0 || m > 11) {
    y += Math.floor(m / 12);
    m -= Math.floor(m / 12) * 12;
  }
  return daysFromCivil(y, m, d) * DAY + ((hh * 60 + mm) * 60 + ss) * 1000 + ms;
}

/** Day of the week of a UTC midnight, 0 = Sunday … 6 = Saturday (1970-01-01 was a Thursday). */
function weekday(t: number): number {
  return (((Math.floor(t / DAY) + 4) % 7) + 7) % 7;
}

/**
 * Number of ISO 8601 weeks in year y: 53 when 1 January is a Thursday, or a Wednesday in a
 * leap year; 52 otherwise (ISO 8601-1:2019, 3.1.1.23 and the week-numbering rule).
 */
export function isoWeeksInYear(y: number): number {
  const jan1 = weekday(utcTime(y, 0, 1)); // 0 = Sunday … 4 = Thursday
  return jan1 === 4 || (jan1 === 3 && isLeapYear(y)) ? 53 : 52;
}

/**
 * Monday of ISO week w of ISO year y (UTC ms). Week 1 is the week containing 4 January, so its
 * Monday is 4 January minus (weekday(4 Jan) − 1) days, weekdays numbered Monday = 1 … Sunday = 7.
 * Returns NaN when week w does not exist in that year.
 */
export function isoWeekMonday(y: number, w: number): number {
  if (!Number.isInteger(w) || w < 1 || w > isoWeeksInYear(y)) return NaN;
  const jan4 = utcTime(y, 0, 4);
  const isoDay = weekday(jan4) || 7;
  return jan4 - (isoDay - 1) * DAY + (w - 1) * 7 * DAY;
}

/**
 * Excel serial day number → UTC ms, SpreadsheetML date systems (ECMA-376 Part 1, 18.17.4.1).
 * 1900 system: serial 1 is 1900-01-01; serial 60 is 1900-02-29, a day that never existed but
 * the system counts (kept for compatibility); serial 61 is 1900-03-01. certa refuses serial 60
 * (and serials below 1) rather than guess which real day was meant; it returns NaN for those.
 * 1904 system: serial 0 is 1904-01-01. A fractional part is the time of day.
 */
export function excelSerialToTime(serial: number, date1904 = false): number {
  if (!Number.isFinite(serial)) return NaN;
  const day = Math.floor(serial);
  const fraction = serial - day;
  let base: number;
  if (date1904) {
    if (serial < 0) return NaN;
    base = utcTime(1904, 0, 1) + day * DAY;
  } else {
    if (day < 1 || day === 60) return NaN;
    base = day < 60 ? utcTime(1899, 11, 31) + day * DAY : utcTime(1899, 11, 30) + day * DAY;
  }
  // Round the time of day to the millisecond: serials carry binary fractions of a day.
  return base + Math.round(fraction * DAY);
}

function isDigit(c: number): boolean {
  return c >= 48 && c <= 57;
}

function allDigits(s: string): boolean {
  if (s.length === 0) return false;
  for (let i = 0; i < s.length; i++) if (!isDigit(s.charCodeAt(i))) return false;
  return true;
}

function validDate(y: number, m: number, d: number): boolean {
  return m >= 0 && m <= 11 && d >= 1 && d <= daysInMonth(y, m);
}

/** Fast path for `YYYY-MM-DD`, the commonest form; NaN if s is not exactly that. */
export function isoDateFast(s: string): number {
  if (s.length !== 10 || s.charCodeAt(4) !== 45 || s.charCodeAt(7) !== 45) return NaN;
  let y = 0;
  for (let i = 0; i < 4; i++) {
    const c = s.charCodeAt(i) - 48;
    if (c < 0 || c > 9) return NaN;
    y = y * 10 + c;
  }
  const m1 = s.charCodeAt(5) - 48, m2 = s.charCodeAt(6) - 48, d1 = s.charCodeAt(8) - 48, d2 = s.charCodeAt(9) - 48;
  if (m1 < 0 || m1 > 9 || m2 < 0 || m2 > 9 || d1 < 0 || d1 > 9 || d2 < 0 || d2 > 9) return NaN;
  const m = m1 * 10 + m2 - 1;
  const d = d1 * 10 + d2;
  if (!validDate(y, m, d)) return NaN;
  return utcTime(y, m, d);
}

const TIME_OF_DAY = /^(\d{1,2}):(\d{2})(?::(\d{2})(?:\.(\d{1,9}))?)?\s*(Z|[+-]\d{2}:?\d{2})?$/i;

/** `HH:MM[:SS[.fff]][Z|±HH:MM]` → ms after midnight minus the offset; NaN if malformed. */
function timeOfDay(s: string): number {
  const m = TIME_OF_DAY.exec(s);
  if (!m) return NaN;
  const hh = Number(m[1]), mm = Number(m[2]), ss = m[3] ? Number(m[3]) : 0;
  if (hh > 23 || mm > 59 || ss > 59) return NaN;
  const ms = m[4] ? Math.round(Number(`0.${m[4]}`) * 1000) : 0;
  let offset = 0;
  if (m[5] && m[5].toUpperCase() !== 'Z') {
    const z = m[5].replace(':', '');
    const sign = z[0] === '-' ? -1 : 1;
    const oh = Number(z.slice(1, 3)), om = Number(z.slice(3, 5));
    if (oh > 23 || om > 59) return NaN;
    offset = sign * (oh * 60 + om) * 60_000;
  }
  return ((hh * 60 + mm) * 60 + ss) * 1000 + ms - offset;
}

const ISO_DATE_TIME = /^(\d{4})[-/](\d{1,2})[-/](\d{1,2})(?:[T ](.+))?$/i;
const YEAR_MONTH = /^(\d{4})-(\d{1,2})$/;
const QUARTER = /^(\d{4})[- ]?Q([1-4])$/i;
const QUARTER_FIRST = /^Q([1-4])[- ]?(\d{4})$/i;
const ISO_WEEK = /^(\d{4})-?W(\d{2})(?:-?([1-7]))?$/i;
const NUMERIC_DMY = /^(\d{1,2})[/.-](\d{1,2})[/.-](\d{4})(?:[T ](.+))?$/;

/** The two leading fields of a `NN/NN/YYYY` cell, or null if the cell is not of that form. */
export function numericDayMonthFields(s: string): [number, number] | null {
  const m = NUMERIC_DMY.exec(s);
  return m ? [Number(m[1]), Number(m[2])] : null;
}

/**
 * Parses one time cell (already trimmed, not a missing marker). `order` resolves `NN/NN/YYYY`
 * cells; without it they are not parsed (the caller decides the order per column first).
 * Returns null when the cell has no form certa reads.
 */
export function parseTimeText(s: string, order: 'DMY' | 'MDY' | null = null): ParsedTime | null {
  const fast = isoDateFast(s);
  if (fast === fast) return { t: fast, kind: 'date' };
  if (allDigits(s)) {
    const n = Number(s);
    return s.length === 4 ? { t: utcTime(n, 0, 1), kind: 'year' } : { t: n, kind: 'index' };
  }
  if (s.charCodeAt(0) === 45 && allDigits(s.slice(1))) return { t: Number(s), kind: 'index' };
  let m = ISO_DATE_TIME.exec(s);
  if (m) {
    const y = Number(m[1]), mo = Number(m[2]) - 1, d = Number(m[3]);
    if (!validDate(y, mo, d)) return null;
    if (m[4] === undefined) return { t: utcTime(y, mo, d), kind: 'date' };
    const tod = timeOfDay(m[4].trim());
    return tod === tod ? { t: utcTime(y, mo, d) + tod, kind: 'datetime' } : null;
  }
  if ((m = YEAR_MONTH.exec(s))) {
    const mo = Number(m[2]) - 1;
    return mo >= 0 && mo <= 11 ? { t: utcTime(Number(m[1]), mo, 1), kind: 'month' } : null;
  }
  if ((m = QUARTER.exec(s))) return { t: utcTime(Number(m[1]), (Number(m[2]) - 1) * 3, 1), kind: 'quarter' };
  if ((m = QUARTER_FIRST.exec(s))) return { t: utcTime(Number(m[2]), (Number(m[1]) - 1) * 3, 1), kind: 'quarter' };
  if ((m = ISO_WEEK.exec(s))) {
    const monday = isoWeekMonday(Number(m[1]), Number(m[2]));
    if (monday !== monday) return null;
    return { t: monday + (m[3] ? (Number(m[3]) - 1) * DAY : 0), kind: m[3] ? 'date' : 'week' };
  }
  if ((m = NUMERIC_DMY.exec(s))) {
    if (order === null) return null;
    const a = Number(m[1]), b = Number(m[2]), y = Number(m[3]);
    const d = order === 'DMY' ? a : b;
    const mo = (order === 'DMY' ? b : a) - 1;
    if (!validDate(y, mo, d)) return null;
    if (m[4] === undefined) return { t: utcTime(y, mo, d), kind: 'date' };
    const tod = timeOfDay(m[4].trim());
    return tod === tod ? { t: utcTime(y, mo, d) + tod, kind: 'datetime' } : null;
  }
  return parseMonthName(s);
}

/** English month-name forms: `Mar 2021`, `March 5 2021`, `Mar 5, 2021`, `5 Mar 2021`, `5-Mar-2021`, `2021 Mar`. */
function parseMonthName(s: string): ParsedTime | null {
  const parts = s.split(/[\s,\-/]+/).filter((p) => p.length > 0);
  if (parts.length < 2 || parts.length > 3) return null;
  const monthAt = parts.findIndex((p) => MONTHS[p.toLowerCase().replace(/\.$/, '')] !== undefined);
  if (monthAt < 0) return null;
  const month = MONTHS[parts[monthAt].toLowerCase().replace(/\.$/, '')];
  const rest = parts.filter((_, i) => i !== monthAt);
  if (!rest.every(allDigits)) return null;
  if (parts.length === 2) {
    if (rest[0].length !== 4) return null;
    return { t: utcTime(Number(rest[0]), month, 1), kind: 'month' };
  }
  // Three parts: the year is the four-digit one, the day the other (1 or 2 digits).
  const yearAt = rest.findIndex((p) => p.length === 4);
  if (yearAt < 0 || rest[1 - yearAt].length > 2) return null;
  const y = Number(rest[yearAt]);
  const d = Number(rest[1 - yearAt]);
  if (!validDate(y, month, d)) return null;
  return { t: utcTime(y, month, d), kind: 'date' };
}

/**
 * Decides the day/month order of a column of `NN/NN/YYYY` cells: day-first if some first field
 * exceeds 12, month-first if some second field does, null if no cell settles it. Throws when
 * both happen (the column mixes orders). `cells` holds the column's text cells with their rows.
 */
export function inferDayMonthOrder(
  cells: Iterable<{ text: string; row: number }>,
  where: { file: string; column: string },
): 'DMY' | 'MDY' | null {
  let dayFirst: { text: string; row: number } | null = null;
  let monthFirst: { text: string; row: number } | null = null;
  for (const c of cells) {
    const f = numericDayMonthFields(c.text);
    if (!f) continue;
    if (f[0] > 12 && !dayFirst) dayFirst = c;
    if (f[1] > 12 && !monthFirst) monthFirst = c;
  }
  if (dayFirst && monthFirst) {
    throw new DataError('time-order-mixed', 'dates mix day-first and month-first orders', {
      file: where.file,
      row: monthFirst.row,
      column: where.column,
      found: `${dayFirst.text}" (row ${dayFirst.row}) and "${monthFirst.text}`,
      expected: 'one order for the whole column',
      hint: 'fix the file, or pass --date-format DD/MM/YYYY or --date-format MM/DD/YYYY',
    });
  }
  return dayFirst ? 'DMY' : monthFirst ? 'MDY' : null;
}

/** Finest frequency a time kind can carry (used when a series has a single point). */
export function kindFrequency(kind: TimeKind): 'hourly' | 'daily' | 'weekly' | 'monthly' | 'quarterly' | 'yearly' | 'index' {
  return ({ datetime: 'hourly', date: 'daily', week: 'weekly', month: 'monthly', quarter: 'quarterly', year: 'yearly', index: 'index' } as const)[kind];
}

/** Words for a time kind, for reports. */
export function describeKind(kind: TimeKind): string {
  return {
    datetime: 'date-times',
    date: 'dates',
    week: 'ISO weeks (YYYY-Www)',
    month: 'months (YYYY-MM)',
    quarter: 'quarters (YYYY-Qn)',
    year: 'years (YYYY)',
    index: 'integer index',
  }[kind];
}
