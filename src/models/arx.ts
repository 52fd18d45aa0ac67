/**
 * The ARX family: linear difference equations with exogenous inputs, written as regressions.
 *
 * With z_t = g(y_t) the scoring-scale target (transforms.ts) and w_t its differenced form
 * (w = z, w_t = z_t − z_{t−1} or w_t = z_t − z_{t−s}), the equation is
 *
 *   w_t = c + Σ_{i=1}^{p} a_i w_{t−i} + γ w_{t−s}
 *           + Σ_j Σ_{l=0}^{q_j−1} b_{j,l} v_{j, t−d_j−l}
 *           + δ·t + Σ_{k=1}^{K} (α_k sin(2πkt/s) + β_k cos(2πkt/s)) + e_t,
 *
 * the ARX model of Ljung 1999 ("System Identification: Theory for the User", 2nd ed., §4.2,
 * eq. 4.7) extended by deterministic terms (terms.ts). Inputs u_j enter untransformed; v_j is
 * u_j differenced the same way as z (so the relation between levels, and the steady-state gain,
 * is the same as without differencing). p AR lags, q_j input lags counted from lag 0, d_j the
 * input delay: input j first acts after d_j periods.
 *
 * Term names read as the equation does: `y[t-1]`, `Δln y[t-2]`, `price[t-3]`, `y[t-12]`,
 * `trend`, `sin(2π·1·t/12)`. The target is always written `y`; inputs by their own names.
 */
import type { Series } from '../data/series.js';
import { ModelError, UsageError } from '../data/errors.js';
import type { DesignMatrix } from '../linalg/matrix.js';
import { lstsq } from '../linalg/lstsq.js';
import type { Derived, Estimate, Regression, Structure, StructureSpec, Transform } from './structure.js';
import { forward, inverse, isStrictlyPositive, transformedName } from './transforms.js';
import { deterministicFiller, deterministicNames, deterministicRowsFiller, isHarmonicSeason, maxHarmonics, specFieldError, type DeterministicTerms } from './terms.js';
import { characteristicRoots, isStableRecursion, modulus } from './roots.js';
import type { CandidateBounds, Differencing, FamilyDefinition } from './registry.js';
import { linearEquation } from './equation.js';
import { exploreInputs } from './arx-inputs.js';

export interface ArxInputSpec {
  /** Input name, as in `series.inputs`. */
  name: string;
  /** Number q of lags, counted from lag 0 after the delay (q ≥ 1). */
  lags: number;
  /** Delay d ≥ 0: the input terms are u_{t−d}, …, u_{t−d−q+1}. */
  delay: number;
}

export interface ArxSpec extends StructureSpec {
  family: 'arx';
  /** Number p of AR lags (lags 1…p). */
  ar: number;
  inputs: ArxInputSpec[];
  trend: boolean;
  /** Number K of seasonal harmonic pairs. */
  harmonics: number;
  /** Season length s (needed for harmonics, seasonal lag and seasonal differencing). */
  season: number | null;
  /** Include w_{t−s}. */
  seasonalLag: boolean;
  differencing: Differencing;
  transform: Transform;
}

function isNonNegInt(x: unknown): x is number {
  return typeof x === 'number' && Number.isInteger(x) && x >= 0;
}

/** Checks a spec (from a search grid or a saved file); UsageError naming the bad field. */
export function validateArxSpec(spec: StructureSpec): ArxSpec {
  const s = spec as Partial<ArxSpec>;
  const bad = specFieldError(spec, 'bad-arx-spec', 'ARX');
  if (s.family !== 'arx') bad('family', '"arx"');
  if (!isNonNegInt(s.ar)) bad('ar', 'a whole number ≥ 0');
  if (!Array.isArray(s.inputs)) bad('inputs', 'a list of {name, lags, delay}');
  for (const i of s.inputs as ArxInputSpec[]) {
    if (typeof i?.name !== 'string' || !Number.isInteger(i.lags) || i.lags < 1 || !isNonNegInt(i.delay)) {
      bad('inputs', 'entries {name: text, lags ≥ 1, delay ≥ 0}');
    }
  }
  if (typeof s.trend !== 'boolean') bad('trend', 'true or false');
  if (typeof s.seasonalLag !== 'boolean') bad('seasonalLag', 'true or false');
  if (!isNonNegInt(s.harmonics)) bad('harmonics', 'a whole number ≥ 0');
  if (s.differencing !== 'none' && s.differencing !== 'first' && s.differencing !== 'seasonal') bad('differencing', 'none, first or seasonal');
  if (s.transform !== 'none' && s.transform !== 'log') bad('transform', 'none or log');
  const needsSeason = (s.harmonics as number) > 0 || s.seasonalLag || s.differencing === 'seasonal';
  if (s.season !== null && !(Number.isInteger(s.season) && (s.season as number) >= 2)) {
    // Harmonics alone also take a season of whole quarter periods (365.25 days).
    if (!(typeof s.season === 'number' && isHarmonicSeason(s.season) && !s.seasonalLag && s.differencing !== 'seasonal')) bad('season', 'null, a whole number ≥ 2, or for harmonics alone a multiple of 1/4 (e.g. 365.25)');
  }
  if (needsSeason && s.season === null) bad('season', 'a season length (harmonics, seasonal lag and seasonal differencing need one)');
  if (s.season != null && (s.harmonics as number) > maxHarmonics(s.season)) bad('harmonics', `at most ⌊${s.season}/2⌋ = ${maxHarmonics(s.season)}`);
  return {
    family: 'arx',
    ar: s.ar as number,
    inputs: (s.inputs as ArxInputSpec[]).map((i) => ({ name: i.name, lags: i.lags, delay: i.delay })),
    trend: s.trend as boolean,
    harmonics: s.harmonics as number,
    season: s.season ?? null,
    seasonalLag: s.seasonalLag as boolean,
    differencing: s.differencing as Differencing,
    transform: s.transform as Transform,
  };
}

/** Differencing order D (0, 1 or s). */
export function diffOrder(spec: Pick<ArxSpec, 'differencing' | 'season'>): number {
  return spec.differencing === 'none' ? 0 : spec.differencing === 'first' ? 1 : (spec.season as number);
}

function diffPrefix(spec: ArxSpec): string {
  return spec.differencing === 'none' ? '' : spec.differencing === 'first' ? 'Δ' : `Δ${spec.season}`;
}

/** Differenced copy x_t − x_{t−D} (NaN for t < D); x itself when D = 0 (callers only read it). */
export function difference(x: Float64Array, D: number): Float64Array {
  if (D === 0) return x;
  const w = new Float64Array(x.length);
  for (let t = 0; t < x.length; t++) w[t] = t >= D ? x[t] - x[t - D] : NaN;
  return w;
}

/**
 * Transformed and differenced copies of a series' arrays (ln y, its differences, differenced
 * inputs), shared by every structure reading the same array: a search fits hundreds of
 * candidates on one series, and each would otherwise derive the same copies again. An entry
 * keeps a copy of the values it was derived from and is dropped as soon as the array no longer
 * holds them (arrays may be edited in place between calls), so a derived array is always the one
 * its source would give now. Entries go with their source array (weak keys).
 */
const derivedArrays = new WeakMap<Float64Array, { copy: Float64Array; byKey: Map<string, Float64Array> }>();

/** The derived arrays of x, emptied when x changed since they were made. */
function derivedOf(x: Float64Array): Map<string, Float64Array> {
  let entry = derivedArrays.get(x);
  if (entry !== undefined) {
    const c = entry.copy;
    let same = c.length === x.length;
    for (let i = 0; same && i < x.length; i++) same = c[i] === x[i];
    if (!same) entry = undefined;
  }
  if (entry === undefined) {
    entry = { copy: x.slice(), byKey: new Map() };
    derivedArrays.set(x, entry);
  }
  return entry.byKey;
}

/** `make()` for source x under `key`, computed once while x holds the same values. */
function derived(byKey: Map<string, Float64Array>, key: string, make: () => Float64Array): Float64Array {
  let a = byKey.get(key);
  if (a === undefined) {
    a = make();
    byKey.set(key, a);
  }
  return a;
}

/** Φ storage of the fit in progress (ArxStructure.estimate), reused by every fit. */
let sharedRows = new Float64Array(0);

/** out[r·p + col] = x[first + r] for r < rows: one lagged column of a row-major Φ. */
function laggedColumn(out: Float64Array, p: number, col: number, rows: number, x: Float64Array, first: number): void {
  for (let r = 0, o = col; r < rows; r++, o += p) out[o] = x[first + r];
}

function inputValues(series: Series, name: string): Float64Array {
  const inp = series.inputs.find((i) => i.name === name);
  if (!inp) {
    throw new UsageError('unknown-input', `the model uses input "${name}", which the series does not have`, {
      found: series.inputs.map((i) => i.name).join(', ') || 'no inputs',
      expected: `an input named "${name}"`,
      hint: 'load the data with the same input columns the model was built with',
    });
  }
  return inp.values;
}

export class ArxStructure implements Structure {
  readonly family = 'arx';
  readonly spec: ArxSpec;
  readonly key: string;
  readonly label: string;
  readonly terms: string[];
  readonly history: number;
  readonly transform: Transform;
  /** Column positions: AR lags start at `arAt`, the seasonal lag at `slagAt` (−1 if none). */
  private readonly arAt: number;
  private readonly slagAt: number;
  private readonly inputAt: number[];
  private readonly detAt: number;
  private readonly det: DeterministicTerms;
  private readonly fillDet: (t: number, out: Float64Array, offset: number) => number;
  private readonly fillDetRows: (t0: number, rows: number, out: Float64Array, stride: number, offset: number) => void;
  private readonly D: number;

  constructor(specIn: StructureSpec) {
    const spec = validateArxSpec(specIn);
    this.spec = spec;
    this.transform = spec.transform;
    this.D = diffOrder(spec);
    const pre = diffPrefix(spec);
    const yName = `${pre}${transformedName(spec.transform, 'y')}`;
    const terms: string[] = ['const'];
    this.arAt = 1;
    for (let i = 1; i <= spec.ar; i++) terms.push(`${yName}[t-${i}]`);
    this.slagAt = -1;
    if (spec.seasonalLag) {
      this.slagAt = terms.length;
      terms.push(`${yName}[t-${spec.season}]`);
    }
    this.inputAt = [];
    for (const inp of spec.inputs) {
      this.inputAt.push(terms.length);
      for (let l = 0; l < inp.lags; l++) {
        const lag = inp.delay + l;
        terms.push(lag === 0 ? `${pre}${inp.name}[t]` : `${pre}${inp.name}[t-${lag}]`);
      }
    }
    this.detAt = terms.length;
    this.det = { intercept: false, trend: spec.trend, harmonics: spec.harmonics, season: spec.season };
    terms.push(...deterministicNames(this.det));
    this.fillDet = deterministicFiller(this.det);
    this.fillDetRows = deterministicRowsFiller(this.det);
    this.terms = terms;
    let hw = spec.ar;
    if (spec.seasonalLag) hw = Math.max(hw, spec.season as number);
    for (const inp of spec.inputs) hw = Math.max(hw, inp.delay + inp.lags - 1);
    this.history = hw + this.D;
    this.key = arxKey(spec);
    this.label = arxLabel(spec);
  }

  /** The scoring-scale target z, its differenced form w and the differenced inputs v. */
  private prepare(series: Series, values: Float64Array, inputs: Float64Array[]): { z: Float64Array; w: Float64Array; v: Float64Array[] } {
    // Only read, never written: the arrays may be shared with other structures (derivedOf).
    const D = this.D;
    const own = this.transform === 'none' && D === 0 ? undefined : derivedOf(values);
    const z =
      this.transform === 'none'
        ? values
        : derived(own as Map<string, Float64Array>, this.transform, () => {
            if (!isStrictlyPositive(values)) {
              throw new ModelError('not-positive', `the log transform needs a strictly positive series; "${series.name}" has values ≤ 0`, {
                expected: 'all values > 0',
                hint: 'use --transform none',
              });
            }
            return forward(this.transform, values);
          });
    const w = D === 0 ? z : derived(own as Map<string, Float64Array>, `${this.transform}:${D}`, () => difference(z, D));
    const v = D === 0 ? inputs : inputs.map((u) => derived(derivedOf(u), `none:${D}`, () => difference(u, D)));
    return { z, w, v };
  }

  private inputsOf(series: Series): Float64Array[] {
    return this.spec.inputs.map((i) => inputValues(series, i.name));
  }

  /**
   * Writes the regressor row of position t (from w and v) into out[o …]. Deterministic terms
   * (trend, harmonics) are evaluated at the absolute time t + `origin`, where `origin` is the
   * number of observations before the series (`series.before.count`), so a model continues on a
   * later window of its series with the same rows it had on the whole series.
   */
  private fillRow(t: number, w: Float64Array, v: Float64Array[], out: Float64Array, o: number, origin: number): void {
    out[o] = 1;
    const ar = this.spec.ar;
    const arAt = o + this.arAt - 1;
    for (let i = 1; i <= ar; i++) out[arAt + i] = w[t - i];
    if (this.slagAt >= 0) out[o + this.slagAt] = w[t - (this.spec.season as number)];
    const inputs = this.spec.inputs;
    for (let j = 0; j < inputs.length; j++) {
      const lags = inputs[j].lags;
      const first = t - inputs[j].delay;
      const vj = v[j];
      const at = o + this.inputAt[j];
      for (let l = 0; l < lags; l++) out[at + l] = vj[first - l];
    }
    this.fillDet(t + origin, out, o + this.detAt);
  }

  /**
   * Writes the rows of positions start … start + rows − 1 into out (row-major, p columns): the
   * values `fillRow` writes, filled column by column.
   */
  private fillRows(start: number, rows: number, w: Float64Array, v: Float64Array[], out: Float64Array, origin: number): void {
    const p = this.terms.length;
    for (let r = 0, o = 0; r < rows; r++, o += p) out[o] = 1;
    for (let i = 1; i <= this.spec.ar; i++) laggedColumn(out, p, this.arAt + i - 1, rows, w, start - i);
    if (this.slagAt >= 0) laggedColumn(out, p, this.slagAt, rows, w, start - (this.spec.season as number));
    const inputs = this.spec.inputs;
    for (let j = 0; j < inputs.length; j++) {
      for (let l = 0; l < inputs[j].lags; l++) laggedColumn(out, p, this.inputAt[j] + l, rows, v[j], start - inputs[j].delay - l);
    }
    if (this.detAt < p) this.fillDetRows(start + origin, rows, out, p, this.detAt);
  }

  regression(series: Series, from: number, to: number): Regression {
    return this.rows(series, from, to, false);
  }

  /**
   * The regression of [from, to); with `scratch`, Φ is written into storage shared by every
   * call (valid until the next such call), for fits that drop Φ before returning.
   */
  private rows(series: Series, from: number, to: number, scratch: boolean): Regression {
    const start = Math.max(from, this.history);
    const end = Math.min(to, series.values.length);
    const rows = Math.max(0, end - start);
    const p = this.terms.length;
    const { w, v } = this.prepare(series, series.values, this.inputsOf(series));
    const origin = series.before?.count ?? 0;
    let data: Float64Array;
    if (scratch) {
      if (sharedRows.length < rows * p) sharedRows = new Float64Array(Math.max(rows * p, 2 * sharedRows.length));
      data = sharedRows.length === rows * p ? sharedRows : sharedRows.subarray(0, rows * p);
    } else {
      data = new Float64Array(rows * p);
    }
    const phi: DesignMatrix = { rows, cols: p, data };
    const index = new Int32Array(rows);
    for (let r = 0; r < rows; r++) index[r] = start + r;
    const y = w.slice(start, start + rows);
    this.fillRows(start, rows, w, v, phi.data, origin);
    return { index, y, phi };
  }

  /**
   * Least squares on the rows of [from, to). The fitted values Φθ̂ are the one-step predictions
   * of w on those rows (the same row values and the same sum as `oneStep`), so they are returned
   * as `oneStep` too, shifted back to z by z_{t−D} when differenced.
   */
  estimate(series: Series, from: number, to: number): Estimate {
    // lstsq keeps no reference to Φ, so Φ may live in the shared rows.
    const reg = this.rows(series, from, to, true);
    if (reg.y.length <= this.terms.length) {
      throw new ModelError('too-short', `${this.label}: ${reg.y.length} rows for ${this.terms.length} coefficients`, {
        expected: `more than ${this.terms.length} rows (series length ≥ ${this.history + this.terms.length + 1})`,
      });
    }
    const fit = lstsq(reg.phi, reg.y, this.terms, { onRankDeficient: 'throw' });
    const start = reg.index[0];
    const rows = reg.y.length;
    let oneStep: Float64Array | undefined;
    if (start === from && to - from === rows) {
      // `fit.fitted` belongs to this call alone: it becomes the predictions in place.
      oneStep = fit.fitted;
      if (this.D > 0) {
        const { z } = this.prepare(series, series.values, this.inputsOf(series));
        for (let r = 0; r < rows; r++) oneStep[r] = z[start + r - this.D] + oneStep[r];
      }
    }
    const est: Estimate = {
      theta: fit.theta,
      se: fit.se,
      cov: fit.cov,
      active: new Array<boolean>(this.terms.length).fill(true),
      sigma2: fit.sigma2,
      rank: fit.rank,
      condition: fit.condition,
      warnings: fit.warnings,
    };
    if (oneStep !== undefined) est.oneStep = oneStep;
    return est;
  }

  oneStep(theta: Float64Array, series: Series, from: number, to: number): Float64Array {
    const { z, w, v } = this.prepare(series, series.values, this.inputsOf(series));
    const n = Math.max(0, to - from);
    const out = new Float64Array(n).fill(NaN);
    const p = this.terms.length;
    const row = new Float64Array(p);
    const origin = series.before?.count ?? 0;
    for (let t = Math.max(from, this.history); t < to; t++) {
      this.fillRow(t, w, v, row, 0, origin);
      let pred = 0;
      for (let j = 0; j < p; j++) pred += row[j] * theta[j];
      out[t - from] = this.D > 0 ? z[t - this.D] + pred : pred;
    }
    return out;
  }

  simulate(theta: Float64Array, series: Series, future: Float64Array[], h: number, shocks?: Float64Array): Float64Array {
    const n = series.values.length;
    if (n < this.history) {
      throw new ModelError('too-short', `${this.label} needs ${this.history} past points to simulate; the series has ${n}`, {
        expected: `at least ${this.history} points`,
      });
    }
    if (future.length !== series.inputs.length) {
      throw new UsageError('future-inputs', `simulation needs future values for ${series.inputs.length} inputs, got ${future.length}`, {
        expected: `${series.inputs.length} arrays of ${h} values`,
      });
    }
    // Extend every used input by its future values (in series order), then difference.
    const inputs = this.spec.inputs.map((spec) => {
      const k = series.inputs.findIndex((i) => i.name === spec.name);
      if (k < 0) inputValues(series, spec.name);
      if (future[k].length < h) {
        throw new UsageError('future-inputs', `input "${spec.name}" has ${future[k].length} future values; the horizon is ${h}`, {
          expected: `${h} future values`,
        });
      }
      const u = new Float64Array(n + h);
      u.set(series.inputs[k].values.subarray(0, n));
      u.set(future[k].subarray(0, h), n);
      return u;
    });
    const z = new Float64Array(n + h);
    z.set(forward(this.transform, checkPositive(this, series)));
    const w = difference(z, this.D);
    const v = inputs.map((u) => difference(u, this.D));
    const p = this.terms.length;
    const row = new Float64Array(p);
    const out = new Float64Array(h);
    const origin = series.before?.count ?? 0;
    for (let t = n; t < n + h; t++) {
      this.fillRow(t, w, v, row, 0, origin);
      let pred = 0;
      for (let j = 0; j < p; j++) pred += row[j] * theta[j];
      if (shocks) pred += shocks[t - n];
      w[t] = pred;
      z[t] = this.D > 0 ? z[t - this.D] + pred : pred;
      out[t - n] = inverse(this.transform, z[t]);
    }
    return out;
  }

  describe(theta: Float64Array, se?: Float64Array): string {
    return linearEquation(`${diffPrefix(this.spec)}${transformedName(this.transform, 'y')}[t]`, this.terms, theta, se);
  }

  /** Dynamic coefficients: the AR lags and the seasonal lag. */
  dynamicMask(): boolean[] {
    return this.terms.map((_, j) => (j >= this.arAt && j < this.arAt + this.spec.ar) || j === this.slagAt);
  }

  /** Coefficients of the AR recursion by lag (index i = lag i+1), the seasonal lag included. */
  arPolynomial(theta: Float64Array): Float64Array {
    const len = Math.max(this.spec.ar, this.spec.seasonalLag ? (this.spec.season as number) : 0);
    const a = new Float64Array(len);
    for (let i = 0; i < this.spec.ar; i++) a[i] = theta[this.arAt + i];
    if (this.slagAt >= 0) a[(this.spec.season as number) - 1] += theta[this.slagAt];
    return a;
  }

  /** True when every characteristic root of the AR recursion lies strictly inside the unit circle (Schur–Cohn test). */
  isStable(theta: Float64Array): boolean {
    return isStableRecursion(this.arPolynomial(theta));
  }

  /**
   * Derived quantities:
   * - `stable` and `spectral radius`: the largest modulus ρ of the characteristic roots of the
   *   AR recursion (roots.ts); stable when ρ < 1.
   * - `half-life`: periods for a disturbance to decay to half under the dominant root,
   *   ln 0.5 / ln ρ (for a first-order system w_t = a w_{t−1}, ln 0.5 / ln a; Hamilton 1994,
   *   "Time Series Analysis", §1.2 on dynamic multipliers a^j).
   * - `oscillation period`: 2π/|arg λ| when the dominant root is complex.
   * - per input, `gain`: the steady-state gain Σ_l b_{j,l} / (1 − Σ_i a_i − γ), the long-run
   *   multiplier of a permanent unit change in u_j (Hamilton 1994, §2.5, eq. 2.5.7); on the ln
   *   scale for log models (relative change of y per unit of u). And `delay` d_j.
   */
  derived(theta: Float64Array, series: Series): Derived[] {
    void series;
    const out: Derived[] = [];
    const a = this.arPolynomial(theta);
    const roots = characteristicRoots(a);
    const rho = roots.length === 0 ? 0 : modulus(roots[0]);
    out.push({ name: 'stable', value: rho < 1, note: 'all characteristic roots of the AR recursion inside the unit circle' });
    out.push({ name: 'spectral radius', value: rho, note: 'largest modulus of the AR characteristic roots' });
    if (roots.length > 0 && rho > 0 && rho < 1) {
      out.push({ name: 'half-life', value: Math.log(0.5) / Math.log(rho), unit: 'periods', note: 'decay to half under the dominant root' });
      const arg = Math.abs(Math.atan2(roots[0].im, roots[0].re));
      if (roots[0].im !== 0 && arg > 0) out.push({ name: 'oscillation period', value: (2 * Math.PI) / arg, unit: 'periods' });
    } else if (roots.length === 0) {
      out.push({ name: 'half-life', value: 'none (no AR dynamics)' });
    }
    let sumA = 0;
    for (let i = 0; i < a.length; i++) sumA += a[i];
    for (let j = 0; j < this.spec.inputs.length; j++) {
      const inp = this.spec.inputs[j];
      let sumB = 0;
      for (let l = 0; l < inp.lags; l++) sumB += theta[this.inputAt[j] + l];
      const unit = this.transform === 'log' ? `ln(y) per unit of ${inp.name}` : `y per unit of ${inp.name}`;
      out.push({
        name: `gain ${inp.name}`,
        value: rho < 1 ? sumB / (1 - sumA) : 'undefined (unstable)',
        unit,
        note: 'steady-state gain: Σ input coefficients / (1 − Σ AR coefficients)',
      });
      out.push({ name: `delay ${inp.name}`, value: inp.delay, unit: 'periods' });
    }
    return out;
  }
}

function checkPositive(s: ArxStructure, series: Series): Float64Array {
  if (s.transform === 'log' && !isStrictlyPositive(series.values)) {
    throw new ModelError('not-positive', `the log transform needs a strictly positive series; "${series.name}" has values ≤ 0`, {
      expected: 'all values > 0',
    });
  }
  return series.values;
}

/** Stable key: `arx|ar2|price:q2d1|slag|trend|K2|diff1|log` (only the parts present). */
export function arxKey(spec: ArxSpec): string {
  const parts = ['arx', `ar${spec.ar}`];
  for (const i of spec.inputs) parts.push(`${i.name}:q${i.lags}d${i.delay}`);
  if (spec.seasonalLag) parts.push(`slag${spec.season}`);
  if (spec.trend) parts.push('trend');
  if (spec.harmonics > 0) parts.push(`K${spec.harmonics}s${spec.season}`);
  if (spec.differencing === 'first') parts.push('diff1');
  if (spec.differencing === 'seasonal') parts.push(`diff${spec.season}`);
  if (spec.transform === 'log') parts.push('log');
  return parts.join('|');
}

function range(n: number): string {
  return n === 1 ? 'lag 1' : `lags 1-${n}`;
}

/** Readable label, e.g. "AR lags 1-2, price lags 0-1 after delay 2, trend, 2 harmonics, log". */
export function arxLabel(spec: ArxSpec): string {
  const parts: string[] = [spec.ar === 0 ? 'no AR lags' : `AR ${range(spec.ar)}`];
  if (spec.seasonalLag) parts.push(`seasonal lag ${spec.season}`);
  for (const i of spec.inputs) {
    const lags = i.lags === 1 ? 'lag 0' : `lags 0-${i.lags - 1}`;
    parts.push(i.delay > 0 ? `${i.name} ${lags} after delay ${i.delay}` : `${i.name} ${lags}`);
  }
  if (spec.trend) parts.push('trend');
  if (spec.harmonics > 0) parts.push(`${spec.harmonics} harmonic${spec.harmonics > 1 ? 's' : ''}`);
  if (spec.differencing === 'first') parts.push('first differences');
  if (spec.differencing === 'seasonal') parts.push(`seasonal differences (${spec.season})`);
  if (spec.transform === 'log') parts.push('log');
  return parts.join(', ');
}

/**
 * The input configurations of the full grid for at most one input, in fixed order: none; then
 * every lag count q = 1…maxInputLags and delay d = 0…maxDelay. With two or more inputs the
 * product of every input's choices is too large to fit, and the family searches it guided
 * instead (arx-inputs.ts).
 */
function inputConfigs(bounds: CandidateBounds): ArxInputSpec[][] {
  const names = bounds.inputs;
  const configs: ArxInputSpec[][] = [[]];
  if (names.length !== 1 || bounds.maxInputLags < 1) return configs;
  for (let q = 1; q <= bounds.maxInputLags; q++) {
    for (let d = 0; d <= bounds.maxDelay; d++) configs.push([{ name: names[0], lags: q, delay: d }]);
  }
  return configs;
}

/**
 * The structures of the ARX grid without inputs ("bases"), in this fixed nesting order
 * (outermost first): transform, differencing, trend (on the log scale the bounds' `logTrend`), seasonal lag, harmonics, AR lags
 * p = 0…maxAr. Combinations that make no sense are left out: seasonal parts without a season,
 * and harmonics with seasonal differencing (which removes any fixed seasonal pattern).
 */
export function arxBases(bounds: CandidateBounds): ArxSpec[] {
  const out: ArxSpec[] = [];
  const s = bounds.season;
  for (const transform of bounds.transforms) {
    for (const differencing of bounds.differencing) {
      if (differencing === 'seasonal' && s === null) continue;
      for (const trend of transform === 'log' ? (bounds.logTrend ?? bounds.trend) : bounds.trend) {
        for (const seasonalLag of bounds.seasonalLag) {
          if (seasonalLag && s === null) continue;
          const Ks = s === null ? [0] : bounds.harmonics.length > 0 ? bounds.harmonics : [0];
          for (const harmonics of Ks) {
            if (harmonics > 0 && differencing === 'seasonal') continue;
            for (let ar = 0; ar <= bounds.maxAr; ar++) {
              out.push({ family: 'arx', ar, inputs: [], trend, harmonics, season: s, seasonalLag, differencing, transform });
            }
          }
        }
      }
    }
  }
  return out;
}

/** True when the bounds leave the input choices to the guided search (two or more inputs). */
function guided(bounds: CandidateBounds): boolean {
  return bounds.inputs.length >= 2 && bounds.maxInputLags >= 1;
}

/**
 * The ARX candidate grid: every base (`arxBases`) with each input configuration of
 * `inputConfigs`, bases outermost. With two or more inputs only the bases without inputs; the
 * input choices are then explored by `arxExplore`.
 */
export function arxCandidates(series: Series, bounds: CandidateBounds): Structure[] {
  void series;
  const configs = inputConfigs(bounds);
  const out: Structure[] = [];
  for (const base of arxBases(bounds)) for (const inputs of configs) out.push(new ArxStructure({ ...base, inputs }));
  return out;
}

/**
 * The longest history of any ARX structure within the bounds: the longest AR or seasonal lag,
 * or the last input lag maxDelay + maxInputLags − 1, plus the differencing order.
 */
export function arxMaxHistory(series: Series, bounds: CandidateBounds): number {
  void series;
  let most = 0;
  for (const base of arxBases(bounds)) {
    let h = base.ar;
    if (base.seasonalLag) h = Math.max(h, base.season as number);
    if (bounds.inputs.length > 0 && bounds.maxInputLags >= 1) h = Math.max(h, bounds.maxDelay + bounds.maxInputLags - 1);
    most = Math.max(most, h + diffOrder(base));
  }
  return most;
}

export const arxFamily: FamilyDefinition = {
  name: 'arx',
  candidates: arxCandidates,
  explore: (series, bounds, scorer) => {
    if (guided(bounds)) exploreInputs(series, bounds, arxBases(bounds), scorer, (spec) => new ArxStructure(spec));
  },
  maxHistory: arxMaxHistory,
  fromSpec: (spec) => new ArxStructure(spec),
  dynamicMask: (structure) => (structure as ArxStructure).dynamicMask(),
  stable: (structure, theta) => (structure as ArxStructure).isStable(theta),
  unstableReason: 'explosive fitted dynamics (a characteristic root on or outside the unit circle)',
};
