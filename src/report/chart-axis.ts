/**
 * Axes of certa charts: a time axis without a date library, and compact value labels.
 *
 * Time on the x axis is a plain linear scale: decimal years for calendar frequencies
 * (calendar.ts `decimalYear`), the step number itself for `index` series. Ticks are placed on
 * calendar boundaries (first of a month, Jan 1, Mondays, whole hours) chosen coarse enough that
 * the labels fit, and labelled with calendar.ts `formatTime`.
 */
import { decimalYear, formatTime, stepTime, type Frequency } from '../data/calendar.js';

export interface AxisTick {
  /** Position on the linear axis (decimal year, or step number for index series). */
  value: number;
  label: string;
}

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
/** 1970-01-05, the first Monday of the epoch. */
const FIRST_MONDAY = 4 * DAY;

type Unit = 'hour' | 'day' | 'week' | 'month' | 'year';

/** Calendar steps from fine to coarse; each frequency starts at its own period. */
const STEPS: ReadonlyArray<readonly [Unit, number]> = [
  ['hour', 1], ['hour', 2], ['hour', 3], ['hour', 6], ['hour', 12],
  ['day', 1], ['day', 2], ['week', 1], ['week', 2],
  ['month', 1], ['month', 2], ['month', 3], ['month', 6],
  ['year', 1], ['year', 2], ['year', 5], ['year', 10], ['year', 20], ['year', 25], ['year', 50],
  ['year', 100], ['year', 200], ['year', 250], ['year', 500], ['year', 1000],
];

const FIRST_STEP: Record<Exclude<Frequency, 'index'>, number> = {
  hourly: 0,
  daily: 5,
  weekly: 7,
  monthly: 9,
  quarterly: 11,
  yearly: 13,
};

/** Position of a time stamp on the chart's x axis. */
export function axisValue(t: number, frequency: Frequency): number {
  return decimalYear(t, frequency);
}

/** Characters of the widest label a frequency's ticks can have (for spacing). */
export function tickLabelChars(frequency: Frequency): number {
  return { hourly: 16, daily: 10, weekly: 10, monthly: 7, quarterly: 7, yearly: 4, index: 6 }[frequency];
}

/** Boundaries of one calendar step within [from, to], as time stamps. */
function boundaries(from: number, to: number, unit: Unit, count: number, limit: number): number[] {
  const out: number[] = [];
  const push = (t: number): boolean => {
    if (t >= from && t <= to) out.push(t);
    return out.length <= limit;
  };
  if (unit === 'hour' || unit === 'day' || unit === 'week') {
    const size = unit === 'hour' ? count * HOUR : unit === 'day' ? count * DAY : count * 7 * DAY;
    const origin = unit === 'week' ? FIRST_MONDAY : 0;
    for (let t = origin + Math.ceil((from - origin) / size) * size; t <= to; t += size) if (!push(t)) break;
    return out;
  }
  const d = new Date(from);
  if (unit === 'month') {
    let index = d.getUTCFullYear() * 12 + d.getUTCMonth();
    index = Math.floor(index / count) * count;
    for (;; index += count) {
      const t = Date.UTC(Math.floor(index / 12), index % 12, 1);
      if (t > to) break;
      if (!push(t)) break;
    }
    return out;
  }
  let year = Math.floor(d.getUTCFullYear() / count) * count;
  for (;; year += count) {
    const t = Date.UTC(year, 0, 1);
    if (t > to) break;
    if (!push(t)) break;
  }
  return out;
}

function labelFrequency(unit: Unit, count: number, frequency: Frequency): Frequency {
  switch (unit) {
    case 'hour':
      return 'hourly';
    case 'day':
    case 'week':
      return 'daily';
    case 'month':
      return frequency === 'quarterly' && count % 3 === 0 ? 'quarterly' : 'monthly';
    case 'year':
      return 'yearly';
  }
}

/**
 * Ticks for a time axis from time stamp `first` to `last`: the finest calendar step (at least
 * the data's own period) giving at most `maxTicks` ticks, labelled with `formatTime` at the
 * step's own precision (a year step shows `2021`, a month step `2021-03`, a quarter step of a
 * quarterly series `2021-Q1`). Index series get 1-2-5 steps on whole numbers.
 */
export function timeTicks(first: number, last: number, frequency: Frequency, maxTicks: number): AxisTick[] {
  const limit = Math.max(2, Math.floor(maxTicks));
  if (!(Number.isFinite(first) && Number.isFinite(last)) || last < first) return [];
  if (frequency === 'index') {
    let step = 1;
    for (let e = 0; e < 20; e++) {
      const found = [1, 2, 5].map((m) => m * 10 ** e).find((s) => Math.floor(last / s) - Math.ceil(first / s) + 1 <= limit);
      if (found !== undefined) {
        step = found;
        break;
      }
    }
    const ticks: AxisTick[] = [];
    for (let v = Math.ceil(first / step) * step; v <= last; v += step) ticks.push({ value: v, label: String(v) });
    return ticks;
  }
  for (let i = FIRST_STEP[frequency]; i < STEPS.length; i++) {
    const [unit, count] = STEPS[i];
    const times = boundaries(first, last, unit, count, limit);
    if (times.length <= limit) {
      const lf = labelFrequency(unit, count, frequency);
      return times.map((t) => ({ value: axisValue(t, frequency), label: formatTime(t, lf) }));
    }
  }
  return [];
}

/**
 * The x range a chart shows for time stamps from `first` to `last`: their axis values, widened by
 * one period on each side when they coincide (a single point) so the point is not on the frame.
 */
export function timeRange(first: number, last: number, frequency: Frequency): { min: number; max: number; from: number; to: number } {
  if (!(Number.isFinite(first) && Number.isFinite(last))) return { min: 0, max: 1, from: 0, to: 1 };
  let from = first;
  let to = last;
  if (to <= from) {
    from = stepTime(first, frequency, -1);
    to = stepTime(first, frequency, 1);
  }
  return { min: axisValue(from, frequency), max: axisValue(to, frequency), from, to };
}

/**
 * Compact value label for a y tick: thousands as `k`, millions as `M`, billions as `G` when the
 * largest tick magnitude reaches 10 000 (so 125000 reads `125k`), with as many decimals as the
 * tick step needs (at most 6); zero is always `0`; no grouping separators, no locale.
 * @example formatValueTick(12500, 2500, 30000) === '12.5k'
 */
export function formatValueTick(value: number, step: number, maxAbs: number): string {
  let scale = 1;
  let suffix = '';
  if (maxAbs >= 1e10) {
    scale = 1e9;
    suffix = 'G';
  } else if (maxAbs >= 1e7) {
    scale = 1e6;
    suffix = 'M';
  } else if (maxAbs >= 1e4) {
    scale = 1e3;
    suffix = 'k';
  }
  if (value === 0) return '0';
  const scaledStep = Math.abs(step) / scale;
  let decimals = 0;
  if (scaledStep > 0 && Number.isFinite(scaledStep)) {
    decimals = Math.min(6, Math.max(0, Math.ceil(-Math.log10(scaledStep) - 1e-9)));
    // a step such as 2.5 needs one more decimal than its magnitude says
    while (decimals < 6 && Math.abs(Math.round(scaledStep * 10 ** decimals) - scaledStep * 10 ** decimals) > 1e-6) decimals++;
  }
  const text = (value / scale).toFixed(decimals);
  const clean = /^-0(\.0*)?$/.test(text) ? text.slice(1) : text;
  return /^0(\.0+)?$/.test(clean) ? '0' : `${clean}${suffix}`;
}

/**
 * The lowest value a chart's value axis shows: 0 for a series that is never negative (NaN gaps
 * ignored), so a band's lower edge below zero does not stretch the axis under the data; null
 * when the series goes negative.
 */
export function valueFloor(values: ArrayLike<number>): 0 | null {
  for (let i = 0; i < values.length; i++) if (values[i] < 0) return null;
  return 0;
}
