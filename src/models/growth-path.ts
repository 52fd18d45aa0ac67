/**
 * The growth-path family: the closed-form solution of a growth law, with the inputs acting on
 * the level and a seasonal factor, fitted as a whole path (an output-error structure) instead
 * of step by step from the last observation.
 *
 * Law: logistic growth dx/dτ = r·x·(1 − x/K), whose solution through the midpoint τ_m (where
 * x = K/2) is x(τ) = K / (1 + e^{−r(τ − τ_m)}) (Verhulst 1838; Pearl & Reed 1920, PNAS
 * 6:275–288). The observation adds to the law's path a seasonal factor and the inputs' effects
 * on the level:
 *
 *   y_t = x(τ_t)·(1 + Σ_{k=1}^{K} (α_k sin(2πkt/s) + β_k cos(2πkt/s))) + Σ_j b_j u_{j,t} + e_t,
 *
 * so b_j is the input's gain: a unit more of u_j moves y by b_j at once and for as long as it
 * lasts, with no dynamics of its own, while the law carries the saturation. This is the
 * structure to tell a subsidy's effect from the growth it happens to coincide with: an ARX
 * equation has to share its poles between the growth and the input, which then inherits the
 * growth's slow response and a gain several times too large. The seasonal factor multiplies the
 * path (a seasonal pattern growing with the level); harmonics as in terms.ts. τ_t = (t + c)·dt
 * with c the observations before the series (`series.before`) and dt the sampling interval.
 *
 * Because every prediction comes from the path, not from the last observation, the one-step
 * prediction is the path itself: the errors e_t are what the law and the inputs leave unexplained
 * (output error; Ljung, "System Identification", 2nd ed. 1999, §4.2, output-error model
 * structure). On data whose disturbances persist the equation-error families win the ranking;
 * on data that scatter around a law, this one does.
 *
 * Estimation: nonlinear least squares in θ = (K, r, τ_m, α, β, b). Start: for a grid of
 * (r, τ_m) the remaining coefficients enter linearly (K and K·α, K·β, b), so each grid point is
 * one least-squares fit (separable least squares, Golub & Pereyra, SIAM J. Numer. Anal. 10(2),
 * 1973), screened without the seasonal factor and the best few refitted with it; then Levenberg–Marquardt on all of θ with the analytic Jacobian and Marquardt's
 * diagonal scaling (Marquardt, J. SIAM 11(2), 1963), the damped step solved as the least-squares
 * problem [J; √λ·D]δ ≈ [e; 0]. The covariance is σ̂²(JᵀJ)⁻¹ at the optimum (Seber & Wild,
 * "Nonlinear Regression", 1989, §2.1 — section from memory). The structure is `linearized`:
 * its regression rows are the Gauss–Newton rows (Jacobian, targets y − ŷ + Jθ).
 *
 * Offered (by `pathCandidates`) on series with inputs only, on the original scale, with every
 * allowed number of harmonic pairs; a series without inputs keeps the ODE family's laws.
 */
import { ModelError, UsageError } from '../data/errors.js';
import { periodsPerYear } from '../data/calendar.js';
import type { Series } from '../data/series.js';
import { lstsq } from '../linalg/lstsq.js';
import { tryQr } from '../linalg/qr.js';
import { zeros, type DesignMatrix } from '../linalg/matrix.js';
import { formatCoefficient } from './equation.js';
import { dateAt } from './ode-derived.js';
import { samplingInterval } from './ode.js';
import type { CandidateBounds, FamilyDefinition } from './registry.js';
import type { Derived, Estimate, Regression, Structure, StructureSpec, Transform } from './structure.js';
import { deterministicFiller, deterministicNames, maxHarmonics, specFieldError } from './terms.js';

export interface PathSpec extends StructureSpec {
  family: 'path';
  /** The growth law whose solution is the path. */
  law: 'logistic';
  /** Inputs acting on the level (gain b_j each), in series order. */
  inputs: string[];
  /** Harmonic pairs of the seasonal factor (0 = none). */
  harmonics: number;
  /** Season length s (needed when harmonics > 0). */
  season: number | null;
  /** Sampling interval in base periods; null = read from the time stamps. */
  dt: number | null;
  /** Base periods per year, for per-year rates; null = unknown. */
  periodsPerYear: number | null;
}

/** Checks a spec (from the grid or a saved file); UsageError naming the bad field. */
export function validatePathSpec(spec: StructureSpec): PathSpec {
  const s = spec as Partial<PathSpec>;
  const bad = specFieldError(spec, 'bad-path-spec', 'growth-path');
  if (s.family !== 'path') bad('family', '"path"');
  if (s.law !== 'logistic') bad('law', '"logistic"');
  if (!Array.isArray(s.inputs) || !s.inputs.every((i) => typeof i === 'string' && i.length > 0)) bad('inputs', 'a list of input names');
  if (!Number.isInteger(s.harmonics) || (s.harmonics as number) < 0) bad('harmonics', 'a whole number ≥ 0');
  if (s.season !== null && !(Number.isInteger(s.season) && (s.season as number) >= 2)) bad('season', 'null or a whole number ≥ 2');
  if ((s.harmonics as number) > 0 && (s.season === null || (s.harmonics as number) > maxHarmonics(s.season as number))) {
    bad('harmonics', 'at most ⌊s/2⌋ pairs, with a season');
  }
  if (s.dt !== null && !(typeof s.dt === 'number' && s.dt > 0)) bad('dt', 'null or a number > 0');
  if (s.periodsPerYear !== null && !(typeof s.periodsPerYear === 'number' && s.periodsPerYear > 0)) bad('periodsPerYear', 'null or a number > 0');
  return {
    family: 'path',
    law: 'logistic',
    inputs: [...(s.inputs as string[])],
    harmonics: s.harmonics as number,
    season: s.season ?? null,
    dt: s.dt ?? null,
    periodsPerYear: s.periodsPerYear ?? null,
  };
}

/** Grid of the start (module comment): rates r·T and midpoints as fractions of the span T. */
const RATE_GRID = [2, 4, 8, 16, 32];
const MIDPOINT_GRID = [-0.25, 0, 0.25, 0.5, 0.75, 1, 1.25];
/**
 * The screening of the start grid (`PathStructure.start`) of the last sample seen: it depends
 * only on the data, the sample and the inputs, not on the number of harmonics, so the
 * candidates of one search that differ only there share it. Kept with copies of the data it was
 * made from and used only while they are unchanged (arrays may be edited in place).
 */
let lastScreening: { y: Float64Array; u: Float64Array[]; key: string; fits: { rss: number; theta: Float64Array }[] } | null = null;

function screening(y: Float64Array, t0: number, origin: number, dt: number, u: Float64Array[], make: () => { rss: number; theta: Float64Array }[]): { rss: number; theta: Float64Array }[] {
  const key = `${t0}:${y.length}:${origin}:${dt}`;
  const same = (a: ArrayLike<number>, b: ArrayLike<number>) => a.length === b.length && Array.prototype.every.call(a, (v: number, i: number) => v === b[i]);
  const last = lastScreening;
  if (last !== null && last.key === key && same(last.y, y) && last.u.length === u.length && last.u.every((c, j) => same(c, u[j]))) {
    return last.fits.map((f) => ({ rss: f.rss, theta: f.theta.slice() }));
  }
  const fits = make();
  lastScreening = { y: y.slice(), u: u.map((c) => c.slice()), key, fits: fits.map((f) => ({ rss: f.rss, theta: f.theta.slice() })) };
  return fits;
}

/** Grid points of the screening fitted with the seasonal factor (`start`). */
const SCREENED = 3;
/** Most tenfold increases of the damping λ within one Levenberg–Marquardt step. */
const MAX_DAMPING = 8;
/**
 * Levenberg–Marquardt: most steps, and the relative fall of the RSS that ends it (1e-7 of the
 * RSS moves the log-likelihood by n·1e-7/2, far below any difference the criteria can see).
 */
const MAX_STEPS = 50;
const TOLERANCE = 1e-7;

/** Where each part of θ sits: K, r, τ_m at 0, 1, 2, then harmonics, then input gains. */
const AT_K = 0;
const AT_R = 1;
const AT_MID = 2;
const AT_SEASON = 3;

export class PathStructure implements Structure {
  readonly family = 'path';
  readonly spec: PathSpec;
  readonly key: string;
  readonly label: string;
  readonly terms: string[];
  readonly history = 0;
  readonly transform: Transform = 'none';
  readonly linearized = true;
  private readonly nh: number;
  private readonly fillSeason: (t: number, out: Float64Array, offset: number) => number;

  constructor(specIn: StructureSpec) {
    const spec = validatePathSpec(specIn);
    this.spec = spec;
    const det = { intercept: false, trend: false, harmonics: spec.harmonics, season: spec.season };
    const seasonal = deterministicNames(det);
    this.nh = seasonal.length;
    this.fillSeason = deterministicFiller(det);
    this.terms = ['K', 'r', 't_mid', ...seasonal, ...spec.inputs];
    const parts = [`path:${spec.law}`];
    if (spec.inputs.length > 0) parts.push(`lvl(${spec.inputs.join(',')})`);
    if (spec.harmonics > 0) parts.push(`h${spec.harmonics}`);
    this.key = parts.join(':');
    const extra: string[] = [];
    if (spec.inputs.length > 0) extra.push(`level effect${spec.inputs.length > 1 ? 's' : ''} of ${spec.inputs.join(', ')}`);
    if (spec.harmonics > 0) extra.push(`${spec.harmonics} seasonal harmonic${spec.harmonics > 1 ? 's' : ''}`);
    this.label = ['logistic growth path', ...extra].join(', ');
  }

  private dt(series: Series): number {
    return this.spec.dt ?? samplingInterval(series);
  }

  private columns(series: Series): Float64Array[] {
    return this.spec.inputs.map((name) => {
      const input = series.inputs.find((u) => u.name === name);
      if (!input) {
        throw new UsageError('unknown-input', `the growth path uses input "${name}", which series "${series.name}" does not have`, {
          found: name,
          expected: series.inputs.length > 0 ? `one of ${series.inputs.map((u) => u.name).join(', ')}` : 'a series with inputs',
          hint: 'load the data with the same input columns the model was built with',
        });
      }
      return input.values;
    });
  }

  /**
   * ŷ_t for t = t0 … t0 + rows − 1 with inputs `u` (indexed like t), and, when `jac` is given,
   * the Jacobian ∂ŷ_t/∂θ into its rows.
   */
  private predict(theta: ArrayLike<number>, t0: number, rows: number, origin: number, dt: number, u: ArrayLike<number>[], out: Float64Array, jac?: DesignMatrix): void {
    const K = theta[AT_K];
    const r = theta[AT_R];
    const mid = theta[AT_MID];
    const nh = this.nh;
    const ni = u.length;
    const h = new Float64Array(nh);
    const p = this.terms.length;
    for (let i = 0; i < rows; i++) {
      const t = t0 + i;
      const tau = (origin + t) * dt;
      const g = 1 / (1 + Math.exp(-r * (tau - mid)));
      this.fillSeason(origin + t, h, 0);
      let season = 1;
      for (let k = 0; k < nh; k++) season += theta[AT_SEASON + k] * h[k];
      let y = K * g * season;
      for (let j = 0; j < ni; j++) y += theta[AT_SEASON + nh + j] * u[j][t];
      out[i] = y;
      if (jac) {
        const o = i * p;
        const slope = K * season * g * (1 - g);
        jac.data[o + AT_K] = g * season;
        jac.data[o + AT_R] = slope * (tau - mid);
        jac.data[o + AT_MID] = -slope * r;
        for (let k = 0; k < nh; k++) jac.data[o + AT_SEASON + k] = K * g * h[k];
        for (let j = 0; j < ni; j++) jac.data[o + AT_SEASON + nh + j] = u[j][t];
      }
    }
  }

  regression(series: Series, from: number, to: number, at?: Float64Array): Regression {
    const lo = Math.max(from, 0);
    const hi = Math.min(to, series.values.length);
    const rows = Math.max(0, hi - lo);
    const p = this.terms.length;
    const theta = at ?? new Float64Array(p);
    const phi = zeros(rows, p);
    const y = new Float64Array(rows);
    this.predict(theta, lo, rows, series.before?.count ?? 0, this.dt(series), this.columns(series), y, phi);
    const index = new Int32Array(rows);
    for (let i = 0; i < rows; i++) {
      index[i] = lo + i;
      // Gauss–Newton target y − ŷ(θ) + J·θ.
      let jt = 0;
      for (let j = 0; j < p; j++) jt += phi.data[i * p + j] * theta[j];
      y[i] = series.values[lo + i] - y[i] + jt;
    }
    return { index, y, phi };
  }

  estimate(series: Series, from: number, to: number): Estimate {
    const lo = Math.max(from, 0);
    const hi = Math.min(to, series.values.length);
    const rows = hi - lo;
    const p = this.terms.length;
    if (rows < p + 2) {
      throw new ModelError('too-short', `${this.label}: ${rows} rows for ${p} coefficients`, { expected: `at least ${p + 2} rows` });
    }
    const dt = this.dt(series);
    const origin = series.before?.count ?? 0;
    const u = this.columns(series);
    const y = series.values.subarray(lo, hi);
    let theta = this.start(y, lo, rows, origin, dt, u);
    const first = (origin + lo) * dt;
    const span = Math.max(1, rows - 1) * dt;
    const yhat = new Float64Array(rows);
    const jac = zeros(rows, p);
    const rssOf = (th: Float64Array) => {
      this.predict(th, lo, rows, origin, dt, u, yhat);
      let s = 0;
      for (let i = 0; i < rows; i++) s += (y[i] - yhat[i]) ** 2;
      return s;
    };
    let rss = rssOf(theta);
    let lambda = 1e-3;
    const e = new Float64Array(rows + p);
    const aug = zeros(rows + p, p);
    const storage = new Float64Array((rows + p) * (p + 1));
    const delta = new Float64Array(p);
    const norms = new Float64Array(p);
    for (let step = 0; step < MAX_STEPS && Number.isFinite(rss); step++) {
      this.predict(theta, lo, rows, origin, dt, u, yhat, jac);
      // [J; √λ·D] δ ≈ [e; 0], D the column norms of J (Marquardt's scaling).
      aug.data.set(jac.data);
      norms.fill(0);
      for (let i = 0; i < rows; i++) for (let j = 0; j < p; j++) norms[j] += jac.data[i * p + j] ** 2;
      let improved = false;
      for (let tries = 0; tries < MAX_DAMPING; tries++) {
        for (let i = 0; i < rows; i++) e[i] = y[i] - yhat[i];
        for (let j = 0; j < p; j++) {
          aug.data.fill(0, (rows + j) * p, (rows + j + 1) * p);
          aug.data[(rows + j) * p + j] = Math.sqrt(lambda * Math.max(norms[j], 1e-300));
          e[rows + j] = 0;
        }
        const f = tryQr(aug, {}, storage, e);
        if (f === undefined) break;
        f.solveTransformedInto(e, delta);
        const trial = theta.map((v, j) => v + delta[j]);
        const trialRss = rssOf(trial);
        if (trialRss < rss) {
          if (Math.abs(trial[AT_MID] - (first + span / 2)) > 1.5 * span) {
            throw new ModelError('not-identified', `${this.label}: the path is flat over the sample (its midpoint moves more than a sample length outside it)`, {
              expected: 'growth or decline within reach of the sample',
            });
          }
          const done = rss - trialRss <= TOLERANCE * rss;
          theta = trial;
          rss = trialRss;
          lambda = Math.max(lambda / 10, 1e-12);
          improved = !done;
          break;
        }
        lambda *= 10;
      }
      if (!improved) break;
    }
    if (!Number.isFinite(rss)) throw new ModelError('no-fit', `${this.label}: the path could not be fitted (non-finite residuals)`, { expected: 'a finite fit' });
    // The covariance from the Gauss–Newton rows at the optimum (one last step, of the size of
    // the rounding).
    const reg = this.regression(series, lo, hi, theta);
    const fit = lstsq(reg.phi, reg.y, this.terms, { onRankDeficient: 'throw' });
    const oneStep = new Float64Array(rows);
    this.predict(fit.theta, lo, rows, origin, dt, u, oneStep);
    const est: Estimate = {
      theta: fit.theta,
      se: fit.se,
      cov: fit.cov,
      active: new Array<boolean>(p).fill(true),
      sigma2: fit.sigma2,
      rank: fit.rank,
      condition: fit.condition,
      warnings: fit.warnings,
    };
    if (lo === from && hi === to) est.oneStep = oneStep;
    return est;
  }

  /**
   * The start of the fit (module comment): every grid point is screened with the path and the
   * inputs alone (no seasonal factor, the cheapest separable fit), and the `SCREENED` best are
   * fitted with the seasonal factor too; the best of those starts Levenberg–Marquardt.
   */
  private start(y: Float64Array, t0: number, rows: number, origin: number, dt: number, u: Float64Array[]): Float64Array {
    const span = Math.max(1, rows - 1) * dt;
    const first = (origin + t0) * dt;
    let yy = 0;
    for (let i = 0; i < rows; i++) yy += y[i] * y[i];
    const screened = screening(y, t0, origin, dt, u, () => {
      const fits: { rss: number; theta: Float64Array }[] = [];
      for (const rate of RATE_GRID) {
        for (const at of MIDPOINT_GRID) {
          const fit = this.separableFit(y, yy, t0, rows, origin, dt, u, rate / span, first + at * span, false);
          if (fit !== null) fits.push(fit);
        }
      }
      return fits.sort((a, b) => a.rss - b.rss);
    });
    // The screened points carry only their rate and midpoint over (their θ may come from a
    // candidate with another number of harmonics).
    let best: { rss: number; theta: Float64Array } | null = null;
    for (const s of screened.slice(0, SCREENED)) {
      const fit = this.separableFit(y, yy, t0, rows, origin, dt, u, s.theta[AT_R], s.theta[AT_MID], this.nh > 0);
      if (fit !== null && (best === null || fit.rss < best.rss)) best = fit;
    }
    if (best === null) {
      throw new ModelError('rank-deficient', `${this.label}: no start of the fit separates the path from the inputs`, {
        expected: 'inputs that vary differently from a logistic curve',
      });
    }
    return best.theta;
  }

  /**
   * The least-squares fit of the coefficients that enter linearly (K, K·α, K·β, b) for a fixed
   * rate and midpoint, with or without the seasonal factor; null when they cannot be told apart.
   * The residual sum of squares is ‖y‖² − ‖(Qᵀy)[0:q]‖² (Golub & Van Loan 2013, §5.3.3).
   */
  private separableFit(
    y: Float64Array,
    yy: number,
    t0: number,
    rows: number,
    origin: number,
    dt: number,
    u: Float64Array[],
    r: number,
    mid: number,
    seasonal: boolean,
  ): { rss: number; theta: Float64Array } | null {
    const nh = seasonal ? this.nh : 0;
    const q = 1 + nh + u.length;
    const m = zeros(rows, q);
    const h = new Float64Array(this.nh);
    for (let i = 0; i < rows; i++) {
      const t = t0 + i;
      const g = 1 / (1 + Math.exp(-r * ((origin + t) * dt - mid)));
      const o = i * q;
      m.data[o] = g;
      if (nh > 0) {
        this.fillSeason(origin + t, h, 0);
        for (let k = 0; k < nh; k++) m.data[o + 1 + k] = g * h[k];
      }
      for (let j = 0; j < u.length; j++) m.data[o + 1 + nh + j] = u[j][t];
    }
    const c = y.slice();
    const f = tryQr(m, {}, undefined, c);
    if (f === undefined || f.rank < q) return null;
    let fitted = 0;
    for (let k = 0; k < q; k++) fitted += c[k] * c[k];
    const lin = new Float64Array(q);
    f.solveTransformedInto(c, lin);
    if (!(lin[0] !== 0) || !lin.every(Number.isFinite)) return null;
    const theta = new Float64Array(this.terms.length);
    theta[AT_K] = lin[0];
    theta[AT_R] = r;
    theta[AT_MID] = mid;
    for (let k = 0; k < nh; k++) theta[AT_SEASON + k] = lin[1 + k] / lin[0];
    for (let j = 0; j < u.length; j++) theta[AT_SEASON + this.nh + j] = lin[1 + nh + j];
    return { rss: yy - fitted, theta };
  }

  oneStep(theta: Float64Array, series: Series, from: number, to: number): Float64Array {
    const lo = Math.max(from, 0);
    const out = new Float64Array(Math.max(0, to - from)).fill(NaN);
    const hi = Math.min(to, series.values.length);
    const part = new Float64Array(Math.max(0, hi - lo));
    this.predict(theta, lo, hi - lo, series.before?.count ?? 0, this.dt(series), this.columns(series), part);
    out.set(part, lo - from);
    return out;
  }

  simulate(theta: Float64Array, series: Series, future: Float64Array[], h: number, shocks?: Float64Array): Float64Array {
    const n = series.values.length;
    const u = this.spec.inputs.map((name) => {
      const k = series.inputs.findIndex((i) => i.name === name);
      if (k < 0) this.columns(series);
      if (!future[k] || future[k].length < h) {
        throw new UsageError('future-inputs', `input "${name}" has ${future[k]?.length ?? 0} future values; the horizon is ${h}`, { expected: `${h} future values` });
      }
      // Indexed like t: future value j at position n + j.
      const ext = new Float64Array(n + h);
      ext.set(future[k].subarray(0, h), n);
      return ext;
    });
    const out = new Float64Array(h);
    this.predict(theta, n, h, series.before?.count ?? 0, this.dt(series), u, out);
    if (shocks) for (let j = 0; j < h; j++) out[j] += shocks[j];
    return out;
  }

  describe(theta: Float64Array, se?: Float64Array): string {
    const c = (j: number) => formatCoefficient(Math.abs(theta[j])) + (se ? ` (±${formatCoefficient(se[j])})` : '');
    const sign = (j: number, first = false) => (theta[j] < 0 ? (first ? '−' : '− ') : first ? '' : '+ ');
    const season = this.terms.slice(AT_SEASON, AT_SEASON + this.nh).map((name, k) => `${sign(AT_SEASON + k)}${c(AT_SEASON + k)}·${name}`);
    const factor = season.length > 0 ? `·(1 ${season.join(' ')})` : '';
    const mid = `${theta[AT_MID] < 0 ? '+' : '−'} ${c(AT_MID)}`;
    const law = `${sign(AT_K, true)}${c(AT_K)}/(1 + exp(${theta[AT_R] < 0 ? '' : '−'}${c(AT_R)}·(t ${mid})))${factor}`;
    const inputs = this.spec.inputs.map((name, j) => ` ${sign(AT_SEASON + this.nh + j)}${c(AT_SEASON + this.nh + j)}·${name}[t]`).join('');
    return `y[t] = ${law}${inputs} + e[t]`;
  }

  /**
   * Capacity K, rate r (per period and per year), the midpoint date, the share of K the path
   * has reached at the last observation, and per input its gain b_j (delay 0: the effect is
   * immediate).
   */
  derived(theta: Float64Array, series: Series): Derived[] {
    const dt = this.dt(series);
    const K = theta[AT_K];
    const r = theta[AT_R];
    const origin = series.before?.count ?? 0;
    const out: Derived[] = [
      { name: 'capacity K', value: K, note: 'level the path saturates at, inputs at zero and the seasonal factor at 1' },
      { name: 'rate r', value: r, unit: 'per period' },
    ];
    if (this.spec.periodsPerYear !== null) out.push({ name: 'rate r per year', value: r * this.spec.periodsPerYear, unit: 'per year' });
    const at = dateAt(series, theta[AT_MID] / dt - origin);
    if (at) out.push({ name: 'midpoint', value: at.label, note: `decimal year ${at.decimal.toFixed(1)}; where the path is at K/2` });
    const n = series.values.length;
    const tau = (origin + n - 1) * dt;
    out.push({ name: 'share of capacity reached', value: 1 / (1 + Math.exp(-r * (tau - theta[AT_MID]))), note: 'path at the last observation / K' });
    out.push({ name: 'stable', value: r > 0 && K > 0, note: 'the path saturates at K (r > 0, K > 0)' });
    this.spec.inputs.forEach((name, j) => {
      out.push({
        name: `gain ${name}`,
        value: theta[AT_SEASON + this.nh + j],
        unit: `y per unit of ${name}`,
        note: 'level effect: immediate and steady-state change of y per unit of the input',
      });
      out.push({ name: `delay ${name}`, value: 0, unit: 'periods' });
    });
    return out;
  }
}

/**
 * The growth-path candidates: on a series with inputs the search may use, equally spaced and
 * scored on the original scale, the logistic path with every input acting on the level, for
 * each allowed number of harmonic pairs of the seasonal factor (enough rows for its terms).
 */
export function pathCandidates(series: Series, bounds: CandidateBounds): Structure[] {
  if (bounds.inputs.length === 0 || bounds.maxInputLags < 1 || !bounds.transforms.includes('none')) return [];
  let dt: number;
  try {
    dt = samplingInterval(series);
  } catch (e) {
    if (e instanceof ModelError) return [];
    throw e;
  }
  const harmonics = bounds.season !== null && bounds.harmonics.length > 0 ? bounds.harmonics : [0];
  const out: Structure[] = [];
  for (const k of harmonics) {
    const s = new PathStructure({
      family: 'path',
      law: 'logistic',
      inputs: [...bounds.inputs],
      harmonics: k,
      season: k > 0 ? bounds.season : null,
      dt,
      periodsPerYear: periodsPerYear(series.frequency),
    });
    if (series.values.length >= s.terms.length + 3) out.push(s);
  }
  return out;
}

export const pathFamily: FamilyDefinition = {
  name: 'path',
  candidates: pathCandidates,
  fromSpec: (spec) => new PathStructure(spec),
};
