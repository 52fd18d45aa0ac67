/**
 * The polynomial ODE family: dx/dτ = (1 + Σ_j β_j w_j)·Σ_p c_p x^p + Σ_j c_j u_j + H(τ), a
 * first-order ODE over a library of terms:
 *   - powers of the state x^p for chosen p ∈ {0, 1, 2, 3} (p = 0 is the constant term `1`);
 *   - inputs u_j entering linearly, as a forcing of the rate of change (term named after the
 *     input);
 *   - inputs w_j scaling the law itself, the mapping function of the generalized Bass model
 *     x(t) = 1 + Σ β_j w_j(t) (Bass, Krishnan & Jain, "Why the Bass model fits without decision
 *     variables", Marketing Science 13(3), 1994, 203–223: f(t)/(1 − F(t)) = (p + q·F(t))·x(t)):
 *     a price or subsidy that speeds up or slows down adoption without changing the market it
 *     saturates at (terms `β(name)`; absent in older specs, which read as none);
 *   - seasonal harmonic pairs sin(2π·k·τ/s), cos(2π·k·τ/s) (terms.ts conventions, except the
 *     sine is kept at k = s/2: `odeHarmonics`).
 * Without rate inputs the right-hand side is linear in θ; with them it is bilinear in (c, β).
 *
 * The state x is either the series level (x_t = y_t, term names `y`, `y^2`, ...) or its
 * cumulative sum (x_t = X_0 + Σ_{s≤t} y_s, names `X`, `X^2`, ...), so per-period sales become the
 * increments of cumulative adoption. Bass diffusion is the quadratic case of the cumulative state:
 *   dX/dτ = p(m − X) + (q/m)·X(m − X) = p·m + (q − p)·X − (q/m)·X²   (Bass 1969, Management
 *   Science 15(5):215–227, eq. for the hazard p + (q/m)·X).
 * Logistic growth is the quadratic case of the level state without constant,
 *   dy/dτ = r·y − (r/K)·y²   (Verhulst 1838; Pearl & Reed 1920, PNAS 6:275–288).
 *
 * Time. τ is measured in base periods of the series frequency (years for yearly data, months for
 * monthly). Consecutive observations are `dt` base periods apart: by default dt is read from the
 * time stamps (periodsBetween of consecutive stamps, which must all agree), so a yearly series
 * sampled every ten years (decennial census) has dt = 10 and θ is per year; a regular series has
 * dt = 1. A spec may fix dt explicitly. `periodsPerYear` (from the frequency) converts rates to
 * per-year figures in `describe` and `derived`. The level y_t sits at τ_t = t·dt; the cumulative
 * state X_t (after period t's increment) sits at the end of period t, τ_t = (t + 1)·dt, so the
 * launch of a diffusion with X_0 = 0 is at τ = 0, the start of the first period.
 *
 * Estimation (integral form, trapezoid rule). Integrating the ODE over one sampling interval
 * and approximating the integral by the trapezoid rule gives one regression row per t ≥ 1:
 *   x_t − x_{t−1} = Σ_k θ_k · (dt/2)·(φ_k(τ_{t−1}, x_{t−1}, u_{t−1}) + φ_k(τ_t, x_t, u_t)),
 * so `Regression.y` holds the increments and Φ the trapezoid-integrated library terms; the
 * seasonal harmonics, known functions of time, enter by their exact integrals over the interval
 * instead (which is what lets the half-season term of an even season be fitted at all:
 * `odeHarmonics`). The
 * integral form avoids differentiating noisy data (Dattner & Klaassen 2015, Electronic Journal
 * of Statistics 9:1939–1973 — volume and pages from memory — integral estimators for ODEs
 * linear in parameters). It is solved by
 * least squares, or by sequential thresholded least squares when `selection: 'sparse'`. With
 * rate inputs the same trapezoid residuals are minimised by Gauss–Newton from the fit with
 * β = 0 (dense only): the model is linear in c for fixed β and in β for fixed c, so each step is
 * one least-squares fit of the rows linearised at the current θ (`regression(…, at)`), halved
 * while it does not lower the residual sum of squares (Seber & Wild, "Nonlinear Regression",
 * 1989, §14.2.1, step halving — section from memory).
 *
 * Prediction. Inputs are linearly interpolated within a sampling interval (the same assumption
 * the trapezoid rule makes). `oneStep` integrates the fitted ODE from the observed x_{t−1} over
 * one interval by classical RK4 (rk4.ts, its polynomial-plus-forcing form) with `substeps`
 * equal steps; for the cumulative state the prediction of y_t is X̂_t − X_{t−1}. `simulate` repeats this from the last observation,
 * adding each step's shock to the one-step prediction on the scoring scale.
 *
 * Scoring scale: 'none' (z = y) or 'log' (z = ln y, for strictly positive series); the
 * regression is always on the untransformed state, only predictions and shocks use z.
 */
import { z } from 'zod';
import { periodsBetween, periodsPerYear } from '../data/calendar.js';
import { ModelError, UsageError } from '../data/errors.js';
import type { Series } from '../data/series.js';
import { lstsq } from '../linalg/lstsq.js';
import { zeros } from '../linalg/matrix.js';
import { sparseRegression } from '../linalg/sparse.js';
import { odeDerived, odeSummary } from './ode-derived.js';
import { equilibria, polyValue } from './ode-roots.js';
import type { CandidateBounds, FamilyDefinition, StateAt } from './registry.js';
import { rk4Polynomial, rk4ScaledPolynomial } from './rk4.js';
import type { Derived, Estimate, Regression, Structure, StructureSpec, Transform } from './structure.js';
import { maxHarmonics } from './terms.js';
import { isStrictlyPositive } from './transforms.js';

export type OdeState = 'level' | 'cumulative';
export type OdeSelection = 'sparse' | 'dense';

/** The saved form of a polynomial ODE structure (all fields explicit). */
export interface OdeSpec extends StructureSpec {
  family: 'ode';
  state: OdeState;
  /** Powers of the state in the library, ascending, distinct, each in 0…3 (0 = constant term). */
  powers: number[];
  /** Names of the inputs entering linearly, in series order. */
  inputs: string[];
  /** Names of the inputs scaling the law (1 + Σ β_j w_j), in series order; absent = none. */
  rateInputs?: string[];
  /** Number of seasonal harmonic pairs (0 = none). */
  harmonics: number;
  /** Season length in base periods (needed when harmonics > 0). */
  season: number | null;
  transform: Transform;
  /** Sampling interval in base periods; null = read from the series' time stamps. */
  dt: number | null;
  /** Base periods per year, for per-year rates in descriptions; null = unknown (index series). */
  periodsPerYear: number | null;
  /** RK4 steps per sampling interval (raised automatically for fast dynamics, see `substeps()`). */
  substeps: number;
  /** Dense least squares, or sequential thresholded least squares on the library. */
  selection: OdeSelection;
  /**
   * Cumulative state before the first observation (X before period 0); 0 = the series starts at
   * launch. It cannot be estimated: a quadratic in X is also a quadratic in X − X_0, so with the
   * wrong X_0 the fit is the same but m, p and q describe a diffusion launched at the series start.
   */
  initialCumulative: number;
}

/** Options of `odeStructure`: `powers` is required; defaults as in the comments. */
export interface OdeOptions {
  powers: number[];
  /** Default 'level'. */
  state?: OdeState;
  /** Default none. */
  inputs?: string[];
  /** Default none. */
  rateInputs?: string[];
  /** Default 0. */
  harmonics?: number;
  /** Default null. */
  season?: number | null;
  /** Default 'none'. */
  transform?: Transform;
  /** Default null (from the time stamps). */
  dt?: number | null;
  /** Default null (rates per period only). */
  periodsPerYear?: number | null;
  /** Default 8. */
  substeps?: number;
  /** Default 'dense'. */
  selection?: OdeSelection;
  /** Default 0. */
  initialCumulative?: number;
}

const DEFAULT_SUBSTEPS = 8;
/** Most Gauss–Newton steps of a fit with rate inputs (a bound; fits converge in a handful). */
const MAX_GAUSS_NEWTON = 30;

const specSchema = z.object({
  family: z.literal('ode'),
  state: z.enum(['level', 'cumulative']),
  powers: z.array(z.number().int().min(0).max(3)).min(1),
  inputs: z.array(z.string().min(1)),
  rateInputs: z.array(z.string().min(1)).optional(),
  harmonics: z.number().int().min(0),
  season: z.number().min(2).refine((v) => Number.isInteger(4 * v), 'a whole number of quarter periods').nullable(),
  transform: z.enum(['none', 'log']),
  dt: z.number().positive().nullable(),
  periodsPerYear: z.number().positive().nullable(),
  substeps: z.number().int().min(1).max(1000),
  selection: z.enum(['sparse', 'dense']),
  initialCumulative: z.number().finite(),
});

/** Completes and checks options into a spec; UsageError naming the bad field otherwise. */
export function odeSpec(options: OdeOptions): OdeSpec {
  const spec = {
    family: 'ode' as const,
    state: options.state ?? 'level',
    powers: [...new Set(options.powers)].sort((a, b) => a - b),
    inputs: [...(options.inputs ?? [])],
    ...(options.rateInputs !== undefined && options.rateInputs.length > 0 ? { rateInputs: [...options.rateInputs] } : {}),
    harmonics: options.harmonics ?? 0,
    season: options.season ?? null,
    transform: options.transform ?? 'none',
    dt: options.dt ?? null,
    periodsPerYear: options.periodsPerYear ?? null,
    substeps: options.substeps ?? DEFAULT_SUBSTEPS,
    selection: options.selection ?? 'dense',
    initialCumulative: options.initialCumulative ?? 0,
  };
  return checkSpec(spec);
}

function checkSpec(raw: unknown): OdeSpec {
  const parsed = specSchema.safeParse(raw);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new UsageError('bad-ode-spec', `invalid ODE structure spec: ${issue.path.join('.') || 'spec'}: ${issue.message}`, {
      found: JSON.stringify(raw),
      expected: 'state level|cumulative, powers in 0…3, harmonics ≥ 0 with a season, dt > 0 or null',
    });
  }
  const spec = parsed.data as OdeSpec;
  if (new Set(spec.powers).size !== spec.powers.length || spec.powers.some((p, i) => i > 0 && p <= spec.powers[i - 1])) {
    throw new UsageError('bad-ode-spec', 'ODE powers must be ascending and distinct', { found: JSON.stringify(spec.powers) });
  }
  if (spec.rateInputs !== undefined && spec.rateInputs.length > 0 && spec.selection !== 'dense') {
    throw new UsageError('bad-ode-spec', 'inputs scaling the law need dense estimation', { found: `selection ${spec.selection}`, expected: 'selection dense' });
  }
  if (spec.rateInputs !== undefined && spec.rateInputs.length === 0) delete spec.rateInputs;
  if (spec.harmonics > 0 && (spec.season === null || spec.harmonics > maxHarmonics(spec.season))) {
    throw new UsageError('bad-ode-spec', 'seasonal harmonics need a season length s with harmonics ≤ s/2', {
      found: `harmonics ${spec.harmonics}, season ${spec.season}`,
    });
  }
  return spec;
}

/** Rebuilds an ODE structure from its saved spec (checked). */
export function odeFromSpec(spec: StructureSpec): Structure {
  return new OdeStructure(checkSpec(spec));
}

/** An ODE structure from options (see OdeSpec for fields and defaults). */
export function odeStructure(options: OdeOptions): Structure {
  return new OdeStructure(odeSpec(options));
}

/**
 * The seasonal harmonics of the ODE family: sin(2πkτ/s), cos(2πkτ/s) for k = 1…K at a
 * continuous time τ (base periods), in the column order of terms.ts, except at k = s/2 (even s),
 * where the ODE keeps the sine and leaves out the cosine. In discrete time (terms.ts) the sine
 * of k = s/2 vanishes at every sample and the cosine carries the alternation; in continuous
 * time the state integrates the forcing over each interval, and the integral of cos(πτ) over a
 * whole period interval is zero while that of sin(πτ) alternates ±2/π, so the sine is the
 * term that moves the state. Names follow the same rule (`harmonicTermNames`).
 */
interface OdeHarmonic {
  k: number;
  omega: number;
  isSin: boolean;
}

function odeHarmonics(K: number, season: number | null): OdeHarmonic[] {
  const out: OdeHarmonic[] = [];
  if (season === null) return out;
  for (let k = 1; k <= K; k++) {
    const omega = (2 * Math.PI * k) / season;
    out.push({ k, omega, isSin: true });
    if (2 * k !== season) out.push({ k, omega, isSin: false });
  }
  return out;
}

/** Term names of the ODE harmonics (see `odeHarmonics`), written as terms.ts writes them. */
export function harmonicTermNames(K: number, season: number | null): string[] {
  return odeHarmonics(K, season).map((h) => `${h.isSin ? 'sin' : 'cos'}(2π·${h.k}·t/${season})`);
}

/**
 * A filler of the harmonics at τ, or with `integral` of their antiderivatives
 * (−cos(ωτ)/ω for a sine, sin(ωτ)/ω for a cosine), whose differences are the exact integrals
 * over an interval. RK4 evaluates the harmonics between samples, so they are computed from τ
 * reduced modulo s rather than tabulated at whole periods (both kinds are periodic with period
 * s). The values depend only on the reduced τ, which repeats from season to season, so each
 * filler (one per K, s and kind, shared by every structure) remembers the values it computed for
 * up to HARMONIC_MEMORY reduced times and copies them on the next request: the same numbers,
 * without the sines and cosines.
 */
function harmonicFiller(K: number, season: number | null, integral = false): (tau: number, out: Float64Array, offset: number) => void {
  const key = `${K}:${season}:${integral}`;
  const known = harmonicFillers.get(key);
  if (known !== undefined) return known;
  const cols = odeHarmonics(K, season);
  const s = season ?? 1;
  const count = cols.length;
  const memory = new Map<number, Float64Array>();
  const filler = (tau: number, out: Float64Array, offset: number): void => {
    const tm = ((tau % s) + s) % s;
    let values = memory.get(tm);
    if (values === undefined) {
      values = new Float64Array(count);
      for (let c = 0; c < count; c++) {
        const { omega, isSin } = cols[c];
        values[c] = integral ? (isSin ? -Math.cos(omega * tm) / omega : Math.sin(omega * tm) / omega) : isSin ? Math.sin(omega * tm) : Math.cos(omega * tm);
      }
      if (memory.size < HARMONIC_MEMORY) memory.set(tm, values);
    }
    for (let c = 0; c < count; c++) out[offset + c] = values[c];
  };
  harmonicFillers.set(key, filler);
  return filler;
}

/** Reduced times whose harmonic values one filler keeps (a bound on its memory). */
const HARMONIC_MEMORY = 4096;
const harmonicFillers = new Map<string, (tau: number, out: Float64Array, offset: number) => void>();

/** x^p for a library power p ∈ {0, 1, 2, 3} (0 gives the constant term 1). */
function statePower(x: number, p: number): number {
  return p === 0 ? 1 : p === 1 ? x : p === 2 ? x * x : x * x * x;
}

/**
 * The seasonal harmonics at the 2·steps + 1 RK4 half-step nodes phase + j·dt/(2·steps) of an
 * interval starting at a given phase of the season, nodes × terms row-major, by phase. They
 * depend only on the harmonics, the season, dt and the step count, so every structure with the
 * same four shares them (at most HARMONIC_MEMORY phases each).
 */
function nodeHarmonicsOf(K: number, season: number, dt: number, steps: number): Map<number, Float64Array> {
  const key = `${K}:${season}:${dt}:${steps}`;
  let byPhase = nodeHarmonics.get(key);
  if (byPhase === undefined) {
    byPhase = new Map();
    nodeHarmonics.set(key, byPhase);
  }
  return byPhase;
}

const nodeHarmonics = new Map<string, Map<number, Float64Array>>();

/** Name of the state symbol in terms and equations. */
export function stateSymbol(state: OdeState): string {
  return state === 'level' ? 'y' : 'X';
}

/** The term of an input scaling the law: `β(price)`. */
function rateTermName(name: string): string {
  return `β(${name})`;
}

function powerName(symbol: string, p: number): string {
  return p === 0 ? '1' : p === 1 ? symbol : `${symbol}^${p}`;
}

function shapeTag(powers: number[]): string {
  const top = powers[powers.length - 1];
  const from1 = Array.from({ length: top }, (_, i) => i + 1);
  const from0 = [0, ...from1];
  if (powers.join() === from1.join()) return `deg${top}`;
  if (powers.join() === from0.join()) return `deg${top}+c`;
  return `pow${powers.join('')}`;
}

function shapeLabel(state: OdeState, powers: number[]): string {
  const where = state === 'level' ? 'ODE in level' : 'ODE in cumulative sum';
  const tag = shapeTag(powers);
  const names: Record<string, string> = state === 'level'
    ? {
        deg1: 'exponential growth (dy/dt = r·y)',
        'deg1+c': 'linear relaxation (dy/dt = a + b·y)',
        deg2: 'quadratic (logistic-type)',
        'deg2+c': 'quadratic with constant',
        deg3: 'cubic',
        'deg3+c': 'cubic with constant',
      }
    : {
        deg1: 'linear through the origin',
        'deg1+c': 'linear (external-influence diffusion)',
        deg2: 'quadratic through the origin',
        'deg2+c': 'quadratic (Bass-type diffusion)',
        deg3: 'cubic',
        'deg3+c': 'cubic with constant',
      };
  return `${where}, ${names[tag] ?? `powers ${powers.join(', ')}`}`;
}

/** The sampling interval of a series in base periods, from its time stamps (all steps equal). */
export function samplingInterval(series: Series): number {
  const n = series.time.length;
  if (n < 2) {
    throw new ModelError('series-too-short', 'an ODE needs at least two observations to know its sampling interval', {
      found: `${n} observation(s)`,
      expected: 'at least 2',
    });
  }
  const first = periodsBetween(series.time[0], series.time[1], series.frequency);
  for (let i = 2; i < n; i++) {
    const d = periodsBetween(series.time[i - 1], series.time[i], series.frequency);
    if (d !== first) {
      throw new ModelError('irregular-sampling', `an ODE needs equally spaced observations; series "${series.name}" steps by ${first} then ${d} periods`, {
        found: `step ${d} at observation ${i}`,
        expected: `${first} periods between every pair of observations`,
      });
    }
  }
  if (!(first > 0)) throw new ModelError('irregular-sampling', 'time stamps must increase', { found: String(first) });
  return first;
}

/**
 * Work shared by the ODE candidates of one grid that differ only in their scoring transform.
 * Their regression is on the untransformed state, so their estimates are the same, and so are
 * their one-step predictions of y for the same θ (a log candidate scores their logarithm): the
 * second candidate takes copies of what the first computed. Everything is tied to the series
 * object, its sample and the values it held then (compared on every use, since arrays may be
 * edited in place); on any other series or sample the structures compute afresh.
 */
class SharedFit {
  private series?: Series;
  private values = new Float64Array(0);
  private inputs: Float64Array[] = [];
  private origin = 0;
  private sum = 0;
  private fit?: { from: number; to: number; estimate: Estimate };
  private predicted?: { from: number; to: number; theta: Float64Array; yhat: Float64Array };

  /** True when `series` is the one the stored work was done on, with the same values. */
  private holds(series: Series, cols: Float64Array[]): boolean {
    if (this.series !== series || (series.before?.count ?? 0) !== this.origin || (series.before?.sum ?? 0) !== this.sum) return false;
    if (!sameValues(this.values, series.values) || cols.length !== this.inputs.length) return false;
    for (let k = 0; k < cols.length; k++) if (!sameValues(this.inputs[k], cols[k])) return false;
    return true;
  }

  /** Makes `series` the one the stored work refers to, dropping work done on another. */
  private use(series: Series, cols: Float64Array[]): void {
    if (this.holds(series, cols)) return;
    this.series = series;
    this.values = series.values.slice();
    this.inputs = cols.map((c) => c.slice());
    this.origin = series.before?.count ?? 0;
    this.sum = series.before?.sum ?? 0;
    this.fit = undefined;
    this.predicted = undefined;
  }

  estimate(series: Series, cols: Float64Array[], from: number, to: number, compute: () => Estimate): Estimate {
    const f = this.fit;
    if (f !== undefined && f.from === from && f.to === to && this.holds(series, cols)) return copyEstimate(f.estimate);
    const estimate = compute();
    this.use(series, cols);
    this.fit = { from, to, estimate: copyEstimate(estimate) };
    return estimate;
  }

  /** One-step predictions of y (original scale) for θ on [from, to). */
  predictions(theta: Float64Array, series: Series, cols: Float64Array[], from: number, to: number, compute: () => Float64Array): Float64Array {
    const p = this.predicted;
    if (p !== undefined && p.from === from && p.to === to && sameValues(p.theta, theta) && this.holds(series, cols)) return p.yhat;
    const yhat = compute();
    this.use(series, cols);
    this.predicted = { from, to, theta: theta.slice(), yhat };
    return yhat;
  }
}

/** Same length and the same numbers in every position. */
function sameValues(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

function copyEstimate(e: Estimate): Estimate {
  return { ...e, theta: e.theta.slice(), se: e.se.slice(), cov: e.cov.slice(), active: [...e.active], warnings: [...e.warnings] };
}

class OdeStructure implements Structure {
  readonly family = 'ode';
  readonly key: string;
  readonly label: string;
  readonly spec: OdeSpec;
  readonly terms: string[];
  readonly history = 1;
  readonly transform: Transform;
  /** The regression and the dynamics are on the untransformed state whatever the scoring scale. */
  readonly equationScale: Transform = 'none';
  private readonly harmonicNames: string[];
  /** The inputs scaling the law (OdeSpec.rateInputs), [] when none. */
  private readonly rates: string[];
  /** True with rate inputs: the equation is bilinear in θ (see the module comment). */
  readonly linearized: boolean;

  /** Work shared with the grid's twin of another transform (odeCandidates), if any. */
  private readonly shared: SharedFit | undefined;

  constructor(spec: OdeSpec, shared?: SharedFit) {
    this.spec = spec;
    this.shared = shared;
    this.transform = spec.transform;
    this.rates = spec.rateInputs ?? [];
    this.linearized = this.rates.length > 0;
    const symbol = stateSymbol(spec.state);
    this.harmonicNames = harmonicTermNames(spec.harmonics, spec.season);
    this.terms = [...spec.powers.map((p) => powerName(symbol, p)), ...spec.inputs, ...this.harmonicNames, ...this.rates.map(rateTermName)];
    const parts = [`ode:${spec.state}:${shapeTag(spec.powers)}`];
    if (spec.inputs.length > 0) parts.push(`in(${spec.inputs.join(',')})`);
    if (this.rates.length > 0) parts.push(`rate(${this.rates.join(',')})`);
    if (spec.harmonics > 0) parts.push(`h${spec.harmonics}`);
    if (spec.transform === 'log') parts.push('log');
    this.key = parts.join(':');
    const extra: string[] = [];
    if (spec.inputs.length > 0) extra.push(`input${spec.inputs.length > 1 ? 's' : ''} ${spec.inputs.join(', ')}`);
    if (this.rates.length > 0) extra.push(`${this.rates.join(', ')} scaling the rate`);
    if (spec.harmonics > 0) extra.push(`${spec.harmonics} seasonal harmonic${spec.harmonics > 1 ? 's' : ''}`);
    if (spec.selection === 'sparse') extra.push('terms selected by thresholded least squares');
    if (spec.transform === 'log') extra.push('scored on log scale');
    this.label = [shapeLabel(spec.state, spec.powers), ...extra].join(', ');
  }

  /** Sampling interval used on this series. */
  dt(series: Series): number {
    return this.spec.dt ?? samplingInterval(series);
  }

  /** The state x_t at every observation (level or cumulative sum), checked. */
  state(series: Series): Float64Array {
    const y = series.values;
    for (let i = 0; i < y.length; i++) {
      if (!Number.isFinite(y[i])) {
        throw new ModelError('non-finite-value', `series "${series.name}" has a missing or non-finite value at observation ${i}`, { found: String(y[i]) });
      }
    }
    if (this.spec.state === 'level') return y.slice();
    const x = new Float64Array(y.length);
    // A later window of the series continues the sum of everything before it (series.before).
    let acc = this.spec.initialCumulative + (series.before?.sum ?? 0);
    for (let i = 0; i < y.length; i++) {
      if (y[i] < 0) {
        throw new ModelError('negative-for-cumulative', `a cumulative-state ODE needs non-negative per-period values; series "${series.name}" has ${y[i]} at observation ${i}`, {
          found: String(y[i]),
          expected: 'values ≥ 0 (counts, sales, installations)',
          hint: 'use a level-state ODE for series that can be negative',
        });
      }
      acc += y[i];
      x[i] = acc;
    }
    return x;
  }

  /**
   * τ of observation t in base periods (see module comment); `origin` is the number of
   * observations before the series (`series.before.count`), so a later window of a series keeps
   * the τ it had in the whole series.
   */
  tau(t: number, dt: number, origin = 0): number {
    return (origin + t + (this.spec.state === 'cumulative' ? 1 : 0)) * dt;
  }

  /** The columns of the inputs the structure uses: forcing inputs first, then rate inputs. */
  private inputColumns(series: Series): Float64Array[] {
    return [...this.spec.inputs, ...this.rates].map((name) => {
      const input = series.inputs.find((u) => u.name === name);
      if (!input) {
        throw new UsageError('unknown-input', `the ODE uses input "${name}", which series "${series.name}" does not have`, {
          found: name,
          expected: series.inputs.length > 0 ? `one of ${series.inputs.map((u) => u.name).join(', ')}` : 'a series with inputs',
        });
      }
      return input.values;
    });
  }

  /**
   * RK4 steps for one sampling interval from state x: `spec.substeps`, raised when needed so
   * that h·|∂f/∂x| ≤ 1 at the start of the interval (h = dt/steps), well inside classical RK4's
   * real stability interval |hλ| < 2.78 (Hairer & Wanner, "Solving Ordinary Differential
   * Equations II", 2nd ed. 1996, §IV.2; section and the 2.78 from memory). Capped at 10 000 steps.
   */
  private substeps(theta: Float64Array, x: number, dt: number, ua: ArrayLike<number>, ub: ArrayLike<number>): number {
    let slope = 0;
    const powers = this.spec.powers;
    for (let k = 0; k < powers.length; k++) {
      const p = powers[k];
      if (p >= 1) slope += p * theta[k] * x ** (p - 1);
    }
    const need = Math.ceil(Math.abs(slope) * this.rateScale(theta, ua, ub) * dt);
    return Number.isFinite(need) ? Math.min(10_000, Math.max(this.spec.substeps, need)) : this.spec.substeps;
  }

  /** The largest |1 + Σ β_j w_j| over an interval whose rate inputs go from ua to ub (1 without rate inputs). */
  private rateScale(theta: Float64Array, ua: ArrayLike<number>, ub: ArrayLike<number>): number {
    if (this.rates.length === 0) return 1;
    const { at, first } = this.rateLayout();
    let a = 1;
    let b = 1;
    for (let k = 0; k < this.rates.length; k++) {
      a += theta[at + k] * ua[first + k];
      b += theta[at + k] * ub[first + k];
    }
    return Math.max(Math.abs(a), Math.abs(b));
  }

  /** Where the rate coefficients start in θ (`at`) and the rate inputs among the input columns (`first`). */
  private rateLayout(): { at: number; first: number } {
    return { at: this.spec.powers.length + this.spec.inputs.length + this.harmonicNames.length, first: this.spec.inputs.length };
  }

  /**
   * An integrator of the fitted ODE over one sampling interval [τa, τa + dt] for a fixed θ:
   * RK4 (rk4Polynomial) on f(τ, x) = Σ_p θ_p x^p + F(τ), with the inputs linearly interpolated
   * from ua (at τa) to ub (at τa + dt) and the seasonal harmonics both gathered into the forcing
   * F, formed once per half-step node. The harmonic part depends only on τa modulo the season
   * (τ reduced as in harmonicFiller), so for the default number of steps it is computed once per
   * phase of the season and reused for every interval that starts at that phase.
   */
  private integrator(theta: Float64Array, dt: number): (tauA: number, x0: number, ua: ArrayLike<number>, ub: ArrayLike<number>, steps: number) => number {
    const powers = this.spec.powers;
    const np = powers.length;
    const ni = this.spec.inputs.length;
    const nh = this.harmonicNames.length;
    const nr = this.rates.length;
    const rate = this.rateLayout();
    let scale = new Float64Array(0);
    const poly = [0, 0, 0, 0];
    for (let k = 0; k < np; k++) poly[powers[k]] = theta[k];
    const [c0, c1, c2, c3] = poly;
    const harm = harmonicFiller(this.spec.harmonics, this.spec.season);
    const season = this.spec.season ?? 1;
    const values = new Float64Array(nh);
    const byPhase = new Map<number, Float64Array>();
    const cachedSteps = this.spec.substeps;
    let forcing = new Float64Array(2 * cachedSteps + 1);
    // Never written: the forcing of an ODE without inputs and harmonics.
    let none = new Float64Array(2 * cachedSteps + 1);
    const atNodes = nh > 0 ? nodeHarmonicsOf(this.spec.harmonics, season, dt, cachedSteps) : undefined;
    const harmonicPart = (phase: number, nodes: number, half: number): Float64Array => {
      const sums = new Float64Array(nodes);
      // The harmonics at the nodes of the default step count, formed once per phase for every
      // structure; other step counts evaluate them here.
      let known = nodes === 2 * cachedSteps + 1 ? atNodes?.get(phase) : undefined;
      if (known === undefined && nodes === 2 * cachedSteps + 1 && atNodes !== undefined && atNodes.size < HARMONIC_MEMORY) {
        known = new Float64Array(nodes * nh);
        for (let j = 0; j < nodes; j++) harm(phase + j * half, known, j * nh);
        atNodes.set(phase, known);
      }
      const at = np + ni;
      for (let j = 0; j < nodes; j++) {
        let f = 0;
        if (known !== undefined) {
          const o = j * nh;
          for (let k = 0; k < nh; k++) f += theta[at + k] * known[o + k];
        } else {
          harm(phase + j * half, values, 0);
          for (let k = 0; k < nh; k++) f += theta[at + k] * values[k];
        }
        sums[j] = f;
      }
      return sums;
    };
    // Raised step counts (fast dynamics) keep their own sums by phase, for the last raised count:
    // the same θ, phase and step count give the same nodes, so a phase already seen reuses them.
    let raised = new Map<number, Float64Array>();
    let raisedSteps = 0;
    return (tauA, x0, ua, ub, steps) => {
      const nodes = 2 * steps + 1;
      const half = dt / steps / 2;
      let sums: Float64Array | undefined;
      if (nh > 0) {
        const phase = ((tauA % season) + season) % season;
        if (steps !== cachedSteps && steps !== raisedSteps) {
          raised = new Map();
          raisedSteps = steps;
        }
        const known = steps === cachedSteps ? byPhase : raised;
        sums = known.get(phase);
        if (sums === undefined) {
          sums = harmonicPart(phase, nodes, half);
          known.set(phase, sums);
        }
      }
      if (ni === 0 && nr === 0) {
        // The forcing is the harmonic part alone (read, not written, by the integration).
        if (sums !== undefined) return rk4Polynomial(c0, c1, c2, c3, sums, x0, dt, steps);
        if (none.length < nodes) none = new Float64Array(nodes);
        return rk4Polynomial(c0, c1, c2, c3, none, x0, dt, steps);
      }
      if (forcing.length < nodes) forcing = new Float64Array(nodes);
      for (let j = 0; j < nodes; j++) {
        const s = (j * half) / dt;
        let f = sums !== undefined ? sums[j] : 0;
        for (let k = 0; k < ni; k++) f += theta[np + k] * (ua[k] + s * (ub[k] - ua[k]));
        forcing[j] = f;
      }
      if (nr > 0) {
        // The law scaled by 1 + Σ β_j w_j, the rate inputs interpolated like the others.
        if (scale.length < nodes) scale = new Float64Array(nodes);
        for (let j = 0; j < nodes; j++) {
          const s = (j * half) / dt;
          let m = 1;
          for (let k = 0; k < nr; k++) m += theta[rate.at + k] * (ua[rate.first + k] + s * (ub[rate.first + k] - ua[rate.first + k]));
          scale[j] = m;
        }
        return rk4ScaledPolynomial(c0, c1, c2, c3, scale, forcing, x0, dt, steps);
      }
      return rk4Polynomial(c0, c1, c2, c3, forcing, x0, dt, steps);
    };
  }

  /**
   * The trapezoid rows of [from, to) (module comment). With rate inputs they are linearised at
   * θ = `at` (0 when absent; `Structure.regression`): with m = 1 + Σ β_j w_j and P the state
   * polynomial at `at`, the state columns are (dt/2)(m_a·x_a^p + m_b·x_b^p), the β_j columns
   * (dt/2)(w_{j,a}·P(x_a) + w_{j,b}·P(x_b)), and the targets Δx + Σ_j β_j·(that column), so that
   * targets − Φ·at are the trapezoid residuals at `at`.
   */
  regression(series: Series, from: number, to: number, at?: Float64Array): Regression {
    const x = this.state(series);
    const dt = this.dt(series);
    const cols = this.inputColumns(series);
    const lo = Math.max(from, this.history);
    const hi = Math.min(to, x.length);
    const rows = Math.max(0, hi - lo);
    const p = this.terms.length;
    const phi = zeros(rows, p);
    const y = new Float64Array(rows);
    const index = new Int32Array(rows);
    const origin = series.before?.count ?? 0;
    const powers = this.spec.powers;
    const np = powers.length;
    const ni = this.spec.inputs.length;
    const nh = this.harmonicNames.length;
    const nr = this.rates.length;
    const rate = this.rateLayout();
    const theta = at ?? new Float64Array(p);
    const poly = (v: number) => {
      let f = 0;
      for (let k = 0; k < np; k++) f += theta[k] * statePower(v, powers[k]);
      return f;
    };
    const scaleAt = (t: number) => {
      let m = 1;
      for (let k = 0; k < nr; k++) m += theta[rate.at + k] * cols[rate.first + k][t];
      return m;
    };
    const harm = harmonicFiller(this.spec.harmonics, this.spec.season, true);
    // Each state or input entry is (dt/2)·φ(start) + (dt/2)·φ(end); each harmonic entry is its
    // exact integral over the interval, H(end) − H(start) with H the antiderivative. The values
    // at an interval's end are those at the next interval's start, so they are formed once per
    // observation.
    let ha = new Float64Array(nh);
    let hb = new Float64Array(nh);
    if (nh > 0 && rows > 0) harm(this.tau(lo - 1, dt, origin), ha, 0);
    const w = dt / 2;
    const d = phi.data;
    for (let r = 0; r < rows; r++) {
      const t = lo + r;
      index[r] = t;
      y[r] = x[t] - x[t - 1];
      const xa = x[t - 1];
      const xb = x[t];
      const ma = nr > 0 ? scaleAt(t - 1) : 1;
      const mb = nr > 0 ? scaleAt(t) : 1;
      let j = r * p;
      for (let k = 0; k < np; k++, j++) d[j] = w * ma * statePower(xa, powers[k]) + w * mb * statePower(xb, powers[k]);
      for (let k = 0; k < ni; k++, j++) d[j] = w * cols[k][t - 1] + w * cols[k][t];
      if (nh > 0) {
        harm(this.tau(t, dt, origin), hb, 0);
        for (let k = 0; k < nh; k++, j++) d[j] = hb[k] - ha[k];
        const next = ha;
        ha = hb;
        hb = next;
      }
      if (nr > 0) {
        const pa = poly(xa);
        const pb = poly(xb);
        for (let k = 0; k < nr; k++, j++) {
          const u = cols[rate.first + k];
          d[j] = w * u[t - 1] * pa + w * u[t] * pb;
          y[r] += theta[rate.at + k] * d[j];
        }
      }
    }
    return { index, y, phi };
  }

  estimate(series: Series, from: number, to: number): Estimate {
    if (this.shared === undefined) return this.fit(series, from, to);
    return this.shared.estimate(series, this.inputColumns(series), from, to, () => this.fit(series, from, to));
  }

  private fit(series: Series, from: number, to: number): Estimate {
    const reg = this.regression(series, from, to);
    const p = this.terms.length;
    if (reg.y.length < p + 1) {
      throw new ModelError('series-too-short', `${this.label} needs at least ${p + 1} increments to estimate ${p} coefficient(s); series "${series.name}" gives ${reg.y.length}`, {
        found: `${reg.y.length} increments`,
        expected: `at least ${p + 1}`,
        hint: 'use a longer series or a structure with fewer terms',
      });
    }
    if (this.rates.length === 0) return fitOde(this.spec.selection, reg, this.terms);
    return this.fitRates(series, from, to, reg);
  }

  /**
   * Gauss–Newton on the trapezoid residuals with rate inputs (module comment): from the fit with
   * β = 0, each step the least-squares fit of the rows linearised at the current θ, halved
   * while the residual sum of squares does not fall; the estimate is the least-squares fit at
   * the last θ, so its covariance is σ̂²(JᵀJ)⁻¹ of the linearised rows.
   */
  private fitRates(series: Series, from: number, to: number, start: Regression): Estimate {
    const p = this.terms.length;
    const rate = this.rateLayout().at;
    const base = zeros(start.phi.rows, rate);
    for (let r = 0; r < start.phi.rows; r++) for (let j = 0; j < rate; j++) base.data[r * rate + j] = start.phi.data[r * p + j];
    let theta: Float64Array = new Float64Array(p);
    theta.set(lstsq(base, start.y, this.terms.slice(0, rate), { onRankDeficient: 'throw' }).theta);
    const residualSS = (reg: Regression, th: Float64Array) => {
      let rss = 0;
      for (let r = 0; r < reg.y.length; r++) {
        let e = reg.y[r];
        for (let j = 0; j < p; j++) e -= reg.phi.data[r * p + j] * th[j];
        rss += e * e;
      }
      return rss;
    };
    // The rows at θ give both the next step and the residual sum of squares at θ.
    let reg = this.regression(series, from, to, theta);
    let rss = residualSS(reg, theta);
    for (let it = 0; it < MAX_GAUSS_NEWTON; it++) {
      const next = lstsq(reg.phi, reg.y, this.terms, { onRankDeficient: 'throw' }).theta;
      let step = 1;
      let trial = next;
      let trialReg = this.regression(series, from, to, trial);
      let trialRss = residualSS(trialReg, trial);
      for (let h = 0; h < 20 && !(trialRss <= rss); h++) {
        step /= 2;
        trial = theta.map((v, j) => v + step * (next[j] - v));
        trialReg = this.regression(series, from, to, trial);
        trialRss = residualSS(trialReg, trial);
      }
      if (!(trialRss <= rss)) break;
      // 1e-7 of the RSS moves the log-likelihood by n·1e-7/2, below anything the criteria see.
      const done = rss - trialRss <= 1e-7 * rss;
      theta = trial;
      reg = trialReg;
      rss = trialRss;
      if (done) break;
    }
    return fitOde('dense', reg, this.terms);
  }

  oneStep(theta: Float64Array, series: Series, from: number, to: number): Float64Array {
    if (from < this.history) throw new RangeError(`oneStep needs from ≥ ${this.history}, got ${from}`);
    const yhat =
      this.shared === undefined
        ? this.levelOneStep(theta, series, from, to)
        : this.shared.predictions(theta, series, this.inputColumns(series), from, to, () => this.levelOneStep(theta, series, from, to));
    const out = new Float64Array(yhat.length);
    for (let i = 0; i < yhat.length; i++) out[i] = this.spec.transform === 'log' ? Math.log(yhat[i]) : yhat[i];
    return out;
  }

  /** One-step predictions of y_t on the original scale, t in [from, to) (from ≥ 1). */
  private levelOneStep(theta: Float64Array, series: Series, from: number, to: number): Float64Array {
    const x = this.state(series);
    const dt = this.dt(series);
    const cols = this.inputColumns(series);
    const hi = Math.min(to, x.length);
    const origin = series.before?.count ?? 0;
    const out = new Float64Array(Math.max(0, hi - from));
    const ua = new Float64Array(cols.length);
    const ub = new Float64Array(cols.length);
    const step = this.integrator(theta, dt);
    for (let t = from; t < hi; t++) {
      for (let k = 0; k < cols.length; k++) {
        ua[k] = cols[k][t - 1];
        ub[k] = cols[k][t];
      }
      const tauA = this.tau(t - 1, dt, origin);
      const next = step(tauA, x[t - 1], ua, ub, this.substeps(theta, x[t - 1], dt, ua, ub));
      out[t - from] = this.spec.state === 'level' ? next : next - x[t - 1];
    }
    return out;
  }

  simulate(theta: Float64Array, series: Series, future: Float64Array[], h: number, shocks?: Float64Array): Float64Array {
    const x = this.state(series);
    const n = x.length;
    if (n < 1) throw new ModelError('series-too-short', 'cannot simulate from an empty series', { found: '0 observations' });
    const dt = this.dt(series);
    const cols = this.inputColumns(series);
    const idx = [...this.spec.inputs, ...this.rates].map((name) => series.inputs.findIndex((u) => u.name === name));
    for (const i of idx) {
      if (!future[i] || future[i].length < h) {
        throw new UsageError('missing-future-inputs', `simulating ${h} steps needs ${h} future values of input "${series.inputs[i].name}"`, {
          found: future[i] ? `${future[i].length} values` : 'none',
          expected: `${h} values`,
        });
      }
    }
    if (shocks && shocks.length < h) throw new RangeError(`shocks has ${shocks.length} values, expected ${h}`);
    const out = new Float64Array(h);
    const ua = new Float64Array(cols.length);
    const ub = new Float64Array(cols.length);
    for (let k = 0; k < cols.length; k++) ua[k] = cols[k][n - 1];
    let state = x[n - 1];
    const origin = series.before?.count ?? 0;
    const step = this.integrator(theta, dt);
    for (let j = 0; j < h; j++) {
      for (let k = 0; k < cols.length; k++) ub[k] = future[idx[k]][j];
      const tauA = this.tau(n - 1 + j, dt, origin);
      const next = step(tauA, state, ua, ub, this.substeps(theta, state, dt, ua, ub));
      let yhat = this.spec.state === 'level' ? next : next - state;
      if (shocks) yhat = this.spec.transform === 'log' ? Math.exp(Math.log(yhat) + shocks[j]) : yhat + shocks[j];
      out[j] = yhat;
      state = this.spec.state === 'level' ? yhat : state + yhat;
      ua.set(ub);
    }
    return out;
  }

  describe(theta: Float64Array, se?: Float64Array): string {
    return odeSummary(this.spec, this.terms, theta, se);
  }

  derived(theta: Float64Array, series: Series): Derived[] {
    const x = this.state(series);
    return odeDerived(this.spec, this.terms, theta, { series, state: x, dt: this.dt(series) });
  }
}

/**
 * θ estimate of the trapezoid regression. `dense`: least squares on every term (lstsq.ts).
 * `sparse`: sequential thresholded least squares with the threshold picked by BIC
 * (sparse.ts); pruned terms get θ = 0, se = 0 and zero rows/columns in the covariance.
 */
function fitOde(selection: OdeSelection, reg: Regression, names: string[]): Estimate {
  if (selection === 'dense') {
    const fit = lstsq(reg.phi, reg.y, names);
    return { theta: fit.theta, se: fit.se, cov: fit.cov, active: [...fit.active], sigma2: fit.sigma2, rank: fit.rank, condition: fit.condition, warnings: [...fit.warnings] };
  }
  const sparse = sparseRegression(reg.phi, reg.y, names);
  const p = names.length;
  const cols: number[] = [];
  for (let j = 0; j < p; j++) if (sparse.active[j]) cols.push(j);
  const q = cols.length;
  const se = new Float64Array(p);
  const cov = new Float64Array(p * p);
  cols.forEach((j, a) => {
    se[j] = sparse.fit.se[a];
    cols.forEach((k, b) => (cov[j * p + k] = sparse.fit.cov[a * q + b]));
  });
  const pruned = names.filter((_, j) => !sparse.active[j]);
  const warnings = [...sparse.warnings];
  if (pruned.length > 0) warnings.push(`sparse selection set ${pruned.map((t) => `"${t}"`).join(', ')} to zero`);
  return { theta: sparse.theta, se, cov, active: [...sparse.active], sigma2: sparse.fit.sigma2, rank: sparse.fit.rank, condition: sparse.fit.condition, warnings };
}

/** Which θ entries are state feedback (powers ≥ 1 of the state), for the residual checks. */
export function odeDynamicMask(structure: Structure): boolean[] {
  const spec = structure.spec as OdeSpec;
  return structure.terms.map((_, k) => k < spec.powers.length && spec.powers[k] >= 1);
}

/**
 * The family's explosiveness check on the state polynomial f (inputs and seasonal terms at
 * zero). For degree d ≥ 2, a trajectory that moves towards ±∞ with no equilibrium in its way
 * reaches it in finite time (∫dx/f(x) converges at infinity), so the check is false
 * - when f has no stable equilibrium at all (every trajectory not resting at an equilibrium
 *   runs away), or
 * - given `at`, when the state at the end of the estimation sample x = x_{to−1} has no
 *   equilibrium on the side f(x) pushes it to: the fitted law sends the series itself off to
 *   infinity (e.g. a quadratic with both equilibria below a growing cumulative state).
 * Linear ODEs are never rejected: exponential growth or decay is what they are for.
 */
export function odeStable(structure: Structure, theta: Float64Array, at?: StateAt): boolean {
  const spec = structure.spec as OdeSpec;
  const poly = [0, 0, 0, 0];
  spec.powers.forEach((p, k) => (poly[p] = theta[k]));
  const degree = poly[3] !== 0 ? 3 : poly[2] !== 0 ? 2 : 1;
  if (degree < 2) return true;
  const eq = equilibria(poly);
  if (!eq.some((e) => e.stable)) return false;
  if (at === undefined || at.to < 1) return true;
  const x = (structure as OdeStructure).state(at.series)[at.to - 1];
  const push = polyValue(poly, x);
  if (push > 0) return eq.some((e) => e.value > x);
  if (push < 0) return eq.some((e) => e.value < x);
  return true;
}

/**
 * The level-state shapes offered by the search, in order, with their estimation: each named
 * hypothesis (exponential, linear relaxation, logistic with and without constant) is fitted
 * densely, so it stays the equation it names; the full cubic library 1, y, y², y³ is fitted by
 * sparse selection, which lets the data switch terms off.
 */
const LEVEL_SHAPES: [number[], OdeSelection][] = [
  [[1], 'dense'],
  [[0, 1], 'dense'],
  [[1, 2], 'dense'],
  [[0, 1, 2], 'dense'],
  [[0, 1, 2, 3], 'sparse'],
];
/** The cumulative-state shapes offered (non-negative series only): Bass-type diffusion. */
const CUMULATIVE_SHAPES: [number[], OdeSelection][] = [[[0, 1, 2], 'dense']];
/** The shape also offered with the inputs scaling the law: Bass diffusion (the generalized Bass model). */
const RATE_SHAPES = ['cumulative:0,1,2'];

/**
 * The ODE candidate grid for a series within the search bounds, in a fixed order: for each
 * scoring transform, the level shapes above, then Bass-type diffusion in the cumulative state
 * when every value is ≥ 0 (and some > 0); each without inputs, then with all allowed inputs
 * as a forcing (not for exponential growth), then, for Bass diffusion, with all allowed inputs
 * scaling the law (the generalized Bass model's mapping function); each with
 * every allowed number of harmonic pairs (not for exponential growth). A candidate is left out when the series gives fewer than (terms + 2)
 * increments, when the log transform meets a non-positive value, or when the time stamps are
 * not equally spaced. dt and periods per year are fixed in each spec from the series.
 */
export function odeCandidates(series: Series, bounds: CandidateBounds): Structure[] {
  const n = series.values.length;
  let dt: number;
  try {
    dt = samplingInterval(series);
  } catch (e) {
    if (e instanceof ModelError) return [];
    throw e;
  }
  for (let i = 0; i < n; i++) if (!Number.isFinite(series.values[i])) return [];
  const nonNegative = series.values.every((v) => v >= 0) && series.values.some((v) => v > 0);
  const positive = isStrictlyPositive(series.values);
  // Input roles: none, every input as a forcing, every input scaling the law.
  const inputSets: { inputs: string[]; rateInputs: string[] }[] = [{ inputs: [], rateInputs: [] }];
  if (bounds.inputs.length > 0 && bounds.maxInputLags > 0) {
    inputSets.push({ inputs: [...bounds.inputs], rateInputs: [] });
    inputSets.push({ inputs: [], rateInputs: [...bounds.inputs] });
  }
  const harmonics = bounds.season !== null && bounds.harmonics.length > 0 ? bounds.harmonics : [0];
  const ppy = periodsPerYear(series.frequency);
  const out: Structure[] = [];
  // Candidates that differ only in the transform share their fit and predictions (SharedFit).
  const twins = new Map<string, SharedFit>();
  for (const transform of bounds.transforms) {
    if (transform === 'log' && !positive) continue;
    const shapes: [OdeState, number[], OdeSelection][] = LEVEL_SHAPES.map(([p, sel]) => ['level', p, sel]);
    if (nonNegative) for (const [p, sel] of CUMULATIVE_SHAPES) shapes.push(['cumulative', p, sel]);
    for (const [state, powers, selection] of shapes) {
      for (const { inputs, rateInputs } of inputSets) {
        if ((inputs.length > 0 || rateInputs.length > 0) && powers.length === 1) continue;
        if (rateInputs.length > 0 && !RATE_SHAPES.includes(`${state}:${powers.join()}`)) continue;
        for (const k of harmonics) {
          if (k > 0 && powers.length === 1) continue;
          const spec = odeSpec({ state, powers, inputs, rateInputs, harmonics: k, season: k > 0 ? (bounds.season as number) * dt : null, transform, dt, periodsPerYear: ppy, selection });
          const twin = JSON.stringify({ ...spec, transform: null });
          let shared = twins.get(twin);
          if (shared === undefined) {
            shared = new SharedFit();
            twins.set(twin, shared);
          }
          const s = new OdeStructure(spec, shared);
          if (n - 1 < s.terms.length + 2) continue;
          out.push(s);
        }
      }
    }
  }
  return out;
}

/** The ODE family as the registry sees it. */
export const odeFamily: FamilyDefinition = {
  name: 'ode',
  candidates: odeCandidates,
  fromSpec: odeFromSpec,
  dynamicMask: odeDynamicMask,
  stable: odeStable,
  unstableReason: 'explosive fitted dynamics (the state runs off to infinity in finite time)',
};
