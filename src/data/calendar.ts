/**
 * Regular calendars: the frequencies certa understands and arithmetic on their time stamps.
 *
 * Time stamps are numbers: UTC epoch milliseconds of the start of each period for calendar
 * frequencies, and the integer itself for `index` (a plain step counter). Monthly, quarterly and
 * yearly steps move by calendar months (Date.UTC arithmetic), never by a fixed number of days.
 */

export type Frequency = 'hourly' | 'daily' | 'weekly' | 'monthly' | 'quarterly' | 'yearly' | 'index';

export const FREQUENCIES: readonly Frequency[] = ['hourly', 'daily', 'weekly', 'monthly', 'quarterly', 'yearly', 'index'];

const HOUR = 3_600_000;
const DAY = 24 * HOUR;

/** The UTC calendar fields of a time stamp, as `Date`'s getUTC… methods give them. */
export interface UtcParts {
  year: number;
  /** 0 = January. */
  month: number;
  /** Day of the month, 1 … 31. */
  date: number;
  hours: number;
  minutes: number;
  /** True when the stamp falls on the last day of its month. */
  monthEnd: boolean;
}

/**
 * Fields of the stamps seen lately. A file of many series repeats the same stamps in every
 * series, and loading reads each stamp's fields several times (frequency, steps, periods), so
 * the fields are looked up rather than read from a new `Date` each time. Bounded: emptied when
 * it reaches PARTS_MEMORY entries (the results never depend on what it holds).
 */
const partsMemo = new Map<number, UtcParts>();
const PARTS_MEMORY = 1 << 14;

/** The UTC fields of t (epoch milliseconds), from `Date`, remembered for the next call. */
export function utcParts(t: number): UtcParts {
  let p = partsMemo.get(t);
  if (p === undefined) {
    const d = new Date(t);
    p = { year: d.getUTCFullYear(), month: d.getUTCMonth(), date: d.getUTCDate(), hours: d.getUTCHours(), minutes: d.getUTCMinutes(), monthEnd: new Date(t + DAY).getUTCDate() === 1 };
    if (partsMemo.size >= PARTS_MEMORY) partsMemo.clear();
    partsMemo.set(t, p);
  }
  return p;
}

/** Coarseness rank, used to check that `--freq` aggregates to a coarser frequency. */
export function frequencyRank(f: Frequency): number {
  return { index: 0, hourly: 1, daily: 2, weekly: 3, monthly: 4, quarterly: 5, yearly: 6 }[f];
}

/**
 * The season length in observations used by seasonal terms and seasonal baselines:
 * 24 for hourly (daily cycle), 7 for daily (weekly cycle), 52 for weekly, 12 monthly, 4 quarterly;
 * yearly and index series have no season (null). Common practice, not a law. A series observed
 * every `step` base periods has the base season divided by the step when that is a whole number
 * of at least 2 (every 2 months: 6; every 2 weeks: 26), and no season otherwise (every 5 days).
 */
export function seasonPeriod(f: Frequency, step = 1): number | null {
  const base = BASE_SEASON[f];
  if (base === null) return null;
  const s = base / step;
  return Number.isInteger(s) && s >= 2 ? s : null;
}

const BASE_SEASON: Record<Frequency, number | null> = { hourly: 24, daily: 7, weekly: 52, monthly: 12, quarterly: 4, yearly: null, index: null };

/** Days in the mean Gregorian year: the period of the yearly cycle of daily data, in days. */
export const DAYS_PER_YEAR = 365.25;

/**
 * The name of a cadence: the frequency itself for one period per step (`monthly`), otherwise
 * `every 10 years`, `every 2 weeks`.
 */
export function cadenceName(f: Frequency, step = 1): string {
  return step === 1 ? f : `every ${step} ${periodName(f, step)}`;
}

/** Periods per year (used to express rates per year); null for index. */
export function periodsPerYear(f: Frequency): number | null {
  return { hourly: 8766, daily: 365.25, weekly: 52.1775, monthly: 12, quarterly: 4, yearly: 1, index: null }[f];
}

/** The time stamp k periods after t (k may be negative). */
export function stepTime(t: number, f: Frequency, k: number): number {
  switch (f) {
    case 'index':
      return t + k;
    case 'hourly':
      return t + k * HOUR;
    case 'daily':
      return t + k * DAY;
    case 'weekly':
      return t + k * 7 * DAY;
    case 'monthly':
    case 'quarterly':
    case 'yearly': {
      const months = f === 'monthly' ? k : f === 'quarterly' ? 3 * k : 12 * k;
      const d = utcParts(t);
      return Date.UTC(d.year, d.month + months, d.date, d.hours, d.minutes);
    }
  }
}

/** Whole periods from a to b (b later gives a positive count); exact for aligned stamps. */
export function periodsBetween(a: number, b: number, f: Frequency): number {
  switch (f) {
    case 'index':
      return Math.round(b - a);
    case 'hourly':
      return Math.round((b - a) / HOUR);
    case 'daily':
      return Math.round((b - a) / DAY);
    case 'weekly':
      return Math.round((b - a) / (7 * DAY));
    case 'monthly':
    case 'quarterly':
    case 'yearly': {
      const da = utcParts(a);
      const db = utcParts(b);
      const months = (db.year - da.year) * 12 + (db.month - da.month);
      return f === 'monthly' ? months : f === 'quarterly' ? Math.round(months / 3) : Math.round(months / 12);
    }
  }
}

/** Decimal year of a time stamp (for charts and rates); the index itself for index series. */
export function decimalYear(t: number, f: Frequency): number {
  if (f === 'index') return t;
  const d = new Date(t);
  const y = d.getUTCFullYear();
  const start = Date.UTC(y, 0, 1);
  const end = Date.UTC(y + 1, 0, 1);
  return y + (t - start) / (end - start);
}

/**
 * A time stamp as people write it for that frequency:
 * `2021-03-05T14:00` hourly, `2021-03-05` daily and weekly (the Monday), `2021-03` monthly,
 * `2021-Q1` quarterly, `2021` yearly, the integer for index.
 */
export function formatTime(t: number, f: Frequency): string {
  if (f === 'index') return String(t);
  // the same stamps are written again and again (every table, page and series of a batch)
  let texts = timeTexts.get(f);
  if (texts === undefined) timeTexts.set(f, (texts = new Map()));
  let text = texts.get(t);
  if (text === undefined) {
    text = timeText(t, f);
    if (texts.size >= TIME_TEXTS_KEPT) texts.clear();
    texts.set(t, text);
  }
  return text;
}

/** The texts `formatTime` made, by frequency and time stamp (at most `TIME_TEXTS_KEPT` of each). */
const timeTexts = new Map<Frequency, Map<number, string>>();
const TIME_TEXTS_KEPT = 100_000;

function timeText(t: number, f: Exclude<Frequency, 'index'>): string {
  const d = new Date(t);
  const y = String(d.getUTCFullYear()).padStart(4, '0');
  const m = String(d.getUTCMonth() + 1).padStart(2, '0');
  const day = String(d.getUTCDate()).padStart(2, '0');
  switch (f) {
    case 'hourly':
      return `${y}-${m}-${day}T${String(d.getUTCHours()).padStart(2, '0')}:00`;
    case 'daily':
    case 'weekly':
      return `${y}-${m}-${day}`;
    case 'monthly':
      return `${y}-${m}`;
    case 'quarterly':
      return `${y}-Q${Math.floor(d.getUTCMonth() / 3) + 1}`;
    case 'yearly':
      return y;
  }
}

/**
 * The start of the period of frequency f that contains t: the hour, the UTC midnight, the
 * Monday of the ISO week, the first of the month, quarter (Jan, Apr, Jul, Oct) or year.
 * Index stamps are returned unchanged.
 */
export function periodStart(t: number, f: Frequency): number {
  switch (f) {
    case 'index':
      return t;
    case 'hourly':
      return Math.floor(t / HOUR) * HOUR;
    case 'daily':
      return Math.floor(t / DAY) * DAY;
    case 'weekly': {
      const day = Math.floor(t / DAY) * DAY;
      const isoWeekday = new Date(day).getUTCDay() || 7; // Monday = 1 … Sunday = 7
      return day - (isoWeekday - 1) * DAY;
    }
    case 'monthly':
    case 'quarterly':
    case 'yearly': {
      const d = utcParts(t);
      const m = d.month;
      const month = f === 'monthly' ? m : f === 'quarterly' ? m - (m % 3) : 0;
      return monthStart(d.year, month);
    }
  }
}

/** Epoch milliseconds of the first of month `month` (0-based) of `year`, remembered by month. */
const monthStarts = new Map<number, number>();

function monthStart(year: number, month: number): number {
  const key = year * 12 + month;
  let t = monthStarts.get(key);
  if (t === undefined) {
    const start = new Date(0);
    start.setUTCFullYear(year, month, 1);
    t = start.getTime();
    if (monthStarts.size >= PARTS_MEMORY) monthStarts.clear();
    monthStarts.set(key, t);
  }
  return t;
}

/** The name of one period, for messages: "month", "day", "step" for index. */
export function periodName(f: Frequency, count = 1): string {
  const one = { hourly: 'hour', daily: 'day', weekly: 'week', monthly: 'month', quarterly: 'quarter', yearly: 'year', index: 'step' }[f];
  return count === 1 ? one : `${one}s`;
}
