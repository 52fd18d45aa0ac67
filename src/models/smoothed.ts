/**
 * The smoothed-level family: the series carried on from an exponentially smoothed level rather
 * than from its last value. With z_t = g(y_t) the scoring-scale target (transforms.ts),
 *
 *   Δz_t = c + Σ_{k=1}^{K} (a_k sin(2πkt/s) + b_k cos(2πkt/s)) + e_t − β·e_{t−1},   β = 1 − α,
 *
 * the change with a moving-average term of fixed coefficient β (Box, Jenkins, Reinsel & Ljung,
 * "Time Series Analysis", 5th ed., 2015, §4.3.1: the IMA(1,1) process; with a constant, ARIMA
 * (0,1,1) with drift). Written with the level ℓ_t = z_t − β·e_t it is simple exponential
 * smoothing with a drift and a periodic mean of the change:
 *
 *   ẑ_{t|t−1} = ℓ_{t−1} + d_t,   ℓ_t = ℓ_{t−1} + d_t + α·e_t,   d_t = c + harmonics at t,
 *
 * the forecast that is optimal when the series is a random walk observed with noise (Muth,
 * "Optimal properties of exponentially weighted forecasts", JASA 55, 1960; Gardner,
 * "Exponential smoothing: the state of the art", J. Forecasting 4, 1985). A noisy series is
 * carried on from a level that weighs the last observations by α, α(1 − α), α(1 − α)², …
 * instead of from its last value, which the change family (damped.ts) carries on. On the log
 * scale the harmonics make a multiplicative seasonal pattern; with K = ⌊s/2⌋ they span every
 * periodic pattern (terms.ts).
 *
 * Regression form. β is fixed by the spec (α on a grid of candidates, `SMOOTHING_WEIGHTS`), so
 * the structure is linear in θ = (c, a, b): with the filter (1 − βB)⁻¹ applied to the changes
 * and to the regressors,
 *
 *   w_t = Δz_t + β·w_{t−1},   x̃_t = x_t + β·x̃_{t−1},   w_t = x̃_tᵀθ + e_t,
 *
 * started at the first change of the series (t = 1) with w_0 = x̃_0 = 0, least squares on
 * (w, x̃) minimises the conditional sum of squares of the e_t given e_0 = 0 (Box et al. 2015,
 * §7.1.2). The rows of any range [from, to) come from that one filter, so rows learnt one at a
 * time (online.ts) are the rows of a batch fit; a series that is a later window of a longer one
 * restarts the filter at the window's start, a transient that fades as β^t.
 *
 * Term names: `const`, `sin(2π·1·t/12)` …; the equation reads
 * `Δln y[t] = 0.004·… + e[t] − 0.6·e[t-1]`. Inputs are not used. Time t counts from the first
 * observation ever seen (terms.ts), so harmonics continue across stored windows.
 */
import type { Series } from '../data/series.js';
import { ModelError } from '../data/errors.js';
import { lstsq } from '../linalg/lstsq.js';
import type { DesignMatrix } from '../linalg/matrix.js';
import type { Derived, Estimate, Regression, Structure, StructureSpec, Transform } from './structure.js';
import { forward, inverse, isStrictlyPositive, transformedName } from './transforms.js';
import { checkChangeTerms, deterministicCombination, deterministicFiller, deterministicNames, specFieldError, type ChangeTerms, type DeterministicTerms } from './terms.js';
import { formatCoefficient, linearEquation } from './equation.js';
import type { CandidateBounds, FamilyDefinition } from './registry.js';

/**
 * The smoothing weights α the search tries, one candidate each (the within-group Akaike weights
 * then average over them): from a long memory (α = 0.2, the level's weights halve in about three
 * periods) to a short one (α = 0.8). α = 1 is the random walk of the change family. A finer grid
 * (0.2, 0.4, 0.6, 0.8 or 0.1 … 0.9) scored the same on the accuracy benchmark at more cost.
 */
export const SMOOTHING_WEIGHTS: readonly number[] = [0.2, 0.5, 0.8];

export interface SmoothedSpec extends StructureSpec, ChangeTerms {
  family: 'smoothed';
  /** Smoothing weight α ∈ (0, 1): the share of each one-step surprise the level takes in (β = 1 − α). */
  alpha: number;
  transform: Transform;
}

/** Checks a spec (from the grid or a saved file); UsageError naming the bad field. */
export function validateSmoothedSpec(spec: StructureSpec): SmoothedSpec {
  const s = spec as Partial<SmoothedSpec>;
  const bad = specFieldError(spec, 'bad-smoothed-spec', 'smoothed-level');
  if (s.family !== 'smoothed') bad('family', '"smoothed"');
  if (typeof s.alpha !== 'number' || !(s.alpha > 0 && s.alpha < 1)) bad('alpha', 'a number strictly between 0 and 1');
  if (s.transform !== 'none' && s.transform !== 'log') bad('transform', 'none or log');
  const out: SmoothedSpec = { family: 'smoothed', alpha: s.alpha as number, transform: s.transform as Transform };
  checkChangeTerms(s, bad, out);
  return out;
}

export class SmoothedStructure implements Structure {
  readonly family = 'smoothed';
  readonly spec: SmoothedSpec;
  readonly key: string;
  readonly label: string;
  readonly terms: string[];
  readonly history = 1;
  readonly transform: Transform;
  /** The moving-average coefficient β = 1 − α. */
  readonly beta: number;
  private readonly deterministic: DeterministicTerms;
  private readonly fill: (t: number, out: Float64Array, offset: number) => number;

  constructor(specIn: StructureSpec) {
    const spec = validateSmoothedSpec(specIn);
    this.spec = spec;
    this.transform = spec.transform;
    this.beta = 1 - spec.alpha;
    const K = spec.harmonics ?? 0;
    this.deterministic = { intercept: spec.drift === true, trend: false, harmonics: K, season: spec.season ?? null };
    this.fill = deterministicFiller(this.deterministic);
    this.terms = deterministicNames(this.deterministic);
    const parts = ['smoothed', `a${spec.alpha}`];
    if (spec.drift) parts.push('drift');
    if (K > 0) parts.push(`K${K}s${spec.season}`);
    if (spec.transform === 'log') parts.push('log');
    this.key = parts.join('|');
    this.label =
      `smoothed level (α = ${spec.alpha})` +
      (spec.drift ? ' with drift' : '') +
      (K > 0 ? `, ${K} seasonal harmonic${K > 1 ? 's' : ''}` : '') +
      (spec.transform === 'log' ? ', log' : '');
  }

  /**
   * z = g(y) of the series (read only). Estimation, one-step predictions and simulation of one
   * search all transform the same values, so the last result is kept with a copy of the values it
   * came from and reused while they are unchanged.
   */
  private scale(series: Series): Float64Array {
    const values = series.values;
    const m = this.lastScale;
    if (m !== null && m.values === values && sameValues(m.copy, values)) return m.z;
    // A leading part of the kept values (a history cut at an origin, sharing its buffer): g is
    // elementwise, so its z is the leading part of the kept z.
    if (m !== null && isLeadingView(values, m.values) && sameValues(m.copy.subarray(0, values.length), values)) return m.z.subarray(0, values.length);
    if (this.transform === 'log' && !isStrictlyPositive(values)) {
      throw new ModelError('not-positive', `the log transform needs a strictly positive series; "${series.name}" has values ≤ 0`, {
        expected: 'all values > 0',
        hint: 'use --transform none',
      });
    }
    const z = forward(this.transform, values);
    this.lastScale = { values, copy: values.slice(), z };
    return z;
  }

  private lastScale: { values: Float64Array; copy: Float64Array; z: Float64Array } | null = null;

  /**
   * The filtered changes w_t and regressors x̃_t for t = 1 … to − 1 (index t − 1), from the one
   * filter started at t = 1 (see the file comment).
   */
  private filtered(series: Series, z: Float64Array, to: number): { w: Float64Array; x: Float64Array } {
    const p = this.terms.length;
    const rows = Math.max(0, to - 1);
    const w = new Float64Array(rows);
    const x = new Float64Array(rows * p);
    const row = new Float64Array(p);
    const origin = series.before?.count ?? 0;
    const b = this.beta;
    let prev = 0;
    for (let r = 0; r < rows; r++) {
      const t = r + 1;
      prev = z[t] - z[t - 1] + b * prev;
      w[r] = prev;
      if (p > 0) {
        this.fill(origin + t, row, 0);
        for (let j = 0; j < p; j++) x[r * p + j] = row[j] + (r > 0 ? b * x[(r - 1) * p + j] : 0);
      }
    }
    return { w, x };
  }

  /**
   * `filtered` over the whole of `series` (z its scale), kept with a copy of the values and the
   * window start it came from: the filter runs forward from t = 1, so the rows of any range, and
   * those of a leading part of the same values, are read from the one result. Online learning
   * asks for a few rows of the same history at a time.
   */
  private filteredOf(series: Series, z: Float64Array): { w: Float64Array; x: Float64Array } {
    const values = series.values;
    const origin = series.before?.count ?? 0;
    const m = this.lastFilter;
    if (m !== null && m.origin === origin && (m.values === values || isLeadingView(values, m.values)) && sameValues(m.copy.subarray(0, values.length), values)) return m;
    const f = this.filtered(series, z, z.length);
    this.lastFilter = { values, copy: values.slice(), origin, w: f.w, x: f.x };
    return f;
  }

  private lastFilter: { values: Float64Array; copy: Float64Array; origin: number; w: Float64Array; x: Float64Array } | null = null;

  regression(series: Series, from: number, to: number): Regression {
    const z = this.scale(series);
    const end = Math.min(to, z.length);
    const start = Math.max(from, this.history);
    const rows = Math.max(0, end - start);
    const p = this.terms.length;
    const { w, x } = this.filteredOf(series, z);
    const phi: DesignMatrix = { rows, cols: p, data: x.slice((start - 1) * p, (start - 1 + rows) * p) };
    const index = Int32Array.from({ length: rows }, (_, r) => start + r);
    return { index, y: w.slice(start - 1, start - 1 + rows), phi };
  }

  estimate(series: Series, from: number, to: number): Estimate {
    const reg = this.regression(series, from, to);
    const rows = reg.y.length;
    const p = this.terms.length;
    if (rows <= p) {
      throw new ModelError('too-short', `${this.label}: ${rows} rows for ${p} coefficients`, {
        expected: `more than ${p} rows (series length ≥ ${this.history + p + 1})`,
      });
    }
    const z = this.scale(series);
    const oneStep = new Float64Array(rows);
    if (p === 0) {
      let rss = 0;
      for (let r = 0; r < rows; r++) {
        rss += reg.y[r] * reg.y[r];
        oneStep[r] = z[reg.index[r]] - reg.y[r];
      }
      return { theta: new Float64Array(0), se: new Float64Array(0), cov: new Float64Array(0), active: [], sigma2: rss / rows, rank: 0, condition: 1, warnings: [], oneStep };
    }
    const fit = lstsq(reg.phi, reg.y, this.terms, { onRankDeficient: 'throw' });
    // e_t = w_t − x̃_tᵀθ is the one-step error, so ẑ_t = z_t − e_t.
    for (let r = 0; r < rows; r++) {
      let e = reg.y[r];
      for (let j = 0; j < p; j++) e -= reg.phi.data[r * p + j] * fit.theta[j];
      oneStep[r] = z[reg.index[r]] - e;
    }
    return {
      theta: fit.theta,
      se: fit.se,
      cov: fit.cov,
      active: this.terms.map(() => true),
      sigma2: fit.sigma2,
      rank: fit.rank,
      condition: fit.condition,
      warnings: fit.warnings,
      oneStep,
    };
  }

  /** The deterministic change d_t at time t (drift plus harmonics), from θ. */
  private change(theta: Float64Array): (t: number) => number {
    return deterministicCombination(this.deterministic, theta);
  }

  /**
   * The one-step errors e_t for t = 1 … to − 1 (index t − 1) under θ, by the recursion
   * e_t = Δz_t − d_t + β·e_{t−1} from e_0 = 0.
   */
  private errors(theta: Float64Array, series: Series, z: Float64Array, to: number): Float64Array {
    const d = this.change(theta);
    const origin = series.before?.count ?? 0;
    const e = new Float64Array(Math.max(0, to - 1));
    let prev = 0;
    for (let t = 1; t < to; t++) {
      prev = z[t] - z[t - 1] - d(origin + t) + this.beta * prev;
      e[t - 1] = prev;
    }
    return e;
  }

  oneStep(theta: Float64Array, series: Series, from: number, to: number): Float64Array {
    const z = this.scale(series);
    const e = this.errors(theta, series, z, to);
    const out = new Float64Array(Math.max(0, to - from)).fill(NaN);
    for (let t = Math.max(from, this.history); t < to; t++) out[t - from] = z[t] - e[t - 1];
    return out;
  }

  /**
   * The smoothed level ℓ_{n−1} = z_{n−1} − β·e_{n−1} at the end of `series` under θ. Simulations
   * for bootstrap intervals repeat the same history and θ many times, so the last result is kept
   * with a copy of what it was computed from and reused while both are unchanged.
   */
  private endLevel(theta: Float64Array, series: Series): number {
    const values = series.values;
    const origin = series.before?.count ?? 0;
    const m = this.lastLevel;
    if (m !== null && m.values === values && m.origin === origin && sameValues(m.theta, theta) && sameValues(m.copy, values)) return m.level;
    const n = values.length;
    const z = this.scale(series);
    const e = this.errors(theta, series, z, n);
    const level = z[n - 1] - this.beta * e[n - 2];
    this.lastLevel = { values, copy: values.slice(), origin, theta: theta.slice(), level };
    return level;
  }

  private lastLevel: { values: Float64Array; copy: Float64Array; origin: number; theta: Float64Array; level: number } | null = null;

  simulate(theta: Float64Array, series: Series, future: Float64Array[], h: number, shocks?: Float64Array): Float64Array {
    void future;
    const n = series.values.length;
    if (n < 2) {
      throw new ModelError('too-short', `${this.label} needs 2 past points to simulate; the series has ${n}`, { expected: 'at least 2 points' });
    }
    let level = this.endLevel(theta, series);
    const d = this.change(theta);
    const origin = series.before?.count ?? 0;
    const alpha = this.spec.alpha;
    const out = new Float64Array(h);
    for (let k = 0; k < h; k++) {
      const predicted = level + d(origin + n + k);
      const shock = shocks ? shocks[k] : 0;
      out[k] = inverse(this.transform, predicted + shock);
      level = predicted + alpha * shock;
    }
    return out;
  }

  describe(theta: Float64Array, se?: Float64Array): string {
    return `${linearEquation(`Δ${transformedName(this.transform, 'y')}[t]`, this.terms, theta, se)} − ${formatCoefficient(this.beta)}·e[t-1]`;
  }

  /**
   * Derived quantities: the `smoothing weight` α, the `level memory half-life`
   * ln 0.5 / ln(1 − α) (periods for an observation's weight in the level to halve), and with
   * drift the `long-run change` c per period (on the log scale, as a growth rate e^c − 1).
   */
  derived(theta: Float64Array, series: Series): Derived[] {
    void series;
    const alpha = this.spec.alpha;
    const out: Derived[] = [
      { name: 'smoothing weight', value: alpha, note: 'α: the share of each one-step surprise the level takes in' },
      { name: 'level memory half-life', value: Math.log(0.5) / Math.log(1 - alpha), unit: 'periods', note: "an observation's weight in the level halves" },
    ];
    if (this.spec.drift) {
      const c = theta[0];
      out.push(
        this.transform === 'log'
          ? { name: 'long-run growth', value: Math.exp(c) - 1, unit: 'per period', note: 'e^c − 1: the steady relative change' }
          : { name: 'long-run change', value: c, unit: 'per period', note: 'c: the steady change' },
      );
    }
    return out;
  }
}

/** True when `part` is a view of the first `part.length` values of `whole` (same buffer, same start). */
function isLeadingView(part: Float64Array, whole: Float64Array): boolean {
  return part.buffer === whole.buffer && part.byteOffset === whole.byteOffset && part.length <= whole.length;
}

/** True when two arrays hold the same values. */
function sameValues(a: ArrayLike<number>, b: ArrayLike<number>): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/**
 * The smoothed-level candidates, in a fixed order: for each scoring transform, no harmonics and
 * the largest number of harmonic pairs the bounds allow the change (`changeHarmonics`: the
 * seasonal pattern of the change whole or not at all; the counts in between scored no better on
 * the accuracy benchmark), each drift alternative (the bounds' trend alternatives: the drift is
 * this family's trend), each smoothing weight of `SMOOTHING_WEIGHTS`.
 */
export function smoothedCandidates(series: Series, bounds: CandidateBounds): Structure[] {
  const positive = isStrictlyPositive(series.values);
  const out: Structure[] = [];
  const allowed = bounds.season !== null && (bounds.changeHarmonics ?? bounds.harmonics).length > 0 ? (bounds.changeHarmonics ?? bounds.harmonics) : [0];
  const harmonics = [...new Set([Math.min(...allowed), Math.max(...allowed)])];
  for (const transform of bounds.transforms) {
    if (transform === 'log' && !positive) continue;
    for (const K of harmonics) {
      for (const drift of bounds.trend) {
        for (const alpha of SMOOTHING_WEIGHTS) {
          out.push(new SmoothedStructure({ family: 'smoothed', alpha, transform, ...(drift ? { drift: true } : {}), ...(K > 0 ? { harmonics: K, season: bounds.season as number } : {}) }));
        }
      }
    }
  }
  return out;
}

export const smoothedFamily: FamilyDefinition = {
  name: 'smoothed',
  candidates: smoothedCandidates,
  fromSpec: (spec) => new SmoothedStructure(spec),
};
