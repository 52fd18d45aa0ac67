/**
 * Forecast combination by Akaike weights: instead of trusting the single best structure when the
 * evidence is close, the point forecast is the weighted mean of the candidates' forecasts,
 *
 *   F̄_{n+k} = Σ_i w_i F^{(i)}_{n+k} / Σ_i w_i,   w_i = exp(−Δ_i/2) / Σ_j exp(−Δ_j/2),
 *
 * with Δ_i the candidate's distance to the best criterion value on the search's common sample
 * (Burnham & Anderson, "Model Selection and Multimodel Inference", 2nd ed., 2002, §4.2.1,
 * eq. 4.1 on model-averaged predictions; Akaike weights §2.9).
 *
 * Members: fitted candidates in ranking order while their cumulative weight is below `mass`
 * (default 0.99), at most `maxMembers` (default 30). A member whose simulated path is not finite
 * or explodes is left out and the others' weights renormalised; when only the winner is left the
 * result is the winner's forecast. Explodes: |F_{n+k} − y_n| > k·R for some step k, with R the
 * range (max − min) of the history — a path that moves, per step, more than the series has
 * moved in all its history (`isExplosivePath`).
 *
 * Cost: one simulation of h steps per member.
 */
import type { Series } from '../data/series.js';
import type { CandidateResult } from '../select/search.js';
import type { Estimate, Structure } from '../models/structure.js';

export interface CombineOptions {
  /** Cumulative Akaike weight the members cover (default 0.99). */
  mass?: number;
  /** Most members (default 30). */
  maxMembers?: number;
}

export const COMBINE_DEFAULTS = { mass: 0.99, maxMembers: 30 } as const;

export interface CombinationMember {
  key: string;
  /** Akaike weight in the search. */
  weight: number;
  /** Weight in the combination after renormalisation (0 when left out). */
  share: number;
  /** Why a member was left out (absent when it was used). */
  excluded?: string;
  forecast: Float64Array;
}

export interface Combination {
  point: Float64Array;
  members: CombinationMember[];
}

/**
 * The members of a combination from a search ranking (best first), with their estimates.
 * `refit`, when given, re-estimates a member (e.g. on all data after a holdout search).
 */
export function combinationMembers(
  ranking: readonly CandidateResult[],
  options: CombineOptions = {},
): { result: CandidateResult; structure: Structure; estimate: Estimate }[] {
  const mass = options.mass ?? COMBINE_DEFAULTS.mass;
  const most = options.maxMembers ?? COMBINE_DEFAULTS.maxMembers;
  const out: { result: CandidateResult; structure: Structure; estimate: Estimate }[] = [];
  let covered = 0;
  for (const r of ranking) {
    if (r.status !== 'fitted' || !r.estimate) continue;
    if (out.length >= most || (out.length > 0 && covered >= mass)) break;
    out.push({ result: r, structure: r.structure, estimate: r.estimate });
    covered += r.weight;
  }
  return out;
}

/**
 * Weighted mean of the members' h-step point forecasts from the end of `history` (see the file
 * comment). `simulate(structure, estimate)` returns a member's point forecast; `history`, when
 * given, the observed values the forecast continues, for the explosion check.
 */
export function combineForecasts(
  members: readonly { result: CandidateResult; structure: Structure; estimate: Estimate }[],
  h: number,
  simulate: (structure: Structure, estimate: Estimate) => Float64Array,
  history?: ArrayLike<number>,
): Combination {
  const used: CombinationMember[] = [];
  let total = 0;
  for (const m of members) {
    let forecast: Float64Array;
    let excluded: string | undefined;
    try {
      forecast = simulate(m.structure, m.estimate);
      if (!forecast.every(Number.isFinite)) excluded = 'non-finite forecast';
      else if (history && isExplosivePath(history, forecast)) excluded = 'explosive simulated path';
    } catch (e) {
      forecast = new Float64Array(h).fill(NaN);
      excluded = e instanceof Error ? e.message : String(e);
    }
    used.push({ key: m.result.key, weight: m.result.weight, share: 0, forecast, ...(excluded ? { excluded } : {}) });
    if (!excluded) total += m.result.weight;
  }
  const point = new Float64Array(h);
  if (!(total > 0)) {
    point.fill(NaN);
    return { point, members: used };
  }
  for (const m of used) {
    if (m.excluded) continue;
    m.share = m.weight / total;
    for (let k = 0; k < h; k++) point[k] += m.share * m.forecast[k];
  }
  return { point, members: used };
}

/** Convenience: the combination of a ranking's members simulated from `history` without inputs. */
export function combineRanking(ranking: readonly CandidateResult[], history: Series, h: number, options: CombineOptions = {}): Combination {
  const future = history.inputs.map((i) => new Float64Array(h).fill(i.values[i.values.length - 1]));
  return combineForecasts(combinationMembers(ranking, options), h, (s, e) => s.simulate(e.theta, history, future, h), history.values);
}

/**
 * True when a forecast path continuing `history` explodes: |F_k − y_n| > k·R at some step k
 * (1-based), R = max(history) − min(history). A linear trend fitted to the history moves about
 * R/n per step, far inside the bound; only runaway dynamics cross it.
 * @example isExplosivePath([1, 2, 3], [4, 5]) === false; isExplosivePath([1, 2, 3], [4, 1e6]) === true
 */
export function isExplosivePath(history: ArrayLike<number>, forecast: ArrayLike<number>): boolean {
  const n = history.length;
  if (n === 0) return false;
  let min = Infinity;
  let max = -Infinity;
  for (let t = 0; t < n; t++) {
    if (history[t] < min) min = history[t];
    if (history[t] > max) max = history[t];
  }
  const range = max - min;
  const last = history[n - 1];
  for (let k = 1; k <= forecast.length; k++) if (!(Math.abs(forecast[k - 1] - last) <= k * range)) return true;
  return false;
}
