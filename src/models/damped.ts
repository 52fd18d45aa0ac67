/**
 * The change family: structures for the period-to-period change of the series rather than its
 * level. With z_t = g(y_t) the scoring-scale target (transforms.ts) and Δz_t = z_t − z_{t−1},
 *
 *   Δz_t = φ·Δz_{t−1} + c + Σ_{k=1}^{K} (α_k sin(2πkt/s) + β_k cos(2πkt/s)) + e_t,
 *
 * each part optional:
 * - φ (damping): the last change carries on, shrinking by φ each period. Without drift or
 *   harmonics the k-step forecast is z_n + Δz_n·(φ + φ² + … + φ^k), a local trend damped
 *   towards a flat line that levels off at z_n + Δz_n·φ/(1 − φ): the damped trend of Gardner &
 *   McKenzie ("Forecasting trends in time series", Management Science 31(10), 1985, 1237–1246)
 *   in its simplest difference-equation form, with φ estimated by least squares on the
 *   differences (an AR(1) on Δz; Box, Jenkins, Reinsel & Ljung 2015, §4.1, ARIMA(1,1,0)).
 * - c (drift): a constant change per period. With φ = 0 the structure is the random walk with
 *   drift z_t = z_{t−1} + c + e_t, whose forecast is z_n + k·c with c the mean change over the
 *   sample (Box et al. 2015, §4.1, ARIMA(0,1,0) with constant; Hyndman & Athanasopoulos 2021,
 *   §5.2 "drift method"). With φ the change relaxes to the steady drift c/(1 − φ).
 * - harmonics: a periodic mean of the change (terms.ts), so a seasonal series' change carries
 *   its seasonal pattern; the level then repeats the pattern on top of the carried trend.
 * With none of them the structure is the random walk z_t = z_{t−1} + e_t, which has no
 * coefficients at all: the forecast is the last value.
 *
 * Unlike the ARX family, which models the level (a trend there is a deterministic line the
 * forecast returns to), these structures carry the series on from where it ends; the drift is
 * the only deterministic part of the trend and it is estimated from the changes themselves.
 *
 * Term names: `Δy[t-1]` or `Δln y[t-1]`, `const`, `sin(2π·1·t/4)` … . Inputs are not used.
 * Time t counts from the first observation ever seen (terms.ts), so harmonics continue across
 * stored windows.
 */
import type { Series } from '../data/series.js';
import { ModelError, UsageError } from '../data/errors.js';
import { lstsq } from '../linalg/lstsq.js';
import type { DesignMatrix } from '../linalg/matrix.js';
import type { Derived, Estimate, Regression, Structure, StructureSpec, Transform } from './structure.js';
import { forward, inverse, isStrictlyPositive, transformedName } from './transforms.js';
import { deterministicFiller, deterministicNames, maxHarmonics, type DeterministicTerms } from './terms.js';
import { linearEquation } from './equation.js';
import type { CandidateBounds, FamilyDefinition } from './registry.js';

export interface DampedSpec extends StructureSpec {
  family: 'damped';
  /** Estimate φ (true), or fix φ = 0 (false). */
  damped: boolean;
  /** A constant change per period (absent = false). */
  drift?: boolean;
  /** Harmonic pairs K of the change (absent = 0); needs `season`. */
  harmonics?: number;
  /** Season length s of the harmonics (present exactly when harmonics > 0). */
  season?: number;
  transform: Transform;
}

/** Checks a spec (from the grid or a saved file); UsageError naming the bad field. */
export function validateDampedSpec(spec: StructureSpec): DampedSpec {
  const s = spec as Partial<DampedSpec>;
  const bad = (field: string, expected: string): never => {
    throw new UsageError('bad-damped-spec', `change-family spec field "${field}" is invalid`, {
      found: JSON.stringify((spec as Record<string, unknown>)[field]),
      expected,
    });
  };
  if (s.family !== 'damped') bad('family', '"damped"');
  if (typeof s.damped !== 'boolean') bad('damped', 'true or false');
  if (s.drift !== undefined && typeof s.drift !== 'boolean') bad('drift', 'true or false');
  if (s.transform !== 'none' && s.transform !== 'log') bad('transform', 'none or log');
  const K = s.harmonics ?? 0;
  if (!Number.isInteger(K) || K < 0) bad('harmonics', 'a whole number ≥ 0');
  const out: DampedSpec = { family: 'damped', damped: s.damped as boolean, transform: s.transform as Transform };
  if (s.drift === true) out.drift = true;
  if (K > 0) {
    const season = s.season;
    if (typeof season !== 'number' || !Number.isInteger(season) || season < 2) bad('season', 'a whole number ≥ 2 when harmonics > 0');
    if (K > maxHarmonics(season as number)) bad('harmonics', `at most ⌊s/2⌋ = ${maxHarmonics(season as number)}`);
    out.harmonics = K;
    out.season = season as number;
  }
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
  /** Index of φ in θ (−1 when not estimated) and of the first deterministic coefficient. */
  private readonly phiAt: number;
  private readonly detAt: number;

  constructor(specIn: StructureSpec) {
    const spec = validateDampedSpec(specIn);
    this.spec = spec;
    this.transform = spec.transform;
    const K = spec.harmonics ?? 0;
    this.deterministic = { intercept: spec.drift === true, trend: false, harmonics: K, season: spec.season ?? null };
    this.phiAt = spec.damped ? 0 : -1;
    this.detAt = spec.damped ? 1 : 0;
    this.terms = [...(spec.damped ? [`Δ${transformedName(spec.transform, 'y')}[t-1]`] : []), ...deterministicNames(this.deterministic)];
    this.history = spec.damped ? 2 : 1;
    const parts = ['damped', spec.damped ? 'phi' : 'rw'];
    if (spec.drift) parts.push('drift');
    if (K > 0) parts.push(`K${K}s${spec.season}`);
    if (spec.transform === 'log') parts.push('log');
    this.key = parts.join('|');
    this.label =
      (spec.damped ? 'damped trend' : 'random walk') +
      (spec.drift ? ' with drift' : '') +
      (K > 0 ? `, ${K} seasonal harmonic${K > 1 ? 's' : ''}` : '') +
      (spec.transform === 'log' ? ', log' : '');
  }

  private scale(series: Series, values: Float64Array): Float64Array {
    if (this.transform === 'log' && !isStrictlyPositive(values)) {
      throw new ModelError('not-positive', `the log transform needs a strictly positive series; "${series.name}" has values ≤ 0`, {
        expected: 'all values > 0',
        hint: 'use --transform none',
      });
    }
    return forward(this.transform, values);
  }

  regression(series: Series, from: number, to: number): Regression {
    const z = this.scale(series, series.values);
    const start = Math.max(from, this.history);
    const end = Math.min(to, z.length);
    const rows = Math.max(0, end - start);
    const p = this.terms.length;
    const phi: DesignMatrix = { rows, cols: p, data: new Float64Array(rows * p) };
    const y = new Float64Array(rows);
    const index = new Int32Array(rows);
    const fill = deterministicFiller(this.deterministic);
    const origin = series.before?.count ?? 0;
    for (let r = 0; r < rows; r++) {
      const t = start + r;
      index[r] = t;
      y[r] = z[t] - z[t - 1];
      if (this.phiAt >= 0) phi.data[r * p + this.phiAt] = z[t - 1] - z[t - 2];
      fill(origin + t, phi.data, r * p + this.detAt);
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

  private phi(theta: Float64Array): number {
    return this.phiAt >= 0 ? theta[this.phiAt] : 0;
  }

  /** The deterministic part of the change at time t (drift plus harmonics), from θ. */
  private deterministicChange(theta: Float64Array): (t: number) => number {
    const m = this.terms.length - this.detAt;
    if (m === 0) return () => 0;
    const fill = deterministicFiller(this.deterministic);
    const row = new Float64Array(m);
    return (t) => {
      fill(t, row, 0);
      let s = 0;
      for (let j = 0; j < m; j++) s += theta[this.detAt + j] * row[j];
      return s;
    };
  }

  oneStep(theta: Float64Array, series: Series, from: number, to: number): Float64Array {
    const z = this.scale(series, series.values);
    const phi = this.phi(theta);
    const det = this.deterministicChange(theta);
    const origin = series.before?.count ?? 0;
    const out = new Float64Array(Math.max(0, to - from)).fill(NaN);
    for (let t = Math.max(from, this.history); t < to; t++) {
      out[t - from] = z[t - 1] + (this.phiAt >= 0 ? phi * (z[t - 1] - z[t - 2]) : 0) + det(origin + t);
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
    const z = this.scale(series, series.values);
    const phi = this.phi(theta);
    const det = this.deterministicChange(theta);
    const origin = series.before?.count ?? 0;
    let level = z[n - 1];
    let change = this.phiAt >= 0 ? z[n - 1] - z[n - 2] : 0;
    const out = new Float64Array(h);
    for (let k = 0; k < h; k++) {
      change = phi * change + det(origin + n + k) + (shocks ? shocks[k] : 0);
      level += change;
      out[k] = inverse(this.transform, level);
    }
    return out;
  }

  describe(theta: Float64Array, se?: Float64Array): string {
    return linearEquation(`Δ${transformedName(this.transform, 'y')}[t]`, this.terms, theta, se);
  }

  /**
   * Derived quantities: with φ, the `damping factor`, `stable` (|φ| < 1) and for 0 < φ < 1 the
   * trend's `half-life` ln 0.5 / ln φ (periods for the carried-on change to halve); with drift,
   * the `long-run change` c/(1 − φ) per period (on the log scale, as a growth rate e^{c/(1−φ)} − 1).
   */
  derived(theta: Float64Array, series: Series): Derived[] {
    void series;
    const phi = this.phi(theta);
    const out: Derived[] = [];
    if (this.phiAt >= 0 || !this.spec.drift) {
      out.push(
        { name: 'damping factor', value: phi, note: this.spec.damped ? 'share of the last change carried into the next period' : 'random walk: no change carried on' },
        { name: 'stable', value: Math.abs(phi) < 1, note: '|φ| < 1: the carried-on change dies out' },
      );
      if (phi > 0 && phi < 1) out.push({ name: 'half-life', value: Math.log(0.5) / Math.log(phi), unit: 'periods', note: 'the carried-on change halves' });
    }
    if (this.spec.drift && Math.abs(phi) < 1) {
      const c = theta[this.detAt] / (1 - phi);
      out.push(
        this.transform === 'log'
          ? { name: 'long-run growth', value: Math.exp(c) - 1, unit: 'per period', note: 'e^{c/(1−φ)} − 1: the steady relative change' }
          : { name: 'long-run change', value: c, unit: 'per period', note: 'c/(1 − φ): the steady change' },
      );
    }
    return out;
  }
}

/**
 * The change-family candidates, in a fixed order: for each scoring transform, each number of
 * harmonic pairs the bounds allow, each drift alternative (the bounds' trend alternatives: the
 * drift is this family's trend), the random walk and then, when the bounds allow at least one AR
 * lag (maxAr ≥ 1), the damped form.
 */
export function dampedCandidates(series: Series, bounds: CandidateBounds): Structure[] {
  const positive = isStrictlyPositive(series.values);
  const out: Structure[] = [];
  const harmonics = bounds.season !== null && bounds.harmonics.length > 0 ? bounds.harmonics : [0];
  for (const transform of bounds.transforms) {
    if (transform === 'log' && !positive) continue;
    for (const K of harmonics) {
      for (const drift of bounds.trend) {
        const base = { family: 'damped', transform, ...(drift ? { drift: true } : {}), ...(K > 0 ? { harmonics: K, season: bounds.season as number } : {}) };
        out.push(new DampedStructure({ ...base, damped: false }));
        if (bounds.maxAr >= 1) out.push(new DampedStructure({ ...base, damped: true }));
      }
    }
  }
  return out;
}

export const dampedFamily: FamilyDefinition = {
  name: 'damped',
  candidates: dampedCandidates,
  fromSpec: (spec) => new DampedStructure(spec),
  dynamicMask: (structure) => structure.terms.map((_, j) => j === 0 && (structure as DampedStructure).spec.damped),
  stable: (structure, theta) => !(structure as DampedStructure).spec.damped || Math.abs(theta[0]) < 1,
};
