/**
 * Forecast accuracy metrics: point errors (MAE, RMSE, MAPE, sMAPE, MASE, mean error) and
 * interval quality (coverage, interval score).
 *
 * Conventions shared by every function here:
 * - `actual[i]` and `forecast[i]` (and `lower[i]`, `upper[i]`) refer to the same time point;
 *   arrays of different lengths are a caller bug and throw a `RangeError`.
 * - The error is e_i = actual_i − forecast_i (observation minus forecast).
 * - No value is skipped silently: a NaN anywhere in the inputs makes the result NaN. The only
 *   exclusions are the documented zero denominators of MAPE and sMAPE, which are counted and
 *   returned so callers can warn.
 * - An empty input gives NaN (a mean over no points).
 *
 * Cost: one pass, O(n), no allocation beyond the result.
 */

/** A metric whose formula divides by something that can be zero: value and excluded count. */
export interface ExcludingMetric {
  /** Mean over the points that were kept; NaN when none was kept. */
  value: number;
  /** How many points were left out because their denominator was zero. */
  excluded: number;
}

function checkSameLength(a: ArrayLike<number>, b: ArrayLike<number>, what: string): void {
  if (a.length !== b.length) {
    throw new RangeError(`${what}: lengths differ (${a.length} actual values, ${b.length} other values); pass aligned arrays`);
  }
}

/**
 * Mean absolute error, MAE = (1/n) Σ |X_i − F_i|.
 *
 * Source: Hyndman & Koehler, "Another look at measures of forecast accuracy", International
 * Journal of Forecasting 22 (2006) (scale-dependent measures).
 * @example mae([1, 2, 3], [2, 2, 5]) === 1   // (1 + 0 + 2) / 3
 */
export function mae(actual: ArrayLike<number>, forecast: ArrayLike<number>): number {
  checkSameLength(actual, forecast, 'mae');
  const n = actual.length;
  let sum = 0;
  for (let i = 0; i < n; i++) sum += Math.abs(actual[i] - forecast[i]);
  return sum / n;
}

/**
 * Root mean squared error, RMSE = sqrt((1/n) Σ (X_i − F_i)²).
 *
 * Source: Hyndman & Koehler (2006) (scale-dependent measures).
 * @example rmse([1, 2, 3], [2, 2, 5]) === Math.sqrt(5 / 3)   // (1 + 0 + 4) / 3
 */
export function rmse(actual: ArrayLike<number>, forecast: ArrayLike<number>): number {
  checkSameLength(actual, forecast, 'rmse');
  const n = actual.length;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const e = actual[i] - forecast[i];
    sum += e * e;
  }
  return Math.sqrt(sum / n);
}

/**
 * Mean error (bias), ME = (1/n) Σ (X_i − F_i), sign convention actual − forecast:
 * a positive value means the forecasts were on average too low (under-forecasting), a negative
 * value too high.
 *
 * Source: Hyndman & Koehler (2006) (forecast error e_t = Y_t − F_t).
 * @example meanError([3, 5], [1, 6]) === 0.5   // (2 + (−1)) / 2
 */
export function meanError(actual: ArrayLike<number>, forecast: ArrayLike<number>): number {
  checkSameLength(actual, forecast, 'meanError');
  const n = actual.length;
  let sum = 0;
  for (let i = 0; i < n; i++) sum += actual[i] - forecast[i];
  return sum / n;
}

/**
 * Mean absolute percentage error, in percent: MAPE = (100/n') Σ_{X_i ≠ 0} |(X_i − F_i) / X_i|,
 * where the sum and the count n' run over the points whose actual is not zero. Points with
 * X_i = 0 are excluded and counted in `excluded`.
 *
 * Source: Hyndman & Koehler (2006) (percentage errors p_t = 100 e_t / Y_t; undefined for Y_t = 0).
 * @example mape([100, 0, 50], [110, 3, 40]) → { value: ≈15, excluded: 1 }   // (10 % + 20 %) / 2
 */
export function mape(actual: ArrayLike<number>, forecast: ArrayLike<number>): ExcludingMetric {
  checkSameLength(actual, forecast, 'mape');
  let sum = 0;
  let kept = 0;
  let excluded = 0;
  for (let i = 0; i < actual.length; i++) {
    const x = actual[i];
    if (x === 0) {
      excluded++;
      continue;
    }
    sum += Math.abs((x - forecast[i]) / x);
    kept++;
  }
  return { value: kept === 0 ? Number.NaN : (100 * sum) / kept, excluded };
}

/**
 * Symmetric MAPE as used in the M3 competition, in percent (range 0–200 for positive data):
 * sMAPE = (1/n') Σ 200 · |X_i − F_i| / (X_i + F_i).
 *
 * The denominator is the plain sum X + F (not |X| + |F| and not halved, the 200 carries the ½).
 * Points with X_i + F_i = 0 are excluded and counted in `excluded` — this includes a perfect
 * forecast of a zero actual (X = F = 0), which is therefore left out rather than scored 0.
 * With negative data the denominator can be negative and the term negative; this is the
 * published M3 formula, meant for positive series.
 *
 * Source: Makridakis & Hibon, "The M3-Competition: results, conclusions and implications",
 * International Journal of Forecasting 16 (2000) (the symmetric MAPE of the competition).
 * @example smape([100, 50], [110, 40]) → { value: (2000/210 + 2000/90) / 2, excluded: 0 }
 */
export function smape(actual: ArrayLike<number>, forecast: ArrayLike<number>): ExcludingMetric {
  checkSameLength(actual, forecast, 'smape');
  let sum = 0;
  let kept = 0;
  let excluded = 0;
  for (let i = 0; i < actual.length; i++) {
    const x = actual[i];
    const f = forecast[i];
    const denominator = x + f;
    if (denominator === 0) {
      excluded++;
      continue;
    }
    sum += (200 * Math.abs(x - f)) / denominator;
    kept++;
  }
  return { value: kept === 0 ? Number.NaN : sum / kept, excluded };
}

/**
 * The MASE scale: in-sample mean absolute error of the seasonal naive forecast on the training
 * series, Q = (1/(n − m)) Σ_{t=m+1}^{n} |y_t − y_{t−m}| (m = 1: the one-step naive forecast).
 *
 * Returns NaN when the training series has n ≤ m points (no in-sample forecast exists).
 * Source: Hyndman & Koehler (2006), scaled errors q_t (non-seasonal, m = 1); the
 * seasonal form with period m: Hyndman & Athanasopoulos, "Forecasting: principles and
 * practice", 3rd ed. (2021), chapter 5 (evaluating point forecast accuracy, scaled errors).
 * @example maseScale([1, 3, 2, 5], 1) === 2   // (|3−1| + |2−3| + |5−2|) / 3 = 6 / 3
 */
export function maseScale(train: ArrayLike<number>, m: number): number {
  if (!Number.isInteger(m) || m < 1) throw new RangeError(`maseScale: season m must be an integer ≥ 1, got ${m}`);
  const n = train.length;
  if (n <= m) return Number.NaN;
  let sum = 0;
  for (let t = m; t < n; t++) sum += Math.abs(train[t] - train[t - m]);
  return sum / (n - m);
}

/**
 * Mean absolute scaled error, MASE = mean_i |X_i − F_i| / Q, with Q the in-sample mean absolute
 * error of the seasonal naive forecast of period m on the training series (see `maseScale`;
 * m = 1 for a non-seasonal series).
 *
 * When Q = 0 (a training series that the seasonal naive forecast fits exactly) the result is
 * +Infinity, or NaN when the out-of-sample errors are all zero too; NaN also when the training
 * series is too short (n ≤ m).
 * Source: Hyndman & Koehler (2006) (scaled errors); seasonal scale as in Hyndman &
 * Athanasopoulos (2021), chapter 5.
 * @example mase([6, 4], [5, 5], [1, 3, 2, 5], 1) === 0.5   // MAE 1 / scale 2
 */
export function mase(actual: ArrayLike<number>, forecast: ArrayLike<number>, train: ArrayLike<number>, m = 1): number {
  return mae(actual, forecast) / maseScale(train, m);
}

/**
 * Empirical coverage of prediction intervals: the share of actuals with l_i ≤ X_i ≤ u_i
 * (bounds inclusive), a number in [0, 1].
 *
 * A NaN actual or bound makes the result NaN.
 * Source: the usual definition of empirical coverage, e.g. Gneiting & Raftery, "Strictly proper
 * scoring rules, prediction, and estimation", JASA 102 (2007) (interval forecasts).
 * @example intervalCoverage([1, 5, 9], [0, 0, 0], [4, 6, 8]) === 2 / 3
 */
export function intervalCoverage(actual: ArrayLike<number>, lower: ArrayLike<number>, upper: ArrayLike<number>): number {
  checkSameLength(actual, lower, 'intervalCoverage');
  checkSameLength(actual, upper, 'intervalCoverage');
  const n = actual.length;
  let inside = 0;
  for (let i = 0; i < n; i++) {
    const x = actual[i];
    const l = lower[i];
    const u = upper[i];
    if (Number.isNaN(x) || Number.isNaN(l) || Number.isNaN(u)) return Number.NaN;
    if (x >= l && x <= u) inside++;
  }
  return inside / n;
}

/**
 * Interval score of central (1 − α) prediction intervals, averaged over points (lower is better):
 * S_α(l, u; x) = (u − l) + (2/α)(l − x)·1{x < l} + (2/α)(x − u)·1{x > u}.
 *
 * `alpha` is the nominal non-coverage: 0.05 for 95 % intervals, 0.2 for 80 %.
 * Source: Gneiting & Raftery (2007), eq. (43) (the score there is positively
 * oriented, S = −(this); here it is reported as a loss, the form used in forecasting practice).
A NaN actual or bound makes the result NaN.
 * @example intervalScore([5], [0], [4], 0.2) === 4 + 10 * 1   // width 4, miss by 1, 2/α = 10
 */
export function intervalScore(actual: ArrayLike<number>, lower: ArrayLike<number>, upper: ArrayLike<number>, alpha: number): number {
  checkSameLength(actual, lower, 'intervalScore');
  checkSameLength(actual, upper, 'intervalScore');
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`intervalScore: alpha must lie in (0, 1), got ${alpha}`);
  const n = actual.length;
  const penalty = 2 / alpha;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const x = actual[i];
    const l = lower[i];
    const u = upper[i];
    if (Number.isNaN(x)) return Number.NaN;
    let s = u - l;
    if (x < l) s += penalty * (l - x);
    else if (x > u) s += penalty * (x - u);
    sum += s;
  }
  return sum / n;
}

/** Optional prediction intervals for `metricTable`. */
export interface MetricIntervals {
  lower: ArrayLike<number>;
  upper: ArrayLike<number>;
  /** Nominal non-coverage α of the intervals (0.05 for 95 %). */
  alpha: number;
}

export interface MetricTableOptions {
  /** Training series, for the MASE scale. Without it `mase` is NaN. */
  train?: ArrayLike<number>;
  /** Season m of the MASE scale; null or undefined means 1 (non-seasonal). */
  season?: number | null;
  intervals?: MetricIntervals;
}

/** All metrics of one forecast, as `metricTable` returns them. Percentages are in percent. */
export interface MetricTable {
  n: number;
  mae: number;
  rmse: number;
  mape: number;
  /** Points left out of MAPE because the actual was zero. */
  mapeExcluded: number;
  smape: number;
  /** Points left out of sMAPE because actual + forecast was zero. */
  smapeExcluded: number;
  mase: number;
  /** Mean error, actual − forecast (positive: forecasts too low). */
  meanError: number;
  /** Share of actuals inside the intervals, null when no intervals were given. */
  coverage: number | null;
  /** Mean interval score, null when no intervals were given. */
  intervalScore: number | null;
  /** Nominal coverage 1 − α of the intervals scored, null when none were given. */
  nominalCoverage: number | null;
}

/** Every metric of this module at once, on one forecast; see each function for its variant. */
export function metricTable(actual: ArrayLike<number>, forecast: ArrayLike<number>, options: MetricTableOptions = {}): MetricTable {
  checkSameLength(actual, forecast, 'metricTable');
  const m = options.season ?? 1;
  const p = mape(actual, forecast);
  const s = smape(actual, forecast);
  const iv = options.intervals;
  return {
    n: actual.length,
    mae: mae(actual, forecast),
    rmse: rmse(actual, forecast),
    mape: p.value,
    mapeExcluded: p.excluded,
    smape: s.value,
    smapeExcluded: s.excluded,
    mase: options.train === undefined ? Number.NaN : mase(actual, forecast, options.train, m),
    meanError: meanError(actual, forecast),
    coverage: iv === undefined ? null : intervalCoverage(actual, iv.lower, iv.upper),
    intervalScore: iv === undefined ? null : intervalScore(actual, iv.lower, iv.upper, iv.alpha),
    nominalCoverage: iv === undefined ? null : 1 - iv.alpha,
  };
}
