/**
 * The change family: structures for the period-to-period change of the series rather than its
 * level. With z_t = g(y_t) the scoring-scale target (transforms.ts) and Δz_t = z_t − z_{t−1},
 *
 *   Δz_t = Σ_{i=1}^{p} φ_i·Δz_{t−i} + c + Σ_{k=1}^{K} (α_k sin(2πkt/s) + β_k cos(2πkt/s)) + e_t,
 *
 * each part optional:
 * - φ (damping): the last change carries on, shrinking by φ each period (with p lags,
 *   Σ_{i=1}^{p} φ_i Δz_{t−i}: ARIMA(p,1,0)). With one lag and without drift or
 *   harmonics the k-step forecast is z_n + Δz_n·(φ + φ² + … + φ^k), a local trend damped
 *   towards a flat line that levels off at z_n + Δz_n·φ/(1 − φ): the damped trend of Gardner &
 *   McKenzie ("Forecasting trends in time series", Management Science 31(10), 1985, 1237–1246)
 *   in its simplest difference-equation form, with φ estimated by least squares on the
 *   differences (an AR(1) on Δz; Box, Jenkins, Reinsel & Ljung 2015, §4.1, ARIMA(1,1,0)).
 * - c (drift): a constant change per period. With φ = 0 the structure is the random walk with
 *   drift z_t = z_{t−1} + c + e_t, whose forecast is z_n + k·c with c the mean change over the
 *   sample (Box et al. 2015, §4.1, ARIMA(0,1,0) with constant; Hyndman & Athanasopoulos 2021,
 *   §5.2 "drift method"). With damping the change relaxes to the steady drift c/(1 − Σφ_i).
 * - harmonics: a periodic mean of the change (terms.ts), so a seasonal series' change carries
 *   its seasonal pattern; the level then repeats the pattern on top of the carried trend.
 * With none of them the structure is the random walk z_t = z_{t−1} + e_t, which has no
 * coefficients at all: the forecast is the last value.
 *
 * Unlike the ARX family, which models the level (a trend there is a deterministic line the
 * forecast returns to), these structures carry the series on from where it ends; the drift is
 * the only deterministic part of the trend and it is estimated from the changes themselves.
 *
 * Term names: `Δy[t-1]`, `Δln y[t-2]`, `const`, `sin(2π·1·t/4)` … . Inputs are not used.
 * Time t counts from the first observation ever seen (terms.ts), so harmonics continue across
 * stored windows.
 */
import type { Series } from '../data/series.js';
import { ModelError } from '../data/errors.js';
import { lstsq } from '../linalg/lstsq.js';
import type { DesignMatrix } from '../linalg/matrix.js';
import type { Derived, Estimate, Regression, Structure, StructureSpec, Transform } from './structure.js';
import { forward, inverse, isStrictlyPositive, transformedName } from './transforms.js';
import { checkChangeTerms, deterministicCombination, deterministicFiller, deterministicNames, specFieldError, type ChangeTerms, type DeterministicTerms } from './terms.js';
import { linearEquation } from './equation.js';
import { isStableRecursion, spectralRadius } from './roots.js';
import type { CandidateBounds, FamilyDefinition } from './registry.js';

export interface DampedSpec extends StructureSpec, ChangeTerms {
  family: 'damped';
  /** Carry the last changes on: estimate AR coefficients of the change (true), or none (false). */
  damped: boolean;
  /** Number p of AR lags of the change when damped (absent = 1). */
  lags?: number;
  transform: Transform;
}

/** Checks a spec (from the grid or a saved file); UsageError naming the bad field. */
export function validateDampedSpec(spec: StructureSpec): DampedSpec {
  const s = spec as Partial<DampedSpec>;
  const bad = specFieldError(spec, 'bad-damped-spec', 'change-family');
  if (s.family !== 'damped') bad('family', '"damped"');
  if (typeof s.damped !== 'boolean') bad('damped', 'true or false');
  const lags = s.lags ?? 1;
  if (!Number.isInteger(lags) || lags < 1 || lags > 24) bad('lags', 'a whole number from 1 to 24');
  if (s.lags !== undefined && s.damped !== true) bad('lags', 'absent unless damped is true');
  if (s.transform !== 'none' && s.transform !== 'log') bad('transform', 'none or log');
  const out: DampedSpec = { family: 'damped', damped: s.damped as boolean, transform: s.transform as Transform };
  if (s.damped === true && lags > 1) out.lags = lags;
  checkChangeTerms(s, bad, out);
  return out;
}

export class DampedStructure implements Structure {
  readonly family = 'damped';
  readonly spec: DampedSpec;
  readonly key: string;
  readonly label: string;
  readonly terms: string[];
  readonly history: number;
  readonly transform: Transform;
  private readonly deterministic: DeterministicTerms;
  /** AR lags p of the change (0 = none); their coefficients come first in θ, then the deterministic ones. */
  readonly lags: number;

  constructor(specIn: StructureSpec) {
    const spec = validateDampedSpec(specIn);
    this.spec = spec;
    this.transform = spec.transform;
    const K = spec.harmonics ?? 0;
    this.deterministic = { intercept: spec.drift === true, trend: false, harmonics: K, season: spec.season ?? null };
    this.lags = spec.damped ? (spec.lags ?? 1) : 0;
    const dz = `Δ${transformedName(spec.transform, 'y')}`;
    this.terms = [...Array.from({ length: this.lags }, (_, i) => `${dz}[t-${i + 1}]`), ...deterministicNames(this.deterministic)];
    this.history = this.lags + 1;
    const parts = ['damped', spec.damped ? (this.lags > 1 ? `phi${this.lags}` : 'phi') : 'rw'];
    if (spec.drift) parts.push('drift');
    if (K > 0) parts.push(`K${K}s${spec.season}`);
    if (spec.transform === 'log') parts.push('log');
    this.key = parts.join('|');
    this.label =
      (spec.damped ? 'damped trend' : 'random walk') +
      (spec.drift ? ' with drift' : '') +
      (this.lags > 1 ? `, change lags 1-${this.lags}` : '') +
      (K > 0 ? `, ${K} seasonal harmonic${K > 1 ? 's' : ''}` : '') +
      (spec.transform === 'log' ? ', log' : '');
  }

  private scale(series: Series, values: Float64Array): Float64Array {
    this.checkScale(series, values);
    return forward(this.transform, values);
  }

  /** Refuses a series the log transform cannot take (ModelError). */
  private checkScale(series: Series, values: Float64Array): void {
    if (this.transform === 'log' && !isStrictlyPositive(values)) {
      throw new ModelError('not-positive', `the log transform needs a strictly positive series; "${series.name}" has values ≤ 0`, {
        expected: 'all values > 0',
        hint: 'use --transform none',
      });
    }
  }

  regression(series: Series, from: number, to: number): Regression {
    // Only observations from start − p − 1 on enter the rows: transform just those (online
    // learning asks for a few rows of a long history at a time).
    this.checkScale(series, series.values);
    const start = Math.max(from, this.history);
    const end = Math.min(to, series.values.length);
    const rows = Math.max(0, end - start);
    const lo = start - this.history;
    const part = forward(this.transform, series.values.subarray(lo, Math.max(lo, end)));
    const z = (t: number): number => part[t - lo];
    const p = this.terms.length;
    const phi: DesignMatrix = { rows, cols: p, data: new Float64Array(rows * p) };
    const y = new Float64Array(rows);
    const index = new Int32Array(rows);
    const fill = deterministicFiller(this.deterministic);
    const origin = series.before?.count ?? 0;
    for (let r = 0; r < rows; r++) {
      const t = start + r;
      index[r] = t;
      y[r] = z(t) - z(t - 1);
      for (let i = 1; i <= this.lags; i++) phi.data[r * p + i - 1] = z(t - i) - z(t - i - 1);
      fill(origin + t, phi.data, r * p + this.lags);
    }
    return { index, y, phi };
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
    if (p === 0) {
      let rss = 0;
      for (let r = 0; r < rows; r++) rss += reg.y[r] * reg.y[r];
      return { theta: new Float64Array(0), se: new Float64Array(0), cov: new Float64Array(0), active: [], sigma2: rss / rows, rank: 0, condition: 1, warnings: [] };
    }
    const fit = lstsq(reg.phi, reg.y, this.terms, { onRankDeficient: 'throw' });
    return {
      theta: fit.theta,
      se: fit.se,
      cov: fit.cov,
      active: this.terms.map(() => true),
      sigma2: fit.sigma2,
      rank: fit.rank,
      condition: fit.condition,
      warnings: fit.warnings,
    };
  }

  /** The AR coefficients of the change, by lag (index i = lag i + 1). */
  arPolynomial(theta: Float64Array): Float64Array {
    return theta.slice(0, this.lags);
  }

  /** The deterministic part of the change at time t (drift plus harmonics), from θ. */
  private deterministicChange(theta: Float64Array): (t: number) => number {
    return deterministicCombination(this.deterministic, theta, this.lags);
  }

  oneStep(theta: Float64Array, series: Series, from: number, to: number): Float64Array {
    const z = this.scale(series, series.values);
    const det = this.deterministicChange(theta);
    const origin = series.before?.count ?? 0;
    const out = new Float64Array(Math.max(0, to - from)).fill(NaN);
    for (let t = Math.max(from, this.history); t < to; t++) {
      let change = det(origin + t);
      for (let i = 1; i <= this.lags; i++) change += theta[i - 1] * (z[t - i] - z[t - i - 1]);
      out[t - from] = z[t - 1] + change;
    }
    return out;
  }

  simulate(theta: Float64Array, series: Series, future: Float64Array[], h: number, shocks?: Float64Array): Float64Array {
    void future;
    const n = series.values.length;
    if (n < this.history) {
      throw new ModelError('too-short', `${this.label} needs ${this.history} past points to simulate; the series has ${n}`, {
        expected: `at least ${this.history} points`,
      });
    }
    // Only the last p + 1 values enter the forecast: transform just those (bootstrap intervals
    // simulate the same history many times).
    this.checkScale(series, series.values);
    const tail = forward(this.transform, series.values.subarray(n - this.history));
    const z = (t: number) => tail[t - (n - this.history)];
    const det = this.deterministicChange(theta);
    const origin = series.before?.count ?? 0;
    const p = this.lags;
    // recent[i] = the change i + 1 periods back, newest first.
    const recent = Float64Array.from({ length: p }, (_, i) => z(n - 1 - i) - z(n - 2 - i));
    let level = z(n - 1);
    const out = new Float64Array(h);
    for (let k = 0; k < h; k++) {
      let change = det(origin + n + k) + (shocks ? shocks[k] : 0);
      for (let i = 0; i < p; i++) change += theta[i] * recent[i];
      for (let i = p - 1; i > 0; i--) recent[i] = recent[i - 1];
      if (p > 0) recent[0] = change;
      level += change;
      out[k] = inverse(this.transform, level);
    }
    return out;
  }

  describe(theta: Float64Array, se?: Float64Array): string {
    return linearEquation(`Δ${transformedName(this.transform, 'y')}[t]`, this.terms, theta, se);
  }

  /**
   * Derived quantities: with one lag, the `damping factor` φ and for 0 < φ < 1 the trend's
   * `half-life` ln 0.5 / ln φ (periods for the carried-on change to halve); with more lags, the
   * `spectral radius` of the change's recursion; `stable` (the carried-on change dies out: every
   * characteristic root inside the unit circle); with drift, the `long-run change` c/(1 − Σφ)
   * per period (on the log scale, as a growth rate e^{c/(1−Σφ)} − 1).
   */
  derived(theta: Float64Array, series: Series): Derived[] {
    void series;
    const a = this.arPolynomial(theta);
    const out: Derived[] = [];
    const stable = isStableRecursion(a);
    if (this.lags <= 1 && !(this.lags === 0 && this.spec.drift)) {
      const phi = this.lags === 1 ? a[0] : 0;
      out.push({ name: 'damping factor', value: phi, note: this.spec.damped ? 'share of the last change carried into the next period' : 'random walk: no change carried on' });
      out.push({ name: 'stable', value: stable, note: '|φ| < 1: the carried-on change dies out' });
      if (phi > 0 && phi < 1) out.push({ name: 'half-life', value: Math.log(0.5) / Math.log(phi), unit: 'periods', note: 'the carried-on change halves' });
    } else if (this.lags > 1) {
      out.push({ name: 'spectral radius', value: spectralRadius(a), note: 'largest modulus of the characteristic roots of the change recursion' });
      out.push({ name: 'stable', value: stable, note: 'all roots inside the unit circle: the carried-on change dies out' });
    }
    if (this.spec.drift && stable) {
      let sum = 0;
      for (const v of a) sum += v;
      const c = theta[this.lags] / (1 - sum);
      out.push(
        this.transform === 'log'
          ? { name: 'long-run growth', value: Math.exp(c) - 1, unit: 'per period', note: 'e^{c/(1−Σφ)} − 1: the steady relative change' }
          : { name: 'long-run change', value: c, unit: 'per period', note: 'c/(1 − Σφ): the steady change' },
      );
    }
    return out;
  }
}

/**
 * The change-family candidates, in a fixed order: for each scoring transform, each number of
 * harmonic pairs the bounds allow the change (`changeHarmonics`), each drift alternative (the
 * bounds' trend alternatives: the drift is this family's trend), the random walk and then the
 * damped forms with 1 … maxAr AR lags of the change.
 */
export function dampedCandidates(series: Series, bounds: CandidateBounds): Structure[] {
  const positive = isStrictlyPositive(series.values);
  const out: Structure[] = [];
  const allowed = bounds.changeHarmonics ?? bounds.harmonics;
  const harmonics = bounds.season !== null && allowed.length > 0 ? allowed : [0];
  for (const transform of bounds.transforms) {
    if (transform === 'log' && !positive) continue;
    for (const K of harmonics) {
      for (const drift of bounds.trend) {
        const base = { family: 'damped', transform, ...(drift ? { drift: true } : {}), ...(K > 0 ? { harmonics: K, season: bounds.season as number } : {}) };
        out.push(new DampedStructure({ ...base, damped: false }));
        for (let p = 1; p <= bounds.maxAr; p++) out.push(new DampedStructure({ ...base, damped: true, ...(p > 1 ? { lags: p } : {}) }));
      }
    }
  }
  return out;
}

export const dampedFamily: FamilyDefinition = {
  name: 'damped',
  candidates: dampedCandidates,
  fromSpec: (spec) => new DampedStructure(spec),
  dynamicMask: (structure) => structure.terms.map((_, j) => j < (structure as DampedStructure).lags),
  stable: (structure, theta) => isStableRecursion((structure as DampedStructure).arPolynomial(theta)),
  unstableReason: 'explosive fitted dynamics (a root of the change recursion on or outside the unit circle)',
};
