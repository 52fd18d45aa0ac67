/**
 * Irregular observations → a regular Series, in this order:
 *   1. sort by time (stable: rows with equal stamps keep file order);
 *   2. rows sharing a stamp: refused (`--duplicates error`, the default, naming the rows) or
 *      combined by an aggregator (`sum`, `mean`, `last`);
 *   3. stamps moved to the start of their period (calendar.ts `periodStart`);
 *   4. optionally folded into a coarser frequency (`--freq`, combined by `--aggregate`);
 *   5. laid on the grid of every period from the first to the last stamp; absent periods and
 *      missing cells are missing;
 *   6. leading and trailing periods where the value or an input is missing are trimmed;
 *   7. interior gaps, in the value and in each input, go to the gap policy (gaps.ts); every
 *      filled point is listed, refused gaps are all named in one error.
 */
import { formatTime, frequencyRank, periodName, periodStart, periodsBetween, seasonPeriod, stepTime, type Frequency } from './calendar.js';
import { aggregators, type AggregatorName } from './aggregators.js';
import { DataError, UsageError } from './errors.js';
import { findGaps, gapPolicies, MAX_INTERPOLATED_RUN, type Gap, type GapPolicyName } from './gaps.js';
import type { Series } from './series.js';

/** Observations of one series as read: times may be unsorted and repeated; NaN marks missing values. */
export interface RawSeries {
  name: string;
  times: Float64Array;
  values: Float64Array;
  inputs: { name: string; values: Float64Array }[];
  /** File row of each observation. */
  rows: Int32Array;
}

export type DuplicatePolicyName = 'error' | 'sum' | 'mean' | 'last';

export const DUPLICATE_POLICY_NAMES: readonly DuplicatePolicyName[] = ['error', 'sum', 'mean', 'last'];

export interface Where {
  file: string;
  /** Time column name. */
  timeColumn: string;
  /** Column the values of this series come from (the series column in wide layout). */
  valueColumn: string;
}

export interface DuplicateNote {
  time: string;
  rows: number[];
}

export interface FilledPoint {
  time: string;
  column: string;
  value: number;
}

export interface PartialPeriod {
  time: string;
  observed: number;
  expected: number;
}

export interface SeriesStats {
  min: number;
  max: number;
  mean: number;
  /** Sample standard deviation (divisor n − 1); null for a single value. */
  sd: number | null;
}

export interface SeriesReport {
  name: string;
  start: string;
  end: string;
  length: number;
  /** Observations read for this series (rows in the file). */
  observations: number;
  /** Missing value cells read, plus periods absent from the file, inside the final span. */
  missing: number;
  duplicates: DuplicateNote[];
  duplicatePolicy: DuplicatePolicyName;
  trimmed: { leading: number; trailing: number };
  filled: FilledPoint[];
  partialPeriods: PartialPeriod[];
  stats: SeriesStats;
}

export interface RegulariseOptions {
  /** The data's own frequency (from frequency.ts). */
  frequency: Frequency;
  /** Target frequency, coarser or equal; default: the data's own. */
  freq?: Frequency;
  aggregate: AggregatorName;
  duplicates: DuplicatePolicyName;
  gaps: GapPolicyName;
}

const FIXED_STEP: Partial<Record<Frequency, number>> = { index: 1, hourly: 3_600_000, daily: 86_400_000, weekly: 604_800_000 };

/** Largest grid certa lays out for one series (guards against a stray far-off date). */
export const MAX_PERIODS = 5_000_000;

/** Steps 1–2: sorted by time, equal stamps resolved. Returns the rows that were duplicates. */
export function sortAndResolveDuplicates(raw: RawSeries, policy: DuplicatePolicyName, where: Where, frequency: Frequency | null): { series: RawSeries; duplicates: DuplicateNote[]; sorted: boolean } {
  const n = raw.times.length;
  const order = new Int32Array(n);
  let inOrder = true;
  for (let i = 0; i < n; i++) {
    order[i] = i;
    if (i > 0 && raw.times[i] < raw.times[i - 1]) inOrder = false;
  }
  if (!inOrder) order.sort((a, b) => raw.times[a] - raw.times[b] || a - b);
  const pick = (src: Float64Array): Float64Array => (inOrder ? src : Float64Array.from(order, (i) => src[i]));
  const times = pick(raw.times);
  const values = pick(raw.values);
  const inputs = raw.inputs.map((x) => ({ name: x.name, values: pick(x.values) }));
  const rows = inOrder ? raw.rows : Int32Array.from(order, (i) => raw.rows[i]);

  const duplicates: DuplicateNote[] = [];
  let distinct = n;
  for (let i = 1; i < n; i++) if (times[i] === times[i - 1]) distinct--;
  if (distinct === n) return { series: { name: raw.name, times, values, inputs, rows }, duplicates, sorted: !inOrder };

  const label = (t: number): string => (frequency ? formatTime(t, frequency) : new Date(t).toISOString());
  for (let i = 0; i < n; ) {
    let j = i + 1;
    while (j < n && times[j] === times[i]) j++;
    if (j - i > 1) duplicates.push({ time: label(times[i]), rows: Array.from(rows.subarray(i, j)) });
    i = j;
  }
  if (policy === 'error') {
    const d = duplicates[0];
    const more = duplicates.length > 1 ? ` and ${duplicates.length - 1} more time stamp${duplicates.length > 2 ? 's' : ''}` : '';
    throw new DataError('duplicate-time', `series "${raw.name}" has more than one row for ${d.time}${more}`, {
      file: where.file,
      row: d.rows[1],
      column: where.timeColumn,
      found: `${d.time} at rows ${d.rows.join(', ')}`,
      expected: 'one row per time stamp',
      hint: 'pass --duplicates sum, mean or last to combine them',
    });
  }
  const combine = aggregators[policy];
  const outTimes = new Float64Array(distinct);
  const outValues = new Float64Array(distinct);
  const outInputs = inputs.map((x) => ({ name: x.name, values: new Float64Array(distinct) }));
  const outRows = new Int32Array(distinct);
  let k = 0;
  for (let i = 0; i < n; ) {
    let j = i + 1;
    while (j < n && times[j] === times[i]) j++;
    outTimes[k] = times[i];
    outValues[k] = combine(values, i, j);
    outInputs.forEach((x, c) => (x.values[k] = combine(inputs[c].values, i, j)));
    outRows[k] = rows[i];
    k++;
    i = j;
  }
  return { series: { name: raw.name, times: outTimes, values: outValues, inputs: outInputs, rows: outRows }, duplicates, sorted: !inOrder };
}

/** Steps 3–7 on a sorted series with distinct stamps. */
export function regularise(raw: RawSeries, options: RegulariseOptions, where: Where, duplicates: DuplicateNote[] = []): { series: Series; report: SeriesReport } {
  const base = options.frequency;
  const target = options.freq ?? base;
  checkTarget(base, target, where);
  const n = raw.times.length;

  // 3–4: period starts of the target frequency; several base periods may share one.
  const starts = new Float64Array(n);
  for (let i = 0; i < n; i++) starts[i] = periodStart(raw.times[i], target);
  let times = starts;
  let values = raw.values;
  let inputs = raw.inputs.map((x) => x.values);
  let rows = raw.rows;
  const partialPeriods: PartialPeriod[] = [];
  if (target !== base) {
    const combine = aggregators[options.aggregate];
    const groups: number[] = [];
    for (let i = 0; i < n; i++) if (i === 0 || starts[i] !== starts[i - 1]) groups.push(i);
    groups.push(n);
    const m = groups.length - 1;
    times = new Float64Array(m);
    values = new Float64Array(m);
    inputs = raw.inputs.map(() => new Float64Array(m));
    rows = new Int32Array(m);
    for (let g = 0; g < m; g++) {
      const from = groups[g];
      const to = groups[g + 1];
      times[g] = starts[from];
      values[g] = combine(raw.values, from, to);
      raw.inputs.forEach((x, c) => (inputs[c][g] = combine(x.values, from, to)));
      rows[g] = raw.rows[from];
      let observed = 0;
      for (let i = from; i < to; i++) if (raw.values[i] === raw.values[i]) observed++;
      const expected = periodsBetween(periodStart(times[g], base), periodStart(stepTime(times[g], target, 1), base), base);
      if (observed < expected) partialPeriods.push({ time: formatTime(times[g], target), observed, expected });
    }
  }

  // 5: the grid.
  const first = times[0];
  const last = times[times.length - 1];
  const span = periodsBetween(first, last, target) + 1;
  if (span > MAX_PERIODS) {
    throw new DataError('span-too-long', `series "${raw.name}" would span ${span} ${periodName(target, 2)}`, {
      file: where.file,
      column: where.timeColumn,
      found: `${formatTime(first, target)} to ${formatTime(last, target)}`,
      expected: `at most ${MAX_PERIODS} periods; check for a stray date`,
    });
  }
  // Hours, days, weeks and index steps have a fixed length: plain arithmetic, no calendar.
  const unit = FIXED_STEP[target];
  const indexOf = unit !== undefined ? (t: number) => Math.round((t - first) / unit) : (t: number) => periodsBetween(first, t, target);
  const timeAt = unit !== undefined ? (k: number) => first + k * unit : (k: number) => stepTime(first, target, k);
  const gridValues = new Float64Array(span).fill(NaN);
  const gridInputs = inputs.map(() => new Float64Array(span).fill(NaN));
  const gridRows = new Int32Array(span);
  for (let i = 0; i < times.length; i++) {
    const k = indexOf(times[i]);
    gridValues[k] = values[i];
    for (let c = 0; c < inputs.length; c++) gridInputs[c][k] = inputs[c][i];
    gridRows[k] = rows[i];
  }

  // 6: trim where the value or any input is missing.
  const complete = (k: number): boolean => {
    if (gridValues[k] !== gridValues[k]) return false;
    for (const x of gridInputs) if (x[k] !== x[k]) return false;
    return true;
  };
  let lo = 0;
  while (lo < span && !complete(lo)) lo++;
  if (lo === span) {
    const what = gridInputs.length > 0 ? 'no period where the value and every input are present' : 'no values';
    throw new DataError('series-all-missing', `series "${raw.name}" has ${what}`, {
      file: where.file,
      column: where.valueColumn,
      expected: 'at least one number',
    });
  }
  let hi = span - 1;
  while (!complete(hi)) hi--;

  let missing = 0;
  for (let k = lo; k <= hi; k++) if (gridValues[k] !== gridValues[k]) missing++;
  for (const x of gridInputs) for (let k = lo; k <= hi; k++) if (x[k] !== x[k]) missing++;

  // 7: interior gaps.
  const policy = gapPolicies[options.gaps];
  const filled: FilledPoint[] = [];
  const refused: { column: string; gap: Gap }[] = [];
  const columns = [{ name: where.valueColumn, values: gridValues }, ...raw.inputs.map((x, c) => ({ name: x.name, values: gridInputs[c] }))];
  for (const col of columns) {
    for (const gap of findGaps(col.values, lo, hi)) {
      if (policy(col.values, gap)) {
        for (let k = gap.start; k < gap.start + gap.length; k++) {
          filled.push({ time: formatTime(stepTime(first, target, k), target), column: col.name, value: col.values[k] });
        }
      } else refused.push({ column: col.name, gap });
    }
  }
  if (refused.length > 0) throw gapError(raw.name, refused, gridRows, first, target, options.gaps, where);

  const length = hi - lo + 1;
  const seriesTimes = new Float64Array(length);
  for (let k = 0; k < length; k++) seriesTimes[k] = timeAt(lo + k);
  const seriesValues = gridValues.slice(lo, hi + 1);
  const series: Series = {
    name: raw.name,
    frequency: target,
    season: seasonPeriod(target),
    time: seriesTimes,
    values: seriesValues,
    inputs: raw.inputs.map((x, c) => ({ name: x.name, values: gridInputs[c].slice(lo, hi + 1) })),
    source: where.file,
  };
  const report: SeriesReport = {
    name: raw.name,
    start: formatTime(seriesTimes[0], target),
    end: formatTime(seriesTimes[length - 1], target),
    length,
    observations: n,
    missing,
    duplicates,
    duplicatePolicy: options.duplicates,
    trimmed: { leading: lo, trailing: span - 1 - hi },
    filled,
    partialPeriods,
    stats: summaryStats(seriesValues),
  };
  return { series, report };
}

function checkTarget(base: Frequency, target: Frequency, where: Where): void {
  if (target === base) return;
  if (base === 'index' || target === 'index') {
    throw new UsageError('freq-index', `--freq ${target} cannot apply to ${base === 'index' ? 'an integer index' : 'dated data'}`, {
      file: where.file,
      column: where.timeColumn,
      found: `--freq ${target}`,
      expected: base === 'index' ? 'no --freq for index data' : 'a calendar frequency',
    });
  }
  if (frequencyRank(target) < frequencyRank(base)) {
    throw new UsageError('freq-finer', `--freq ${target} is finer than the data, which are ${base}`, {
      file: where.file,
      column: where.timeColumn,
      found: `--freq ${target}`,
      expected: `${base} or a coarser frequency`,
      hint: 'certa aggregates to coarser frequencies only; it does not invent points between observations',
    });
  }
}

function gapError(name: string, refused: { column: string; gap: Gap }[], gridRows: Int32Array, first: number, f: Frequency, policyName: GapPolicyName, where: Where): DataError {
  const describe = ({ column, gap }: { column: string; gap: Gap }): string => {
    const a = formatTime(stepTime(first, f, gap.start), f);
    const b = formatTime(stepTime(first, f, gap.start + gap.length - 1), f);
    const span = gap.length === 1 ? a : `${a} to ${b}`;
    return `${span} (${gap.length} ${periodName(f, gap.length)}${column !== where.valueColumn ? `, input "${column}"` : ''})`;
  };
  const shown = refused.slice(0, 8).map(describe).join(', ') + (refused.length > 8 ? `, and ${refused.length - 8} more` : '');
  const firstGap = refused[0];
  const after = gridRows[firstGap.gap.start + firstGap.gap.length];
  const missingWord = refused.length === 1 ? 'a gap' : `${refused.length} gaps`;
  const message =
    policyName === 'interpolate'
      ? `series "${name}" has ${missingWord} longer than ${MAX_INTERPOLATED_RUN} ${periodName(f, 2)}, which --gaps interpolate does not fill: ${shown}`
      : `series "${name}" has ${missingWord} of missing ${periodName(f, 2)}, refused by --gaps error: ${shown}`;
  return new DataError('gap-refused', message, {
    file: where.file,
    row: after > 0 ? after : undefined,
    column: firstGap.column,
    expected: policyName === 'interpolate' ? `runs of at most ${MAX_INTERPOLATED_RUN} missing ${periodName(f, 2)}` : 'no missing periods',
    hint:
      policyName === 'interpolate'
        ? 'fill them in the file, or pass --gaps zero (fill with 0) or --gaps carry (repeat the last value)'
        : `fill them in the file, or pass --gaps interpolate (runs up to ${MAX_INTERPOLATED_RUN}), zero or carry`,
  });
}

/**
 * Summary statistics: min, max, arithmetic mean and the sample standard deviation
 * s = √(Σ(x − x̄)² / (n − 1)), by the two-pass algorithm (mean first, then squared deviations).
 */
export function summaryStats(x: Float64Array): SeriesStats {
  let min = Infinity;
  let max = -Infinity;
  let sum = 0;
  for (const v of x) {
    if (v < min) min = v;
    if (v > max) max = v;
    sum += v;
  }
  const mean = sum / x.length;
  let ss = 0;
  for (const v of x) ss += (v - mean) * (v - mean);
  return { min, max, mean, sd: x.length > 1 ? Math.sqrt(ss / (x.length - 1)) : null };
}
