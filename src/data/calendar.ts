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
 * A function's results remembered by key, at most `limit` of them (emptied when full): the
 * results never depend on what it holds. A file of many series repeats the same stamps in every
 * series, and loading and writing read each stamp's fields, period start and text many times.
 */
function remembered<V>(make: (key: number) => V, limit: number): (key: number) => V {
  const kept = new Map<number, V>();
  return (key) => {
    let v = kept.get(key);
    if (v === undefined) {
      v = make(key);
      if (kept.size >= limit) kept.clear();
      kept.set(key, v);
    }
    return v;
  };
}

const PARTS_MEMORY = 1 << 14;

/** The UTC fields of t (epoch milliseconds), from `Date`, remembered for the next call. */
export const utcParts: (t: number) => UtcParts = remembered((t) => {
  const d = new Date(t);
  return { year: d.getUTCFullYear(), month: d.getUTCMonth(), date: d.getUTCDate(), hours: d.getUTCHours(), minutes: d.getUTCMinutes(), monthEnd: new Date(t + DAY).getUTCDate() === 1 };
}, PARTS_MEMORY);

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
  let texts = timeTexts.get(f);
  if (texts === undefined) timeTexts.set(f, (texts = remembered((t) => timeText(t, f), TIME_TEXTS_KEPT)));
  return texts(t);
}

/** The texts `formatTime` made, by frequency (at most `TIME_TEXTS_KEPT` of each). */
const timeTexts = new Map<Frequency, (t: number) => string>();
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
      return monthStart(d.year * 12 + month);
    }
  }
}

/** Epoch milliseconds of the first of the month numbered year·12 + month (month 0-based), remembered. */
const monthStart = remembered((key) => {
  const year = Math.floor(key / 12);
  const start = new Date(0);
  start.setUTCFullYear(year, key - 12 * year, 1);
  return start.getTime();
}, PARTS_MEMORY);

/** The name of one period, for messages: "month", "day", "step" for index. */
export function periodName(f: Frequency, count = 1): string {
  const one = { hourly: 'hour', daily: 'day', weekly: 'week', monthly: 'month', quarterly: 'quarter', yearly: 'year', index: 'step' }[f];
  return count === 1 ? one : `${one}s`;
}
