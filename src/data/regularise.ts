/**
 * Irregular observations → a regular Series, in this order:
 *   1. sort by time (stable: rows with equal stamps keep file order);
 *   2. rows sharing a stamp: refused (`--duplicates error`, the default, naming the rows) or
 *      combined by an aggregator (`sum`, `mean`, `last`);
 *   3. stamps moved to the start of their period (calendar.ts `periodStart`);
 *   4. optionally folded into a coarser frequency (`--freq`, combined by `--aggregate`); stamps
 *      that fall in one period (stray stamps folded with `--freq` of the data's own frequency)
 *      are combined the same way. A folded period that holds fewer observations than the
 *      finer frequency puts in it is incomplete: at either end of the series it is dropped
 *      (`partial: 'drop'`, the default) or kept (`'keep'`); inside it is kept; all are listed;
 *   5. laid on the grid of every step (one period, or the data's step of several periods) from
 *      the first to the last stamp; absent steps and missing cells are missing;
 *   6. leading and trailing periods where the value or an input is missing are trimmed;
 *   7. interior gaps, in the value and in each input, go to the gap policy (gaps.ts); every
 *      filled point is listed, refused gaps are all named in one error.
 */
import { cadenceName, FREQUENCIES, formatTime, frequencyRank, periodName, periodStart, periodsBetween, seasonPeriod, stepTime, type Frequency } from './calendar.js';
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

/** A combined time stamp at either end with fewer rows than most (a partial year summed, say). */
export interface ShortEnd {
  time: string;
  rows: number;
  /** The most common number of rows per time stamp. */
  typical: number;
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
  /** Left out of the series (an incomplete period at either end, under `partial: 'drop'`). */
  dropped: boolean;
}

/** What to do with incomplete folded periods at either end of a series (`--partial`). */
export type PartialPolicyName = 'drop' | 'keep';

export const PARTIAL_POLICY_NAMES: readonly PartialPolicyName[] = ['drop', 'keep'];

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
  /** The data's own step in periods of `frequency` (from frequency.ts; default 1). */
  step?: number;
  /** Target frequency, coarser or equal; default: the data's own. */
  freq?: Frequency;
  aggregate: AggregatorName;
  duplicates: DuplicatePolicyName;
  gaps: GapPolicyName;
  /** Incomplete folded periods at either end (default drop). */
  partial?: PartialPolicyName;
  /** Season length in observations (default: from the frequency and step, calendar.ts). */
  season?: number | null;
}

const FIXED_STEP: Partial<Record<Frequency, number>> = { index: 1, hourly: 3_600_000, daily: 86_400_000, weekly: 604_800_000 };

/** Largest grid certa lays out for one series (guards against a stray far-off date). */
export const MAX_PERIODS = 5_000_000;

/** Steps 1–2: sorted by time, equal stamps resolved. Returns the rows that were duplicates. */
export function sortAndResolveDuplicates(
  raw: RawSeries,
  policy: DuplicatePolicyName,
  where: Where,
  frequency: Frequency | null,
): { series: RawSeries; duplicates: DuplicateNote[]; sorted: boolean; shortEnds: ShortEnd[] } {
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
  if (distinct === n) return { series: { name: raw.name, times, values, inputs, rows }, duplicates, sorted: !inOrder, shortEnds: [] };

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
  const sizes = new Int32Array(distinct);
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
    sizes[k] = j - i;
    k++;
    i = j;
  }
  return { series: { name: raw.name, times: outTimes, values: outValues, inputs: outInputs, rows: outRows }, duplicates, sorted: !inOrder, shortEnds: shortEnds(sizes, outTimes, label) };
}

/** The first and last combined stamps when they hold fewer rows than the most common count. */
function shortEnds(sizes: Int32Array, times: Float64Array, label: (t: number) => string): ShortEnd[] {
  const tally = new Map<number, number>();
  for (const c of sizes) tally.set(c, (tally.get(c) ?? 0) + 1);
  let typical = 0;
  let best = 0;
  for (const [size, count] of tally) if (count > best || (count === best && size > typical)) [typical, best] = [size, count];
  const out: ShortEnd[] = [];
  const m = sizes.length;
  if (typical < 2 || m < 2) return out;
  if (sizes[0] < typical) out.push({ time: label(times[0]), rows: sizes[0], typical });
  if (sizes[m - 1] < typical) out.push({ time: label(times[m - 1]), rows: sizes[m - 1], typical });
  return out;
}

/** Steps 3–7 on a sorted series with distinct stamps. */
export function regularise(raw: RawSeries, options: RegulariseOptions, where: Where, duplicates: DuplicateNote[] = []): { series: Series; report: SeriesReport } {
  const base = options.frequency;
  const baseStep = options.step ?? 1;
  const target = options.freq ?? base;
  if (options.freq !== undefined) checkTarget(base, baseStep, target, where);
  const step = target === base ? baseStep : 1;
  const n = raw.times.length;

  // 3–4: period starts of the target frequency; several stamps may share one.
  const starts = new Float64Array(n);
  for (let i = 0; i < n; i++) starts[i] = periodStart(raw.times[i], target);
  let times = starts;
  let values = raw.values;
  let inputs = raw.inputs.map((x) => x.values);
  let rows = raw.rows;
  const partialPeriods: PartialPeriod[] = [];
  const groups: number[] = [];
  for (let i = 0; i < n; i++) if (i === 0 || starts[i] !== starts[i - 1]) groups.push(i);
  groups.push(n);
  if (target !== base || groups.length - 1 < n) {
    const combine = aggregators[options.aggregate];
    const m = groups.length - 1;
    times = new Float64Array(m);
    values = new Float64Array(m);
    inputs = raw.inputs.map(() => new Float64Array(m));
    rows = new Int32Array(m);
    const incomplete = new Uint8Array(m);
    for (let g = 0; g < m; g++) {
      const from = groups[g];
      const to = groups[g + 1];
      times[g] = starts[from];
      values[g] = combine(raw.values, from, to);
      raw.inputs.forEach((x, c) => (inputs[c][g] = combine(x.values, from, to)));
      rows[g] = raw.rows[from];
      if (target === base) continue;
      let observed = 0;
      for (let i = from; i < to; i++) if (raw.values[i] === raw.values[i]) observed++;
      const basePeriods = periodsBetween(periodStart(times[g], base), periodStart(stepTime(times[g], target, 1), base), base);
      const expected = Math.max(1, Math.floor(basePeriods / baseStep));
      if (observed < expected) {
        incomplete[g] = 1;
        partialPeriods.push({ time: formatTime(times[g], target), observed, expected, dropped: false });
      }
    }
    // Incomplete periods at either end are dropped, unless every period is incomplete.
    if ((options.partial ?? 'drop') === 'drop' && partialPeriods.length > 0 && partialPeriods.length < m) {
      let lo = 0;
      while (incomplete[lo]) lo++;
      let hi = m - 1;
      while (incomplete[hi]) hi--;
      const ends = lo + (m - 1 - hi);
      for (let p = 0; p < partialPeriods.length; p++) if (p < lo || p >= partialPeriods.length - (m - 1 - hi)) partialPeriods[p].dropped = true;
      if (ends > 0) {
        times = times.slice(lo, hi + 1);
        values = values.slice(lo, hi + 1);
        inputs = inputs.map((x) => x.slice(lo, hi + 1));
        rows = rows.slice(lo, hi + 1);
      }
    }
  }

  // 5: the grid of steps.
  const first = times[0];
  const last = times[times.length - 1];
  const span = Math.round(periodsBetween(first, last, target) / step) + 1;
  if (span > MAX_PERIODS) {
    throw new DataError('span-too-long', `series "${raw.name}" would span ${span} ${step === 1 ? periodName(target, 2) : 'steps'}`, {
      file: where.file,
      column: where.timeColumn,
      found: `${formatTime(first, target)} to ${formatTime(last, target)}`,
      expected: `at most ${MAX_PERIODS} periods; check for a stray date`,
    });
  }
  // Hours, days, weeks and index steps have a fixed length: plain arithmetic, no calendar.
  const fixed = FIXED_STEP[target];
  const unit = fixed !== undefined ? fixed * step : undefined;
  const indexOf = unit !== undefined ? (t: number) => Math.round((t - first) / unit) : (t: number) => Math.round(periodsBetween(first, t, target) / step);
  const timeAt = unit !== undefined ? (k: number) => first + k * unit : (k: number) => stepTime(first, target, k * step);
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
          filled.push({ time: formatTime(timeAt(k), target), column: col.name, value: col.values[k] });
        }
      } else refused.push({ column: col.name, gap });
    }
  }
  if (refused.length > 0) throw gapError(raw.name, refused, gridRows, timeAt, target, step, options.gaps, where);

  const length = hi - lo + 1;
  const seriesTimes = new Float64Array(length);
  for (let k = 0; k < length; k++) seriesTimes[k] = timeAt(lo + k);
  const seriesValues = gridValues.slice(lo, hi + 1);
  const series: Series = {
    name: raw.name,
    frequency: target,
    ...(step > 1 ? { step } : {}),
    season: options.season !== undefined ? options.season : seasonPeriod(target, step),
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

function checkTarget(base: Frequency, baseStep: number, target: Frequency, where: Where): void {
  if (target === base && baseStep === 1) return;
  if (base === 'index' || target === 'index') {
    if (target === base) return;
    throw new UsageError('freq-index', `--freq ${target} cannot apply to ${base === 'index' ? 'an integer index' : 'dated data'}`, {
      file: where.file,
      column: where.timeColumn,
      found: `--freq ${target}`,
      expected: base === 'index' ? 'no --freq for index data' : 'a calendar frequency',
    });
  }
  const coarser = FREQUENCIES.filter((f) => f !== 'index' && frequencyRank(f) > frequencyRank(base));
  if (frequencyRank(target) < frequencyRank(base) || (target === base && baseStep > 1)) {
    const data = cadenceName(base, baseStep);
    throw new UsageError('freq-finer', `--freq ${target} is finer than the data, which are ${data}`, {
      file: where.file,
      column: where.timeColumn,
      found: `--freq ${target}`,
      expected: `${data === base ? base : `the data's own ${base} steps`} or a coarser frequency`,
      hint:
        coarser.length > 0
          ? `certa aggregates to coarser frequencies only (it does not invent points between observations): drop --freq, or pass --freq ${coarser[0]}`
          : 'certa aggregates to coarser frequencies only (it does not invent points between observations): drop --freq',
    });
  }
}

function gapError(name: string, refused: { column: string; gap: Gap }[], gridRows: Int32Array, timeAt: (k: number) => number, f: Frequency, step: number, policyName: GapPolicyName, where: Where): DataError {
  const runText = (len: number): string => (step === 1 ? `${len} ${periodName(f, len)}` : `${len} step${len === 1 ? '' : 's'} of ${step} ${periodName(f, step)}`);
  const unitText = step === 1 ? periodName(f, 2) : `steps of ${step} ${periodName(f, step)}`;
  const describe = ({ column, gap }: { column: string; gap: Gap }): string => {
    const a = formatTime(timeAt(gap.start), f);
    const b = formatTime(timeAt(gap.start + gap.length - 1), f);
    const span = gap.length === 1 ? a : `${a} to ${b}`;
    return `${span} (${runText(gap.length)}${column !== where.valueColumn ? `, input "${column}"` : ''})`;
  };
  const shown = refused.slice(0, 8).map(describe).join(', ') + (refused.length > 8 ? `, and ${refused.length - 8} more` : '');
  const firstGap = refused[0];
  const after = gridRows[firstGap.gap.start + firstGap.gap.length];
  const missingWord = refused.length === 1 ? 'a gap' : `${refused.length} gaps`;
  const message =
    policyName === 'interpolate'
      ? `series "${name}" has ${missingWord} longer than ${MAX_INTERPOLATED_RUN} ${unitText}, which --gaps interpolate does not fill: ${shown}`
      : `series "${name}" has ${missingWord} of missing ${unitText}, refused by --gaps error: ${shown}`;
  return new DataError('gap-refused', message, {
    file: where.file,
    row: after > 0 ? after : undefined,
    column: firstGap.column,
    expected: policyName === 'interpolate' ? `runs of at most ${MAX_INTERPOLATED_RUN} missing ${unitText}` : 'no missing periods',
    hint:
      policyName === 'interpolate'
        ? 'fill them in the file, or pass --gaps carry (repeat the last value) or, for counts of events that did not occur, --gaps zero'
        : `fill them in the file, or pass --gaps interpolate (runs up to ${MAX_INTERPOLATED_RUN}), carry or zero`,
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
