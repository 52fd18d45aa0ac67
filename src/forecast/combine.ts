/**
 * Forecast combination: instead of trusting the single best structure, the point forecast is a
 * weighted mean of candidates' forecasts, weighted at two levels.
 *
 * Groups. A group is one family with its equation on one scale (`groupOf`: `arx`, `arx|log`,
 * `damped`, `damped|log`, `smoothed`, `smoothed|log`, `ode`).
 *
 * Within a group, by Akaike weights (Burnham & Anderson, "Model Selection and Multimodel
 * Inference", 2nd ed., 2002, §2.9 weights, §4.2.1 eq. 4.1 model-averaged predictions):
 *
 *   F^{(g)}_{n+k} = Σ_{i∈g} w_i F^{(i)}_{n+k},   w_i = exp(−Δ_i/2) / Σ_{j∈g} exp(−Δ_j/2),
 *
 * with Δ_i the candidate's distance to its group's best criterion value on the search's common
 * sample. Across groups, by tempered weights of the groups' best candidates:
 *
 *   F̄_{n+k} = Σ_g v_g F^{(g)}_{n+k},   v_g = exp(−Δ_g/(2τ)) / Σ_h exp(−Δ_h/(2τ)),
 *
 * over the groups that delivered a forecast, Δ_g the distance of group g's best candidate to the
 * overall best and τ the tempering (`temper`, default 10): across groups a criterion difference
 * counts as much as a difference τ times smaller within one. A group 10 units behind keeps 61 %
 * of the best group's weight, one 30 behind 22 %, one 100 behind 0.7 %. τ = 1 would be the Akaike
 * weights of the group bests, τ = ∞ equal weights (`across: 'equal'`).
 *
 * Why two levels, and why tempered. The criterion compares one-step predictions on the
 * estimation sample; among structures of one family on one scale (nested lags, terms switched on
 * and off) that is the evidence the criterion was made for. Between structurally different
 * descriptions it is a weak guide to which extrapolates better over a horizon: a level that
 * returns to a fitted line or curve (ARX, ODE) against a change carried on from the last value
 * (damped.ts) or from a smoothed level (smoothed.ts); additive changes against compounding ones
 * (the log scale). Equal weights over structurally different forecasts are the robust choice
 * when the evidence cannot tell them apart (Clemen, "Combining forecasts: A review and annotated
 * bibliography", IJF 5, 1989; Stock & Watson, "Combination forecasts of output growth in a
 * seven-country data set", J. Forecasting 23, 2004: simple averages are hard to beat; Makridakis
 * & Hibon 2000: combinations outperform the methods combined), but a description the data reject
 * by a wide margin should not keep an equal share. Tempering the evidence between the two is the
 * power-likelihood device of Bayesian model averaging under misspecification (Grünwald & van
 * Ommen, "Inconsistency of Bayesian inference for misspecified linear models, and a proposal for
 * repairing it", Bayesian Analysis 12(4), 2017: the likelihood raised to a power η < 1; here
 * η = 1/τ); τ = 10 was chosen on the accuracy benchmark's development data (README).
 * `across: 'evidence'` gives instead one Akaike weighting over all candidates of all groups.
 *
 * Members: in each group, its fitted candidates in ranking order while their cumulative
 * (within-group) weight is below `mass` (default 0.99), at most `maxMembers` (default 30) per
 * group. A group whose best candidate is more than `maxDelta` (default: no limit) behind the
 * overall best is left out. When the search's winner uses inputs, only candidates that use
 * inputs are members: averaging in structures blind to the inputs would dilute the effect the
 * evidence gives them, and a forecast under user-given future inputs would answer them only in
 * part.
 *
 * A member whose simulated path is not finite, explodes, falls to zero or below on a series
 * that has always been positive (`leavesPositive`), or on such a series leaves its record range
 * by more than a factor `recordFactor` (default 2: above twice the largest value observed or
 * below half the smallest, `leavesRecord`) is left out and the others in its group
 * renormalised; a group left without members drops out of the mean and the other groups'
 * weights are renormalised. Explodes: |F_{n+k} − y_n| > k·R for some step k, with R the range
 * (max − min) of the history — a path that moves, per step, more than the series has moved in
 * all its history (`isExplosivePath`). The record check is the restraint on extrapolated
 * growth: a compounding rate (a trend or drift on the log scale, an exponential ODE) carried over
 * a long horizon doubles the record of a series that never did so in its history; such a path is
 * not averaged in, while the members that stay within the factor are. When no member stays, the
 * asserted structure's own path is delivered (`replacesOwn`).
 *
 * Cost: one simulation of h steps per member.
 */
import type { Series } from '../data/series.js';
import type { CandidateResult } from '../select/search.js';
import type { Estimate, Structure, StructureSpec } from '../models/structure.js';
import type { ForecastPaths } from './intervals.js';
import { akaikeWeights } from '../select/criteria.js';

export interface CombineOptions {
  /** Cumulative Akaike weight the members of a group cover (default 0.99). */
  mass?: number;
  /** Most members per group (default 30). */
  maxMembers?: number;
  /**
   * Weights across groups (family and scale): tempered evidence of the group bests (default),
   * equal, or one Akaike weighting over all candidates ('evidence').
   */
  across?: 'tempered' | 'equal' | 'evidence';
  /** Tempering τ of the weights across groups, exp(−Δ_g/(2τ)) (default 10; ≥ 1). */
  temper?: number;
  /** A group whose best candidate is more than this far (Δ criterion) behind the overall best is left out (default: no limit). */
  maxDelta?: number;
  /** On an always-positive series, a member whose path leaves [min/f, f·max] of the history is left out (default f = 2; Infinity: no check). */
  recordFactor?: number;
}

export const COMBINE_DEFAULTS = { mass: 0.99, maxMembers: 30, across: 'tempered', temper: 10, maxDelta: Infinity, recordFactor: 2 } as const;

export interface CombinationMember {
  key: string;
  /** The member's readable structure label. */
  label: string;
  /** The member's structure spec and the coefficients its forecast used (what a model file keeps). */
  spec: StructureSpec;
  theta: Float64Array;
  /** The group the member is weighted in (`groupOf`), or 'all' when weighting by evidence across groups. */
  group: string;
  /** Akaike weight within its group. */
  weight: number;
  /** The weight of its group across groups before renormalisation (exp(−Δ_g/(2τ)); 1 with equal weights). */
  groupWeight: number;
  /** Weight in the combination after renormalisation (0 when left out). */
  share: number;
  /** Why a member was left out (absent when it was used). */
  excluded?: string;
  forecast: Float64Array;
}

export interface Combination {
  point: Float64Array;
  members: CombinationMember[];
  /** Groups that delivered a forecast (weighted by their members' `groupWeight`, renormalised over these). */
  groups: number;
}

export interface Member {
  key: string;
  structure: Structure;
  estimate: Estimate;
  /** The group it is weighted in and its Akaike weight there. */
  group: string;
  weight: number;
  /** The group's weight across groups before renormalisation (absent: 1, equal weights). */
  groupWeight?: number;
  /** Why the member cannot forecast (e.g. its refit failed); it is then left out. */
  failure?: string;
}

/**
 * The group a structure is weighted in when groups are weighted equally: its family and the
 * scale its equation is written on (`Structure.equationScale`, else its scoring scale), e.g.
 * `arx` or `arx|log`. An ODE scored on the log scale describes the same dynamics as on the
 * original scale, so both are one group.
 */
export function groupOf(structure: Structure): string {
  const scale = structure.equationScale ?? structure.transform;
  return scale === 'none' ? structure.family : `${structure.family}|${scale}`;
}

/** True when a structure's regressors include an input of the series (its spec lists inputs). */
export function usesInputs(structure: Structure): boolean {
  const inputs = (structure.spec as { inputs?: unknown }).inputs;
  return Array.isArray(inputs) && inputs.length > 0;
}

/**
 * The members of a combination from a search ranking (best first, fitted ones first), with
 * their estimates, groups and within-group weights (see the file comment).
 */
export function combinationMembers(ranking: readonly CandidateResult[], options: CombineOptions = {}): Member[] {
  const mass = options.mass ?? COMBINE_DEFAULTS.mass;
  const most = options.maxMembers ?? COMBINE_DEFAULTS.maxMembers;
  const across = options.across ?? COMBINE_DEFAULTS.across;
  const temper = options.temper ?? COMBINE_DEFAULTS.temper;
  const maxDelta = options.maxDelta ?? COMBINE_DEFAULTS.maxDelta;
  if (!(temper >= 1)) throw new RangeError(`combinationMembers: temper must be ≥ 1, got ${temper}`);
  let fitted = ranking.filter((r) => r.status === 'fitted' && r.estimate !== undefined);
  if (fitted.length > 0 && usesInputs(fitted[0].structure)) fitted = fitted.filter((r) => usesInputs(r.structure));
  const groups = new Map<string, CandidateResult[]>();
  for (const r of fitted) {
    const g = across === 'evidence' ? 'all' : groupOf(r.structure);
    const list = groups.get(g);
    if (list) list.push(r);
    else groups.set(g, [r]);
  }
  const out: Member[] = [];
  const best = fitted.length > 0 ? fitted[0].score : 0;
  for (const [group, list] of groups) {
    const behind = list[0].score - best;
    if (behind > maxDelta) continue;
    const groupWeight = across === 'tempered' ? Math.exp(-behind / (2 * temper)) : 1;
    const weights = akaikeWeights(list.map((r) => r.score));
    let covered = 0;
    for (let i = 0; i < list.length; i++) {
      if (i >= most || (i > 0 && covered >= mass)) break;
      const r = list[i];
      out.push({ key: r.key, structure: r.structure, estimate: r.estimate as Estimate, group, weight: weights[i], groupWeight });
      covered += weights[i];
    }
  }
  return out;
}

/**
 * The two-level weighted mean of the members' h-step point forecasts from the end of `history`
 * (see the file comment). `simulate(structure, estimate)` returns a member's point forecast;
 * `history`, when given, the observed values the forecast continues, for the explosion check.
 */
export function combineForecasts(
  members: readonly Member[],
  h: number,
  simulate: (structure: Structure, estimate: Estimate) => Float64Array,
  history?: ArrayLike<number>,
  options: Pick<CombineOptions, 'recordFactor'> = {},
): Combination {
  const used: CombinationMember[] = [];
  const totals = new Map<string, number>();
  const groupWeights = new Map<string, number>();
  const summary = history ? summariseHistory(history) : null;
  const factor = options.recordFactor ?? COMBINE_DEFAULTS.recordFactor;
  if (!(factor >= 1)) throw new RangeError(`combineForecasts: recordFactor must be ≥ 1, got ${factor}`);
  for (const m of members) {
    let forecast: Float64Array;
    let excluded: string | undefined;
    try {
      if (m.failure !== undefined) throw new Error(m.failure);
      forecast = simulate(m.structure, m.estimate);
      if (!forecast.every(Number.isFinite)) excluded = 'non-finite forecast';
      else excluded = summary ? (pathFault(summary, forecast, factor) ?? undefined) : undefined;
    } catch (e) {
      forecast = new Float64Array(h).fill(NaN);
      excluded = e instanceof Error ? e.message : String(e);
    }
    const groupWeight = m.groupWeight ?? 1;
    used.push({ key: m.key, label: m.structure.label, spec: m.structure.spec, theta: m.estimate.theta, group: m.group, weight: m.weight, groupWeight, share: 0, forecast, ...(excluded ? { excluded } : {}) });
    if (!excluded && m.weight > 0) {
      totals.set(m.group, (totals.get(m.group) ?? 0) + m.weight);
      groupWeights.set(m.group, groupWeight);
    }
  }
  const point = new Float64Array(h);
  const groups = totals.size;
  let across = 0;
  for (const v of groupWeights.values()) across += v;
  if (groups === 0 || !(across > 0)) {
    point.fill(NaN);
    return { point, members: used, groups };
  }
  for (const m of used) {
    if (m.excluded || !(m.weight > 0)) continue;
    m.share = (m.weight / (totals.get(m.group) as number)) * ((groupWeights.get(m.group) as number) / across);
    for (let k = 0; k < h; k++) point[k] += m.share * m.forecast[k];
  }
  return { point, members: used, groups };
}

/**
 * Whether a combination replaces the asserted structure's own forecast: it does when some
 * member was used, its point is finite at every step, and it is not the asserted structure
 * alone.
 */
export function replacesOwn(combination: Combination, assertedKey: string): boolean {
  const used = combination.members.filter((m) => !m.excluded);
  if (used.length === 0 || !combination.point.every(Number.isFinite)) return false;
  return !(used.length === 1 && used[0].key === assertedKey);
}

/**
 * The delivered paths when `combination` replaces the asserted structure's own forecast `own`
 * (`replacesOwn`), else null: `own` moved onto the combined point, every band shifted at each
 * step by point − own point with its width kept. The combination replaces the point only; the
 * uncertainty stays that of the asserted structure.
 */
export function combinedPaths(own: ForecastPaths, combination: Combination, assertedKey: string): ForecastPaths | null {
  if (!replacesOwn(combination, assertedKey)) return null;
  const point = combination.point;
  const shift = (x: Float64Array) => Float64Array.from(x, (v, j) => v + point[j] - own.point[j]);
  return { ...own, point: Float64Array.from(point), bands: own.bands.map((b) => ({ level: b.level, lower: shift(b.lower), upper: shift(b.upper) })) };
}

/** Convenience: the combination of a ranking's members simulated from `history`, inputs held at their last values. */
export function combineRanking(ranking: readonly CandidateResult[], history: Series, h: number, options: CombineOptions = {}): Combination {
  const future = history.inputs.map((i) => new Float64Array(h).fill(i.values[i.values.length - 1]));
  return combineForecasts(combinationMembers(ranking, options), h, (s, e) => s.simulate(e.theta, history, future, h), history.values, options);
}

/**
 * True when a forecast path continuing `history` explodes: |F_k − y_n| > k·R at some step k
 * (1-based), R = max(history) − min(history). A linear trend fitted to the history moves about
 * R/n per step, far inside the bound; only runaway dynamics cross it.
 * @example isExplosivePath([1, 2, 3], [4, 5]) === false; isExplosivePath([1, 2, 3], [4, 1e6]) === true
 */
export function isExplosivePath(history: ArrayLike<number>, forecast: ArrayLike<number>): boolean {
  return explodes(summariseHistory(history), forecast);
}

/**
 * True when a forecast path falls to zero or below although every value of the history is
 * positive: counts, sales and registrations that have never been zero do not turn negative, and a
 * structure that says so has extrapolated past what it learnt (a level or diffusion curve run
 * beyond its data, usually). Series with a zero or negative value in their history are never
 * refused by this check.
 * @example leavesPositive([3, 2, 1], [0.5, -0.2]) === true; leavesPositive([3, 0, 1], [-1]) === false
 */
export function leavesPositive(history: ArrayLike<number>, forecast: ArrayLike<number>): boolean {
  return turnsNonPositive(summariseHistory(history), forecast);
}

/**
 * Why a finite forecast path continuing a history is left out of a combination (explosive,
 * leaving the positive values of an always-positive series, or leaving its record range widened
 * by `factor`: `leavesRecord`), or null when it passes.
 */
export function pathFault(h: HistorySummary, forecast: ArrayLike<number>, factor: number = COMBINE_DEFAULTS.recordFactor): string | null {
  if (explodes(h, forecast)) return 'explosive simulated path';
  if (turnsNonPositive(h, forecast)) return 'path falls to zero or below on a series that has always been positive';
  if (outsideRecord(h, forecast, factor)) return `path leaves ${factor === 2 ? 'half the smallest to twice the largest value' : `the record range widened by a factor ${factor}`} of a series that has always been positive`;
  return null;
}

/**
 * True when a forecast path leaves [min/f, f·max] of a history whose every value is positive
 * (f = `factor`, default 2): it more than doubles the largest value ever observed, or falls below
 * half the smallest. Histories with a zero or negative value are never refused by this check.
 * @example leavesRecord([4, 5, 8], [9, 17]) === true; leavesRecord([4, 5, 8], [9, 15]) === false; leavesRecord([4, 5, 8], [1.9]) === true
 */
export function leavesRecord(history: ArrayLike<number>, forecast: ArrayLike<number>, factor: number = COMBINE_DEFAULTS.recordFactor): boolean {
  return outsideRecord(summariseHistory(history), forecast, factor);
}

/** What the path checks need of a history, computed once for all the members continuing it. */
export interface HistorySummary {
  length: number;
  last: number;
  min: number;
  max: number;
  /** max − min. */
  range: number;
  /** Every value > 0. */
  positive: boolean;
}

/** The summary of a history for `pathFault`. */
export function summariseHistory(history: ArrayLike<number>): HistorySummary {
  const n = history.length;
  let min = Infinity;
  let max = -Infinity;
  let positive = true;
  for (let t = 0; t < n; t++) {
    const v = history[t];
    if (v < min) min = v;
    if (v > max) max = v;
    if (!(v > 0)) positive = false;
  }
  return { length: n, last: n > 0 ? history[n - 1] : NaN, min, max, range: max - min, positive };
}

/** The summary of a history extended by one value. */
export function extendSummary(h: HistorySummary, value: number): HistorySummary {
  const min = h.length === 0 ? value : Math.min(h.min, value);
  const max = h.length === 0 ? value : Math.max(h.max, value);
  return { length: h.length + 1, last: value, min, max, range: max - min, positive: h.positive && value > 0 };
}

function explodes(h: HistorySummary, forecast: ArrayLike<number>): boolean {
  if (h.length === 0) return false;
  for (let k = 1; k <= forecast.length; k++) if (!(Math.abs(forecast[k - 1] - h.last) <= k * h.range)) return true;
  return false;
}

function turnsNonPositive(h: HistorySummary, forecast: ArrayLike<number>): boolean {
  if (!h.positive) return false;
  for (let k = 0; k < forecast.length; k++) if (!(forecast[k] > 0)) return true;
  return false;
}

function outsideRecord(h: HistorySummary, forecast: ArrayLike<number>, factor: number): boolean {
  if (!h.positive || h.length === 0 || factor === Infinity) return false;
  const low = h.min / factor;
  const high = h.max * factor;
  for (let k = 0; k < forecast.length; k++) if (!(forecast[k] >= low && forecast[k] <= high)) return true;
  return false;
}
