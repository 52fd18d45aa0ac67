/**
 * Prediction intervals for a forecast simulated from an asserted structure.
 *
 * Two methods, chosen by what the structure is:
 *  - `analytic` — for a structure that is linear on the original scale (untransformed ARX, with
 *    or without differencing): the h-step forecast error is e_{n+h} = Σ_{j=0}^{h−1} ψ_j ε_{n+h−j}
 *    with ψ the impulse response of the fitted equation, so Var = σ̂² Σ_{j<h} ψ_j² and the
 *    interval is point ± z_{(1+L)/2}·√Var (Box & Jenkins 1970, §5.2; Gaussian errors assumed,
 *    parameters treated as known — certainty equivalence). ψ is obtained from the structure
 *    itself: for a linear structure, ψ_j is the difference between a simulation with a unit
 *    shock at the first step and one without.
 *  - `bootstrap` — for anything else (log transform, ODEs): `draws` seeded simulations, each
 *    adding shocks resampled with replacement from the centred in-sample one-step residuals
 *    (on the scoring scale), optionally with θ drawn from N(θ̂, Σ̂) to include parameter
 *    uncertainty; bounds are the empirical quantiles (Hyndman & Fan 1996, definition 7) of the
 *    simulated paths at each step (Efron & Tibshirani 1993, residual bootstrap).
 * The point forecast is always the noise-free simulation (the certainty-equivalent path). For a
 * log-transformed structure that path is the conditional median on the original scale, not the
 * mean.
 */
import type { Series } from '../data/series.js';
import type { Estimate, Structure } from '../models/structure.js';
import { createRng } from '../linalg/random.js';
import { normalQuantile } from './normal.js';
import type { Calibration, CalibrationOptions } from './calibrate.js';

/** How bands were made: from the asserted equation (`analytic`, `bootstrap`) or from measured errors (`calibrated`, calibrate.ts). */
export type IntervalMethod = 'analytic' | 'bootstrap' | 'calibrated';

/**
 * certa's default prediction interval levels, percent: a 50 % band (where the next values fall
 * half the time, the range to plan around) and a 90 % band (the range to prepare for). Accuracy
 * benchmarks that score other levels pass them explicitly (src/evaluate/m3.ts M3_LEVELS).
 */
export const DEFAULT_LEVELS: readonly number[] = [50, 90];

export interface IntervalOptions {
  /** Nominal coverage levels in percent, e.g. [80, 95]. */
  levels: number[];
  /** Force a method; by default analytic when the structure is linear, else bootstrap ('calibrated' is the pipeline's, calibrate.ts). */
  method?: IntervalMethod;
  /** Options of the calibrated method. */
  calibration?: CalibrationOptions;
  /** Number of bootstrap paths (default 1000). */
  draws?: number;
  /** Seed of the bootstrap's random source (default 1). */
  seed?: number;
  /** Draw θ from its estimated covariance in each bootstrap path (default false). */
  parameterUncertainty?: boolean;
}

export interface Band {
  level: number;
  lower: Float64Array;
  upper: Float64Array;
}

export interface ForecastPaths {
  point: Float64Array;
  bands: Band[];
  method: IntervalMethod;
  /** Standard deviation of the h-step error per step (analytic method only). */
  sd?: Float64Array;
  /** The measured error spread the bands come from (calibrated method only). */
  calibration?: Calibration;
}

/** True when a structure's forecast error is linear in its shocks on the original scale. */
export function isLinearStructure(s: Structure): boolean {
  return s.family === 'arx' && s.transform === 'none';
}

/**
 * Point forecast and interval bands over h steps after the end of `history`.
 * `residuals` are the in-sample one-step residuals on the scoring scale (for the bootstrap).
 */
export function forecastWithIntervals(
  structure: Structure,
  estimate: Pick<Estimate, 'theta' | 'cov' | 'sigma2' | 'active'>,
  history: Series,
  future: Float64Array[],
  h: number,
  residuals: ArrayLike<number>,
  options: IntervalOptions,
): ForecastPaths {
  const point = structure.simulate(estimate.theta, history, future, h);
  const method = options.method === undefined || options.method === 'calibrated' ? (isLinearStructure(structure) ? 'analytic' : 'bootstrap') : options.method;
  if (method === 'analytic') return analytic(structure, estimate, history, future, h, point, options.levels);
  return bootstrap(structure, estimate, history, future, h, point, residuals, options);
}

function analytic(
  structure: Structure,
  estimate: Pick<Estimate, 'theta' | 'sigma2'>,
  history: Series,
  future: Float64Array[],
  h: number,
  point: Float64Array,
  levels: number[],
): ForecastPaths {
  const unit = new Float64Array(h);
  unit[0] = 1;
  const shocked = structure.simulate(estimate.theta, history, future, h, unit);
  const sd = new Float64Array(h);
  let acc = 0;
  for (let j = 0; j < h; j++) {
    const psi = shocked[j] - point[j];
    acc += psi * psi;
    sd[j] = Math.sqrt(estimate.sigma2 * acc);
  }
  const bands = levels.map((level) => {
    const z = normalQuantile(0.5 + level / 200);
    const lower = new Float64Array(h);
    const upper = new Float64Array(h);
    for (let j = 0; j < h; j++) {
      lower[j] = point[j] - z * sd[j];
      upper[j] = point[j] + z * sd[j];
    }
    return { level, lower, upper };
  });
  return { point, bands, method: 'analytic', sd };
}

function bootstrap(
  structure: Structure,
  estimate: Pick<Estimate, 'theta' | 'cov' | 'active'>,
  history: Series,
  future: Float64Array[],
  h: number,
  point: Float64Array,
  residuals: ArrayLike<number>,
  options: IntervalOptions,
): ForecastPaths {
  const draws = options.draws ?? 1000;
  const rng = createRng(options.seed ?? 1);
  const m = residuals.length;
  let mean = 0;
  for (let i = 0; i < m; i++) mean += residuals[i];
  mean = m > 0 ? mean / m : 0;
  const centred = Float64Array.from({ length: m }, (_, i) => residuals[i] - mean);
  const drawTheta = options.parameterUncertainty ? thetaSampler(estimate, rng) : null;
  const paths: Float64Array[] = Array.from({ length: h }, () => new Float64Array(draws));
  const shocks = new Float64Array(h);
  let kept = 0;
  for (let d = 0; d < draws; d++) {
    for (let j = 0; j < h; j++) shocks[j] = m > 0 ? centred[rng.int(m)] : 0;
    const theta = drawTheta ? drawTheta() : estimate.theta;
    const path = structure.simulate(theta, history, future, h, shocks);
    let finite = true;
    for (let j = 0; j < h; j++) if (!Number.isFinite(path[j])) finite = false;
    if (!finite) continue;
    for (let j = 0; j < h; j++) paths[j][kept] = path[j];
    kept++;
  }
  const bands = options.levels.map((level) => {
    const lower = new Float64Array(h);
    const upper = new Float64Array(h);
    const a = (1 - level / 100) / 2;
    for (let j = 0; j < h; j++) {
      const sorted = paths[j].subarray(0, kept).slice().sort();
      lower[j] = quantileSorted(sorted, a);
      upper[j] = quantileSorted(sorted, 1 - a);
    }
    return { level, lower, upper };
  });
  return { point, bands, method: 'bootstrap' };
}

/**
 * Empirical quantile of sorted data, Hyndman & Fan (1996) definition 7 (linear interpolation
 * between order statistics at position (n − 1)p): the default of most statistics software.
 */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const pos = (n - 1) * p;
  const lo = Math.floor(pos);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (pos - lo) * (sorted[hi] - sorted[lo]);
}

/** Draws θ ~ N(θ̂, Σ̂) on the active terms by a Cholesky factor of Σ̂ (inactive terms stay 0). */
function thetaSampler(estimate: Pick<Estimate, 'theta' | 'cov' | 'active'>, rng: ReturnType<typeof createRng>): () => Float64Array {
  const p = estimate.theta.length;
  const idx = estimate.active.map((a, i) => (a ? i : -1)).filter((i) => i >= 0);
  const k = idx.length;
  const L = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j <= i; j++) {
      let s = estimate.cov[idx[i] * p + idx[j]];
      for (let r = 0; r < j; r++) s -= L[i * k + r] * L[j * k + r];
      if (i === j) L[i * k + i] = Math.sqrt(Math.max(s, 0));
      else L[i * k + j] = L[j * k + j] > 0 ? s / L[j * k + j] : 0;
    }
  }
  const z = new Float64Array(k);
  return () => {
    for (let i = 0; i < k; i++) z[i] = rng.normal();
    const theta = Float64Array.from(estimate.theta);
    for (let i = 0; i < k; i++) {
      let s = 0;
      for (let j = 0; j <= i; j++) s += L[i * k + j] * z[j];
      theta[idx[i]] += s;
    }
    return theta;
  };
}
