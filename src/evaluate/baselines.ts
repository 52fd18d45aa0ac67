/**
 * Baseline point forecasts: the yardsticks every fitted model is compared against.
 *
 * All baselines share one signature, `(train, h, season) → forecast`, so the evaluation can run
 * any member of `BASELINES` by name. `train` is the training series (oldest first, no NaN once
 * regularised), `h` the horizon (forecast length, an integer ≥ 0), `season` the season length m
 * in periods or null. Forecast index k − 1 holds the forecast of y_{n+k}.
 *
 * Errors: an empty training series (or one shorter than a season for seasonal naive) is a
 * `ModelError`; a horizon that is not a non-negative integer is a caller bug (`RangeError`).
 */
import { ModelError, UsageError } from '../data/errors.js';
import { sampleAutocorrelations } from './autocorrelation.js';

/** The shared shape of every baseline. */
export type Baseline = (train: Float64Array, h: number, season: number | null) => Float64Array;

function checkInputs(name: string, train: Float64Array, h: number, needed = 1): void {
  if (!Number.isInteger(h) || h < 0) throw new RangeError(`${name}: horizon must be an integer ≥ 0, got ${h}`);
  if (train.length < needed) {
    throw new ModelError('series-too-short', `${name} needs at least ${needed} training value${needed === 1 ? '' : 's'}`, {
      found: `${train.length} value${train.length === 1 ? '' : 's'}`,
      expected: `at least ${needed}`,
      hint: 'use a longer training window or a shorter holdout',
    });
  }
}

/**
 * The last-value baseline (the naive forecast): every horizon repeats the last observation,
 * ŷ_{n+k} = y_n.
 *
 * Source: Hyndman & Athanasopoulos, "Forecasting: principles and practice", 3rd ed. (2021),
 * chapter 5 (simple forecasting methods: naïve).
 * @example lastValue([3, 5, 4], 2, null) → [4, 4]
 */
export const lastValue: Baseline = (train, h) => {
  checkInputs('last-value', train, h);
  return new Float64Array(h).fill(train[train.length - 1]);
};

/**
 * The last-season baseline (the seasonal naive forecast): each horizon repeats the observation one season earlier, the last
 * season repeated as often as needed: ŷ_{n+k} = y_{n+k−m(⌊(k−1)/m⌋+1)}.
 *
 * With `season` null or 1 this is the last-value baseline. Needs n ≥ m training values.
 * Source: Hyndman & Athanasopoulos (2021), chapter 5 (simple forecasting methods: seasonal naïve).
 * @example lastSeason([1, 2, 3, 4, 5, 6], 5, 4) → [3, 4, 5, 6, 3]
 */
export const lastSeason: Baseline = (train, h, season) => {
  const m = season ?? 1;
  if (!Number.isInteger(m) || m < 1) throw new RangeError(`lastSeason: season must be an integer ≥ 1 or null, got ${season}`);
  checkInputs('last-season', train, h, m);
  const n = train.length;
  const out = new Float64Array(h);
  for (let k = 1; k <= h; k++) out[k - 1] = train[n - m + ((k - 1) % m)];
  return out;
};

/**
 * The average-change baseline (the drift forecast): the line through the first and last observations, extended:
 * ŷ_{n+k} = y_n + k · (y_n − y_1) / (n − 1).
 *
 * With a single training value the slope is undefined and taken as zero (the last value).
 * `season` is ignored. Source: Hyndman & Athanasopoulos (2021), chapter 5 (simple forecasting methods: drift).
 * @example averageChange([2, 4, 8], 2, null) → [11, 14]   // slope (8 − 2)/2 = 3
 */
export const averageChange: Baseline = (train, h) => {
  checkInputs('average-change', train, h);
  const n = train.length;
  const last = train[n - 1];
  const slope = n > 1 ? (last - train[0]) / (n - 1) : 0;
  const out = new Float64Array(h);
  for (let k = 1; k <= h; k++) out[k - 1] = last + k * slope;
  return out;
};

/** Outcome of the seasonality test used by Naive2. */
export interface SeasonalityTest {
  /** Season length m tested. */
  season: number;
  /** r_m, the lag-m sample autocorrelation. */
  acfAtSeason: number;
  /** 1.645 · sqrt((1 + 2 Σ_{k=1}^{m−1} r_k²) / n). */
  threshold: number;
  /** |r_m| > threshold. */
  seasonal: boolean;
}

/**
 * Seasonality test at the 90 % level (two-sided): the series is called seasonal when
 *   |r_m| > 1.645 · sqrt((1 + 2 Σ_{k=1}^{m−1} r_k²) / n),
 * with r_k the sample autocorrelations (`sampleAutocorrelations`) and n the series length.
 * The square root is Bartlett's approximate standard error of r_m under the hypothesis that
 * autocorrelations beyond lag m − 1 are zero; 1.645 is the 0.95 quantile of the standard normal.
 * A NaN autocorrelation (constant series) tests not seasonal. Needs m ≥ 2 and n > m.
 *
 * Sources: the test as applied before Naive2 in the M3 competition, Makridakis & Hibon,
 * "The M3-Competition: results, conclusions and implications", IJF 16 (2000) (a 90 %
 * autocorrelation test); Bartlett's approximation to the variance of r_k: Box, Jenkins,
 * Reinsel & Ljung, "Time Series Analysis: Forecasting and Control", 5th ed. (2015), chapter 2.
 */
export function seasonalityTest(train: ArrayLike<number>, m: number): SeasonalityTest {
  if (!Number.isInteger(m) || m < 2) throw new RangeError(`seasonalityTest: season must be an integer ≥ 2, got ${m}`);
  const n = train.length;
  if (n <= m) throw new RangeError(`seasonalityTest: needs more than m = ${m} values, got ${n}`);
  const r = sampleAutocorrelations(train, m);
  let sumSq = 0;
  for (let k = 1; k < m; k++) sumSq += r[k - 1] * r[k - 1];
  const threshold = 1.645 * Math.sqrt((1 + 2 * sumSq) / n);
  const acfAtSeason = r[m - 1];
  return { season: m, acfAtSeason, threshold, seasonal: Math.abs(acfAtSeason) > threshold };
}

/**
 * Centred moving average of order m, the trend-cycle estimate of classical decomposition.
 * Odd m = 2k + 1: T_t = (1/m) Σ_{j=−k}^{k} y_{t+j}.
 * Even m = 2k (the "2×m-MA"): T_t = (1/m) [½ y_{t−k} + Σ_{j=−k+1}^{k−1} y_{t+j} + ½ y_{t+k}].
 * Positions within k of either end have no centred window and hold NaN.
 *
 * Source: Hyndman & Athanasopoulos (2021), chapter 3 (moving averages of moving averages;
 * classical decomposition).
 * @example centredMovingAverage([1, 2, 3, 4, 5], 2) → [NaN, 2, 3, 4, NaN]   // (½·1 + 2 + ½·3)/2
 */
export function centredMovingAverage(y: ArrayLike<number>, m: number): Float64Array {
  if (!Number.isInteger(m) || m < 1) throw new RangeError(`centredMovingAverage: order must be an integer ≥ 1, got ${m}`);
  const n = y.length;
  const out = new Float64Array(n).fill(Number.NaN);
  const k = Math.floor(m / 2);
  for (let t = k; t < n - k; t++) {
    let s = 0;
    if (m % 2 === 1) {
      for (let j = -k; j <= k; j++) s += y[t + j];
    } else {
      s = 0.5 * y[t - k] + 0.5 * y[t + k];
      for (let j = -k + 1; j <= k - 1; j++) s += y[t + j];
    }
    out[t] = s / m;
  }
  return out;
}

/**
 * Seasonal indices of classical multiplicative decomposition, one per position p = 0 … m − 1
 * (position of a value = its 0-based index in `y` modulo m, so p = 0 is the season of y's first
 * value).
 * Steps: T = centred moving average of order m (2×m for even m); ratios y_t / T_t where T_t
 * exists; raw index of p = arithmetic mean of the ratios at positions ≡ p (mod m); indices
 * normalised to average exactly 1: I_p = raw_p · m / Σ_q raw_q.
 * Needs n ≥ 2m (so every position has at least one ratio) and positive values.
 *
 * Source: Hyndman & Athanasopoulos (2021), chapter 3 (classical multiplicative decomposition);
 * Makridakis, Wheelwright & Hyndman, "Forecasting: Methods and Applications", 3rd ed. (1998),
 * chapter 3 (ratio-to-moving-average method).
 */
export function classicalMultiplicativeIndices(y: ArrayLike<number>, m: number): Float64Array {
  if (!Number.isInteger(m) || m < 2) throw new RangeError(`classicalMultiplicativeIndices: season must be an integer ≥ 2, got ${m}`);
  if (y.length < 2 * m) throw new RangeError(`classicalMultiplicativeIndices: needs at least 2m = ${2 * m} values, got ${y.length}`);
  const trend = centredMovingAverage(y, m);
  const sums = new Float64Array(m);
  const counts = new Float64Array(m);
  for (let t = 0; t < y.length; t++) {
    if (Number.isNaN(trend[t])) continue;
    sums[t % m] += y[t] / trend[t];
    counts[t % m]++;
  }
  const raw = new Float64Array(m);
  let total = 0;
  for (let p = 0; p < m; p++) {
    raw[p] = sums[p] / counts[p];
    total += raw[p];
  }
  for (let p = 0; p < m; p++) raw[p] = (raw[p] * m) / total;
  return raw;
}

/** Why Naive2 did or did not seasonally adjust. */
export type Naive2Adjustment =
  | 'adjusted'
  | 'no-season' // season null or < 2
  | 'too-short' // fewer than 2m training values
  | 'non-positive' // a value ≤ 0: multiplicative decomposition undefined
  | 'not-seasonal'; // the 90 % autocorrelation test did not reject

/** Naive2 forecast with what it decided, for reports. */
export interface Naive2Result {
  forecast: Float64Array;
  adjustment: Naive2Adjustment;
  /** The seasonality test, when it was run. */
  test: SeasonalityTest | null;
  /** Seasonal indices by position (see `classicalMultiplicativeIndices`) when adjusted. */
  indices: Float64Array | null;
}

/**
 * Naive2 with its decisions (see `naive2`).
 */
export function naive2Details(train: Float64Array, h: number, season: number | null): Naive2Result {
  checkInputs('naive2', train, h);
  const n = train.length;
  const plain = (adjustment: Naive2Adjustment, test: SeasonalityTest | null): Naive2Result => ({
    forecast: new Float64Array(h).fill(train[n - 1]),
    adjustment,
    test,
    indices: null,
  });
  if (season === null || season < 2) return plain('no-season', null);
  const m = season;
  if (!Number.isInteger(m)) throw new RangeError(`naive2: season must be an integer or null, got ${season}`);
  if (n < 2 * m) return plain('too-short', null);
  for (let t = 0; t < n; t++) if (!(train[t] > 0)) return plain('non-positive', null);
  const test = seasonalityTest(train, m);
  if (!test.seasonal) return plain('not-seasonal', test);
  const indices = classicalMultiplicativeIndices(train, m);
  const lastAdjusted = train[n - 1] / indices[(n - 1) % m];
  const forecast = new Float64Array(h);
  for (let k = 1; k <= h; k++) forecast[k - 1] = lastAdjusted * indices[(n - 1 + k) % m];
  return { forecast, adjustment: 'adjusted', test, indices };
}

/**
 * Naive2: the naive forecast of the seasonally adjusted series, reseasonalised.
 * Variant (M3 competition benchmark):
 * 1. If m = `season` ≥ 2, n ≥ 2m, every value is positive, and the 90 % autocorrelation test at
 *    lag m calls the series seasonal (`seasonalityTest`), compute classical multiplicative
 *    seasonal indices I_p (`classicalMultiplicativeIndices`: centred MA of order m, 2×m for even
 *    m; mean ratio per position; normalised to average 1).
 * 2. Forecast ŷ_{n+k} = (y_n / I_{pos(n)}) · I_{pos(n+k)}, the last adjusted value carried
 *    forward and multiplied back by the index of the target's season.
 * 3. Otherwise ŷ_{n+k} = y_n (plain naive). `naive2Details` says which case applied.
 *
 * Source: Makridakis & Hibon (2000) (the Naive2 benchmark); decomposition as in Hyndman &
 * Athanasopoulos (2021), chapter 3.
 */
export const naive2: Baseline = (train, h, season) => naive2Details(train, h, season).forecast;

/**
 * Every baseline by the name users and reports give it: certa's own plain names for the three
 * simple yardsticks (what each one carries forward), and Naive2 under its published name.
 */
export const BASELINES = {
  'last-value': lastValue,
  'last-season': lastSeason,
  'average-change': averageChange,
  naive2,
} as const satisfies Record<string, Baseline>;

export type BaselineName = keyof typeof BASELINES;

/** Names of all baselines, in a fixed order. */
export const BASELINE_NAMES: readonly BaselineName[] = ['last-value', 'last-season', 'average-change', 'naive2'];

/** The baseline of that name; a `UsageError` listing the names when there is none. */
export function baselineByName(name: string): Baseline {
  if (Object.prototype.hasOwnProperty.call(BASELINES, name)) return BASELINES[name as BaselineName];
  throw new UsageError('unknown-baseline', `unknown baseline "${name}"`, {
    found: name,
    expected: `one of ${BASELINE_NAMES.join(', ')}`,
  });
}
