/**
 * The damped-trend family: the last change of the series carries on, shrinking by a factor φ
 * each period. With z_t = g(y_t) the scoring-scale target (transforms.ts) and Δz_t = z_t − z_{t−1},
 *
 *   Δz_t = φ·Δz_{t−1} + e_t,   |φ| < 1,
 *
 * so the k-step forecast is z_{n+k} = z_n + Δz_n·(φ + φ² + … + φ^k): the local trend is damped
 * towards a flat line, and the path levels off at z_n + Δz_n·φ/(1 − φ). This is the damped trend
 * of Gardner & McKenzie ("Forecasting trends in time series", Management Science 31(10), 1985,
 * 1237–1246) in its simplest difference-equation form, with φ estimated by least squares on the
 * differences (an AR(1) without constant on Δz; Box, Jenkins, Reinsel & Ljung 2015, §4.1 ARIMA
 * (1,1,0)). With φ = 0 fixed the structure is the random walk z_t = z_{t−1} + e_t, which has no
 * coefficients at all: the forecast is the last value.
 *
 * Unlike an ARX structure on differences (arx.ts), there is no constant: a constant would be a
 * drift that never dies out, and a drift is exactly what this family does not extrapolate.
 *
 * Term names: `Δy[t-1]` or `Δln y[t-1]`. Inputs are not used.
 */
import type { Series } from '../data/series.js';
import { ModelError, UsageError } from '../data/errors.js';
import { lstsq } from '../linalg/lstsq.js';
import type { DesignMatrix } from '../linalg/matrix.js';
import type { Derived, Estimate, Regression, Structure, StructureSpec, Transform } from './structure.js';
import { forward, inverse, isStrictlyPositive, transformedName } from './transforms.js';
import type { CandidateBounds, FamilyDefinition } from './registry.js';

export interface DampedSpec extends StructureSpec {
  family: 'damped';
  /** Estimate φ (true), or fix φ = 0: the random walk (false). */
  damped: boolean;
  transform: Transform;
}

/** Checks a spec (from the grid or a saved file); UsageError naming the bad field. */
export function validateDampedSpec(spec: StructureSpec): DampedSpec {
  const s = spec as Partial<DampedSpec>;
  const bad = (field: string, expected: string): never => {
    throw new UsageError('bad-damped-spec', `damped-trend spec field "${field}" is invalid`, {
      found: JSON.stringify((spec as Record<string, unknown>)[field]),
      expected,
    });
  };
  if (s.family !== 'damped') bad('family', '"damped"');
  if (typeof s.damped !== 'boolean') bad('damped', 'true or false');
  if (s.transform !== 'none' && s.transform !== 'log') bad('transform', 'none or log');
  return { family: 'damped', damped: s.damped as boolean, transform: s.transform as Transform };
}

function fmt(x: number): string {
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e6) return String(Number(x.toPrecision(4)));
  return x.toExponential(3);
}

export class DampedStructure implements Structure {
  readonly family = 'damped';
  readonly spec: DampedSpec;
  readonly key: string;
  readonly label: string;
  readonly terms: string[];
  readonly history: number;
  readonly transform: Transform;

  constructor(specIn: StructureSpec) {
    const spec = validateDampedSpec(specIn);
    this.spec = spec;
    this.transform = spec.transform;
    this.terms = spec.damped ? [`Δ${transformedName(spec.transform, 'y')}[t-1]`] : [];
    this.history = spec.damped ? 2 : 1;
    this.key = `damped|${spec.damped ? 'phi' : 'rw'}${spec.transform === 'log' ? '|log' : ''}`;
    this.label = `${spec.damped ? 'damped trend' : 'random walk'}${spec.transform === 'log' ? ', log' : ''}`;
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
    for (let r = 0; r < rows; r++) {
      const t = start + r;
      index[r] = t;
      y[r] = z[t] - z[t - 1];
      if (p === 1) phi.data[r] = z[t - 1] - z[t - 2];
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
      active: [true],
      sigma2: fit.sigma2,
      rank: fit.rank,
      condition: fit.condition,
      warnings: fit.warnings,
    };
  }

  private phi(theta: Float64Array): number {
    return this.spec.damped ? theta[0] : 0;
  }

  oneStep(theta: Float64Array, series: Series, from: number, to: number): Float64Array {
    const z = this.scale(series, series.values);
    const phi = this.phi(theta);
    const out = new Float64Array(Math.max(0, to - from)).fill(NaN);
    for (let t = Math.max(from, this.history); t < to; t++) {
      out[t - from] = z[t - 1] + (this.spec.damped ? phi * (z[t - 1] - z[t - 2]) : 0);
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
    let level = z[n - 1];
    let change = this.spec.damped ? z[n - 1] - z[n - 2] : 0;
    const out = new Float64Array(h);
    for (let k = 0; k < h; k++) {
      change = phi * change + (shocks ? shocks[k] : 0);
      level += change;
      out[k] = inverse(this.transform, level);
    }
    return out;
  }

  describe(theta: Float64Array, se?: Float64Array): string {
    const name = transformedName(this.transform, 'y');
    if (!this.spec.damped) return `Δ${name}[t] = e[t]`;
    const c = theta[0];
    const mag = fmt(Math.abs(c)) + (se ? ` (±${fmt(se[0])})` : '');
    return `Δ${name}[t] = ${c < 0 ? '−' : ''}${mag}·${this.terms[0]} + e[t]`;
  }

  /**
   * Derived quantities: `damping factor` φ, `stable` (|φ| < 1), and for 0 < φ < 1 the trend's
   * `half-life` ln 0.5 / ln φ (periods for the carried-on change to halve).
   */
  derived(theta: Float64Array, series: Series): Derived[] {
    void series;
    const phi = this.phi(theta);
    const out: Derived[] = [
      { name: 'damping factor', value: phi, note: this.spec.damped ? 'share of the last change carried into the next period' : 'random walk: no change carried on' },
      { name: 'stable', value: Math.abs(phi) < 1, note: '|φ| < 1: the forecast levels off' },
    ];
    if (phi > 0 && phi < 1) out.push({ name: 'half-life', value: Math.log(0.5) / Math.log(phi), unit: 'periods', note: 'the carried-on change halves' });
    return out;
  }
}

/**
 * The damped-trend candidates, in a fixed order: for each scoring transform, the random walk,
 * then the damped trend when the bounds allow at least one AR lag (maxAr ≥ 1).
 */
export function dampedCandidates(series: Series, bounds: CandidateBounds): Structure[] {
  const positive = isStrictlyPositive(series.values);
  const out: Structure[] = [];
  for (const transform of bounds.transforms) {
    if (transform === 'log' && !positive) continue;
    out.push(new DampedStructure({ family: 'damped', damped: false, transform }));
    if (bounds.maxAr >= 1) out.push(new DampedStructure({ family: 'damped', damped: true, transform }));
  }
  return out;
}

export const dampedFamily: FamilyDefinition = {
  name: 'damped',
  candidates: dampedCandidates,
  fromSpec: (spec) => new DampedStructure(spec),
  dynamicMask: (structure) => structure.terms.map(() => true),
  stable: (structure, theta) => !(structure as DampedStructure).spec.damped || Math.abs(theta[0]) < 1,
};
