/**
 * Calibrated prediction bands: the spread of the delivered forecast's own multi-step errors,
 * measured by rolling origins inside the data the forecast is made from, instead of the one-step
 * noise propagated under certainty equivalence.
 *
 * Why. Bands from the asserted equation alone (intervals.ts) treat the fitted equation as the
 * law of the series: parameters known, structure right, the point made by that equation. Each of
 * the three is false in practice (the parameters are estimated, the structure was chosen among
 * many, and the point is usually a combination of several), and the bands cover far less than
 * their level, worst at long horizons. The errors the forecast actually makes when it is re-run
 * from earlier origins carry all three.
 *
 * Method (split-conformal style, with a smoothed horizon profile and the members' spread as
 * the local difficulty):
 *  1. Origins. The members re-run are the largest of each group of the combination
 *     (`calibrationSubset`; `perGroup` 1 by default: re-running a second member where the first
 *     holds less than 90 % of its group's share cost a third more time and changed the
 *     benchmark's interval scores by under 1 %), their shares scaled up to their group's. The
 *     origins are a regular grid from the estimation sample's start `from`: every s-th position,
 *     s the smallest power of two that leaves at most 32 (between 17 and 32 once the data allow
 *     more than 32: `originGrid`). Every member joins at the first origin o that leaves it
 *     `minRows(p)` estimation rows after `from` (p its active terms); its coefficients at o are
 *     those of least squares on [from, o), carried from origin to origin by recursive least
 *     squares at λ = 1 (online.ts; equal to a batch refit on each prefix). The holdout's
 *     calibration and the final one share the members' paths from the origins they have in
 *     common (`OriginPaths`).
 *     From each origin every member forecasts y_o … y_{o+h−1} from the history before o, inputs
 *     as observed (ex post); the members are averaged with their shares in the delivered
 *     combination, renormalised over the members present whose path passes the checks the
 *     combination applies (finite, not explosive, not leaving the positive values of an
 *     always-positive series: combine.ts `pathFault`) and does not collapse on the log scale
 *     (`collapses`).
 *  2. Errors e_{o,k} = g(y_{o+k−1}) − g(F_{o,k}) for the lead times k = 1 … h the data reach, on
 *     the original scale (g = identity) and, on a series that has always been positive, on the
 *     log scale (multiplicative errors, bands that stay positive); beside each, the members'
 *     spread d_{o,k}: the share-weighted root mean square of g(F^{(i)}_{o,k}) − g(F_{o,k}).
 *  3. Profile. The mean squared error by lead, MS_k over the N_k origins reaching k, is smoothed
 *     by a power law fitted by weighted least squares, ln MS_k = a + b·ln k (weights N_k, growth
 *     b clipped to [0, 2]: from a constant spread to one growing linearly; b = 1, random-walk
 *     growth, when only lead 1 is reached), and blended with the raw value where there are many
 *     origins: s_k² = (N_k·MS_k + κ·fit_k)/(N_k + κ), κ = `prior`, made non-decreasing in k.
 *     Past the last lead reached the power law extrapolates.
 *  4. Multiplier. Scores u_{o,k} = |e_{o,k}| / √(s_k² + d_{o,k}²) pooled over all (o, k); the
 *     band at level L is g⁻¹(g(F_k) ± q_L·√(s_k² + d_k²)), d_k the members' spread of the
 *     delivered forecast itself, and q_L the conformal quantile of the N scores, the
 *     ⌈(N+1)L⌉-th smallest (Vovk, Gammerman & Shafer, "Algorithmic Learning in a Random World",
 *     2005; Lei, G'Sell, Rinaldo, Tibshirani & Wasserman, "Distribution-free predictive
 *     inference for regression", JASA 113, 2018: split conformal with a local scale), widened
 *     by t_ν/z at the same level with ν = origins/2 for the small number of origins behind the
 *     scores (consecutive origins share all but one observation: a rule of thumb, chosen on the
 *     development data). With too few scores for that rank, q_L = z·RMS(u)·√(1 + 1/N).
 *  5. Scale. On an always-positive series the scale whose errors have the higher Gaussian
 *     likelihood under their own spread model (with the log scale's Jacobian) is kept
 *     (`logLikelihood`).
 * The bands keep the delivered point; only their widths come from the data. Where the history
 * is too short for a single origin, no calibration is made and the caller keeps the model's own
 * bands (and says so).
 *
 * Cost: per member re-run one batch fit at its first origin, one RLS step per observation after
 * it, and one h-step simulation per origin: at most groups × 32 simulations, most of them shared
 * by the holdout's and the final calibration.
 */
import type { Series } from '../data/series.js';
import { sliceSeries } from '../data/series.js';
import type { Estimate, Structure } from '../models/structure.js';
import { Learner } from './online.js';
import { normalQuantile } from './normal.js';
import type { Band, ForecastPaths } from './intervals.js';
import { extendSummary, pathFault, summariseHistory } from './combine.js';
import { studentTQuantile } from './student-t.js';

/** A forecast that the calibration re-runs: a member of the delivered point and its share. */
export interface CalibrationMember {
  structure: Structure;
  estimate: Pick<Estimate, 'active'>;
  share: number;
  /** The member's group in the combination (`groupOf`), for `calibrationSubset`. */
  group?: string;
}

export interface CalibrationOptions {
  /** Most origins, counted back from the end of the history (default: every origin the data allow). */
  window?: number;
  /** Scale of the errors: 'auto' (log on an always-positive series), 'log' or 'none'. */
  scale?: 'auto' | 'log' | 'none';
  /** How the members' disagreement enters (default 'normalised'): see the module comment. */
  spread?: 'normalised' | 'none';
  /** Widen the multipliers for the origins' small sample by t_ν/z with ν = origins / `originsPerDof` (default true). */
  smallSample?: boolean;
  /** Spread statistic of each lead's errors: 'rms' (root mean square, default) or 'robust' (median |e| / Φ⁻¹(3/4)). */
  profile?: 'robust' | 'rms';
  /** Origins per degree of freedom of the small-sample widening (default 2: consecutive origins share all but one observation). */
  originsPerDof?: number;
  /** Weight, in origins, of the power-law fit against the raw mean squared error of each lead (default 10). */
  prior?: number;
  /** Most origins re-run (default 32, a regular grid over those the data allow: `originGrid`). */
  maxOrigins?: number;
  /** Members re-run per group and the share of the group they must hold (defaults 1 and 0.9: `calibrationSubset`). */
  perGroup?: number;
  groupMass?: number;
  /** Estimation rows per active term a member needs before its first origin (default 2; at least 4 more than the terms). */
  rowsPerTerm?: number;
}

/** The measured spread of the delivered forecast by lead time (see the module comment). */
export interface Calibration {
  /** Scale the errors were measured on. */
  scale: 'log' | 'none';
  /** Origins used, and the first of them (time index). */
  origins: number;
  firstOrigin: number;
  /** Per lead time k = 1 … h: origins reaching it (N_k) and the raw root mean squared error (NaN when none). */
  counts: Int32Array;
  rmse: Float64Array;
  /** Smoothed error profile s_k and its growth exponent b (variance ∝ k^b). */
  profile: Float64Array;
  growth: number;
  /** Whether the members' spread enters the scores and the bands. */
  spread: boolean;
  /** Pooled scores N and the multiplier q_L per level. */
  scores: number;
  multipliers: { level: number; q: number; rule: 'conformal' | 'gaussian' }[];
}

/** Estimation rows a member with p active terms needs before its first origin: max(r·p, p + 4). */
export function minRows(activeTerms: number, rowsPerTerm = 2): number {
  return Math.max(Math.ceil(rowsPerTerm * activeTerms), activeTerms + 4);
}

/** Errors and members' spreads by lead time (index k − 1) on one scale. */
export interface ScaledErrors {
  scale: 'log' | 'none';
  errors: number[][];
  spreads: number[][];
}

/** What the origins produced: for every lead, the actual values and the delivered point, and the errors on each scale. */
export interface RollingErrors {
  /** Per lead (index k − 1): actual y_{o+k−1} and point F_{o,k} of every origin reaching it. */
  actual: number[][];
  point: number[][];
  /** Errors on the original scale, and on the log scale when the history has always been positive. */
  none: ScaledErrors;
  log: ScaledErrors | null;
  origins: number;
  firstOrigin: number;
}

/**
 * The rolling-origin errors of the delivered forecast inside `history` (module comment, steps 1
 * and 2), or null when the history is too short for one origin. `from` is the start of the
 * members' estimation sample.
 */
export function rollingErrors(
  members: readonly CalibrationMember[],
  history: Series,
  from: number,
  h: number,
  options: CalibrationOptions = {},
  shared?: OriginPaths,
): RollingErrors | null {
  const n = history.values.length;
  const used = calibrationSubset(members, options.perGroup ?? DEFAULT_PER_GROUP, options.groupMass ?? 0.9);
  if (used.length === 0 || n < 2) return null;
  const window = options.window ?? n;
  // Each member joins at the first origin with enough estimation rows for it.
  const starts = used.map((m) => Math.max(n - window, from + minRows(m.estimate.active.filter(Boolean).length, options.rowsPerTerm)));
  const first = Math.min(...starts);
  if (first >= n) return null;
  const origins = originGrid(from, first, n, options.maxOrigins ?? DEFAULT_MAX_ORIGINS);
  // A window counted back from the end is a different set of origins for each history: not shared.
  const runs = shared !== undefined && options.window === undefined && shared.covers(history, from, h) ? shared : new OriginPaths(history, from, h);
  const positive = history.values.every((v) => v > 0);
  const lists = () => Array.from({ length: h }, (): number[] => []);

  const out: RollingErrors = {
    actual: lists(),
    point: lists(),
    none: { scale: 'none', errors: lists(), spreads: lists() },
    log: positive ? { scale: 'log', errors: lists(), spreads: lists() } : null,
    origins: 0,
    firstOrigin: origins[0],
  };
  const paths: (Float64Array | null)[] = used.map(() => null);
  const combined = new Float64Array(h);
  let seen = first;
  let summary = summariseHistory(history.values.subarray(0, first));
  for (const o of origins) {
    for (; seen < o; seen++) summary = extendSummary(summary, history.values[seen]);
    const logRange = positive ? Math.log(summary.max / summary.min) : null;
    const lead = Math.min(h, n - o);
    let total = 0;
    for (let i = 0; i < used.length; i++) {
      paths[i] = null;
      if (o < starts[i]) continue;
      const f = runs.path(used[i], o, lead);
      if (f === null || !f.every(Number.isFinite) || pathFault(summary, f) !== null || (logRange !== null && collapses(summary.last, logRange, f))) continue;
      paths[i] = f;
      total += used[i].share;
    }
    if (total > 0) {
      const path = membersMean(used, paths, lead, combined);
      for (let k = 0; k < lead; k++) {
        const y = history.values[o + k];
        out.actual[k].push(y);
        out.point[k].push(path[k]);
        out.none.errors[k].push(y - path[k]);
        out.none.spreads[k].push(spreadAt(used, paths, k, path[k], 'none'));
        if (out.log) {
          out.log.errors[k].push(path[k] > 0 ? Math.log(y / path[k]) : NaN);
          out.log.spreads[k].push(spreadAt(used, paths, k, path[k], 'log'));
        }
      }
      out.origins++;
    }
  }
  return out.origins === 0 ? null : out;
}

/** Members re-run per group by default (`calibrationSubset`). */
export const DEFAULT_PER_GROUP = 1;
/** Most origins re-run by default (`originGrid`). */
export const DEFAULT_MAX_ORIGINS = 32;

/**
 * The members' forecasts from rolling origins of one series, kept so that calibrations of the
 * same run share them: the holdout's calibration (on the history before the holdout) and the
 * final one (on all data) re-run the same members from the same grid of origins
 * (`originGrid`), so the second finds most paths made.
 *
 * A member's coefficients at origin o are those of its learner (online.ts: a batch fit on
 * [from, start) carried on by recursive least squares at λ = 1), which uses only the
 * observations before o; its path from o is its simulation over `lead` steps with the inputs as
 * observed, a path over fewer steps being the first steps of a longer one. A calibration on a
 * history that ends before the series does only reads the steps inside that history, so sharing
 * the paths uses nothing it could not have seen. A member whose learner cannot start at an origin
 * (too few rows for its fit) has no path there and tries again at the next; one whose learner
 * fails to advance starts afresh at the next origin asked for, as does a request for an origin
 * the learner has already passed.
 */
export class OriginPaths {
  private readonly entries = new Map<string, OriginEntry>();
  private readonly byMember = new WeakMap<CalibrationMember, OriginEntry>();
  /** The history before each origin and the inputs after it, made once for every member. */
  private readonly views = new Map<number, { past: Series; future: Float64Array[] }>();

  /**
   * @param series the series whose prefixes the calibrations use (the longest history).
   * @param from start of the members' estimation sample.
   * @param lead steps each path is simulated over (at most the data left after its origin): the
   *   longest lead any calibration sharing these paths asks for.
   */
  constructor(
    readonly series: Series,
    readonly from: number,
    readonly lead: number,
  ) {}

  /** True when a calibration of `history` from `from` over h leads can use these paths. */
  covers(history: Series, from: number, h: number): boolean {
    return from === this.from && h <= this.lead && history.values.length <= this.series.values.length && prefixOf(history, this.series);
  }

  /** The member's path from origin o over `lead` steps, or null when it has none there. */
  path(member: CalibrationMember, o: number, lead: number): Float64Array | null {
    const entry = this.entryOf(member);
    const known = entry.paths.get(o);
    if (known !== undefined && known.length >= lead) return known.subarray(0, lead);
    const theta = this.thetaAt(entry, member, o);
    if (theta === null) return null;
    const long = Math.min(this.lead, this.series.values.length - o);
    let view = this.views.get(o);
    if (view === undefined) {
      view = { past: sliceSeries(this.series, 0, o), future: this.series.inputs.map((i) => i.values.subarray(o, o + long)) };
      this.views.set(o, view);
    }
    const { past, future } = view;
    const simulate = (steps: number): Float64Array | null => {
      try {
        return member.structure.simulate(theta, past, steps === long ? future : future.map((f) => f.subarray(0, steps)), steps);
      } catch {
        return null;
      }
    };
    const f = simulate(long);
    if (f !== null) {
      entry.paths.set(o, f);
      return f.subarray(0, lead);
    }
    return long > lead ? simulate(lead) : null;
  }

  /** The entry of a member's structure and active terms (found once per member object). */
  private entryOf(member: CalibrationMember): OriginEntry {
    let entry = this.byMember.get(member);
    if (entry !== undefined) return entry;
    const key = `${member.structure.key}#${member.estimate.active.map((a) => (a ? 1 : 0)).join('')}`;
    entry = this.entries.get(key);
    if (entry === undefined) {
      entry = { learner: null, thetas: new Map(), paths: new Map() };
      this.entries.set(key, entry);
    }
    this.byMember.set(member, entry);
    return entry;
  }

  /** The member's coefficients at origin o (null when its learner cannot start or advance there). */
  private thetaAt(entry: OriginEntry, member: CalibrationMember, o: number): Float64Array | null {
    const known = entry.thetas.get(o);
    if (known !== undefined) return known;
    if (entry.learner !== null && entry.learner.next > o) entry.learner = null;
    let theta: Float64Array | null = null;
    if (entry.learner === null) {
      entry.learner = startLearner(member, this.series, this.from, o);
      if (entry.learner !== null) theta = entry.learner.theta;
    } else {
      try {
        // Rows before o only use observations before o: the learner catches up on the whole history.
        entry.learner.advance(this.series, o);
        theta = entry.learner.theta;
      } catch {
        entry.learner = null;
      }
    }
    entry.thetas.set(o, theta);
    return theta;
  }
}

interface OriginEntry {
  learner: Learner | null;
  thetas: Map<number, Float64Array | null>;
  paths: Map<number, Float64Array>;
}

/** True when `history` holds the first observations of `series` (the same values and inputs). */
function prefixOf(history: Series, series: Series): boolean {
  if (history === series) return true;
  const m = history.values.length;
  if ((history.before?.count ?? 0) !== (series.before?.count ?? 0) || history.inputs.length !== series.inputs.length) return false;
  for (let t = 0; t < m; t++) if (history.values[t] !== series.values[t]) return false;
  for (let j = 0; j < history.inputs.length; j++) {
    const a = history.inputs[j];
    const b = series.inputs[j];
    if (a.name !== b.name) return false;
    for (let t = 0; t < m; t++) if (a.values[t] !== b.values[t]) return false;
  }
  return true;
}

function startLearner(m: CalibrationMember, history: Series, from: number, to: number): Learner | null {
  try {
    return Learner.start(m.structure, m.estimate.active, history, from, to);
  } catch {
    return null;
  }
}

/**
 * The origins re-run: the positions anchor + j·s (j = 0, 1, …) from `first` to n − 1, with the
 * stride s the smallest power of two that leaves at most `most` of them; ascending. The grid is
 * anchored at the estimation sample's start and its stride only doubles as the history grows,
 * so the origins of a shorter history of the same series are (a superset of) those of a longer
 * one up to its end: the holdout's and the final calibration share most of their origins
 * (`OriginPaths`), and the origins do not move when one observation is added.
 */
export function originGrid(anchor: number, first: number, n: number, most: number): number[] {
  const count = (s: number): number => (n <= first ? 0 : Math.floor((n - 1 - anchor) / s) - Math.ceil((first - anchor) / s) + 1);
  let s = 1;
  while (count(s) > Math.max(1, most)) s *= 2;
  const out: number[] = [];
  for (let o = anchor + s * Math.ceil((first - anchor) / s); o < n; o += s) out.push(o);
  return out;
}

/**
 * The members the origins re-run: in each group (`group`, or one group when absent), the
 * largest shares until they hold `mass` of the group's share, at most `perGroup`, their shares
 * scaled up to the group's whole share (so groups keep their weight in the mean). Small members
 * move the combined path little; re-running them would multiply the cost.
 */
export function calibrationSubset(members: readonly CalibrationMember[], perGroup: number, mass: number): CalibrationMember[] {
  const groups = new Map<string, CalibrationMember[]>();
  for (const m of members) {
    if (!(m.share > 0)) continue;
    const g = m.group ?? '';
    const list = groups.get(g);
    if (list) list.push(m);
    else groups.set(g, [m]);
  }
  const out: CalibrationMember[] = [];
  for (const list of groups.values()) {
    const sorted = [...list].sort((a, b) => b.share - a.share);
    const whole = sorted.reduce((s, m) => s + m.share, 0);
    const kept: CalibrationMember[] = [];
    let held = 0;
    for (const m of sorted) {
      if (kept.length >= perGroup || held >= mass * whole) break;
      kept.push(m);
      held += m.share;
    }
    for (const m of kept) out.push({ ...m, share: (m.share * whole) / held });
  }
  return out;
}

/**
 * True when a path continuing an always-positive history moves, on the log scale, more per step
 * than the history's whole log range: |ln F_k − ln y_o| > k·ln(max/min) for some k — the
 * multiplicative form of the combination's explosion check, which catches paths that collapse
 * towards zero without crossing it.
 */
function collapses(last: number, logRange: number, f: ArrayLike<number>): boolean {
  const base = Math.log(last);
  for (let k = 1; k <= f.length; k++) if (!(Math.abs(Math.log(f[k - 1]) - base) <= k * logRange)) return true;
  return false;
}

/** The share-weighted mean of the members' paths that exist (renormalised), into `out`. */
function membersMean(members: readonly CalibrationMember[], paths: readonly (Float64Array | null)[], lead: number, out: Float64Array): Float64Array {
  out.fill(0);
  let total = 0;
  for (let i = 0; i < members.length; i++) {
    const f = paths[i];
    if (f === null) continue;
    for (let k = 0; k < lead; k++) out[k] += members[i].share * f[k];
    total += members[i].share;
  }
  for (let k = 0; k < lead; k++) out[k] /= total;
  return out;
}

/**
 * The members' spread around their mean at lead k + 1, on the errors' scale: the share-weighted
 * root mean square of g(F_i) − g(F̄) over the members whose path exists.
 */
function spreadAt(members: readonly { share: number }[], paths: readonly (ArrayLike<number> | null)[], k: number, mean: number, scale: 'log' | 'none'): number {
  let ss = 0;
  let total = 0;
  for (let i = 0; i < members.length; i++) {
    const f = paths[i];
    if (f === null || !(members[i].share > 0)) continue;
    const d = scale === 'log' ? (f[k] > 0 && mean > 0 ? Math.log(f[k] / mean) : 0) : f[k] - mean;
    ss += members[i].share * d * d;
    total += members[i].share;
  }
  return total > 0 ? Math.sqrt(ss / total) : 0;
}

/**
 * The members' spread by lead time at the delivered forecast's origin (for `calibratedBands`),
 * from their forecasts and shares.
 */
export function memberSpread(members: readonly { share: number; forecast: ArrayLike<number> }[], point: Float64Array, scale: 'log' | 'none'): Float64Array {
  const paths = members.map((m) => m.forecast);
  return Float64Array.from(point, (p, k) => spreadAt(members, paths, k, p, scale));
}

/**
 * The calibration of a delivered forecast: `rollingErrors` then `profileOf`; null when too
 * short. Scale 'auto': the original scale for a series that has not always been positive;
 * otherwise whichever of the log and the original scale gives its errors the higher likelihood
 * (`logLikelihood`) — multiplicative errors suit most positive series, but not one whose dips
 * towards zero make relative errors explode.
 */
export function calibrate(
  members: readonly CalibrationMember[],
  history: Series,
  from: number,
  h: number,
  levels: readonly number[],
  options: CalibrationOptions = {},
  shared?: OriginPaths,
): Calibration | null {
  const rolled = rollingErrors(members, history, from, h, options, shared);
  if (rolled === null) return null;
  const want = options.scale ?? 'auto';
  const none = profileOf(rolled.none, rolled, levels, options);
  if (rolled.log === null || want === 'none') return none;
  const log = profileOf(rolled.log, rolled, levels, options);
  if (want === 'log') return log;
  return logLikelihood(log, rolled) > logLikelihood(none, rolled) ? log : none;
}

/**
 * The delivered forecast with calibrated bands: `calibrate` over `members` (the point's members
 * with their shares), bands around `point` with the members' spread `forecasts` (each member's
 * forecast and share, those used). Null when the history is too short to calibrate. `shared`:
 * members' paths kept from another calibration of the same series (`OriginPaths`).
 */
export function calibratedPaths(
  point: Float64Array,
  members: readonly CalibrationMember[],
  forecasts: readonly { share: number; forecast: ArrayLike<number> }[],
  history: Series,
  from: number,
  levels: readonly number[],
  options: CalibrationOptions = {},
  shared?: OriginPaths,
): ForecastPaths | null {
  const calibration = calibrate(members, history, from, point.length, levels, options, shared);
  if (calibration === null) return null;
  const spread = memberSpread(forecasts, point, calibration.scale);
  return { point, bands: calibratedBands(point, calibration, levels, spread), method: 'calibrated', calibration };
}

/**
 * Gaussian log-likelihood of the origins' errors under a calibration's own spread model,
 * e_{o,k} ~ N(0, c²·(s_k² + spread²_{o,k})) with c² the mean squared score, on the original
 * scale: a log-scale calibration carries the Jacobian −Σ ln y (Box & Cox, "An analysis of
 * transformations", JRSS B 26, 1964), so the two scales compare like the structure search's
 * transformed candidates.
 */
function logLikelihood(c: Calibration, rolled: RollingErrors): number {
  const scaled = c.scale === 'log' ? rolled.log : rolled.none;
  if (!scaled) return -Infinity;
  let ss = 0;
  let n = 0;
  const v: number[] = [];
  const e: number[] = [];
  const jac: number[] = [];
  for (let k = 0; k < scaled.errors.length; k++) {
    for (let i = 0; i < scaled.errors[k].length; i++) {
      const err = scaled.errors[k][i];
      if (!Number.isFinite(err)) return -Infinity;
      const w = widthScale(profileAt(c, k + 1), c.spread ? scaled.spreads[k][i] : 0);
      ss += (err / w) ** 2;
      n++;
      v.push(w * w);
      e.push(err);
      jac.push(c.scale === 'log' ? Math.log(rolled.actual[k][i]) : 0);
    }
  }
  if (n === 0) return -Infinity;
  const c2 = ss / n;
  let ll = 0;
  for (let i = 0; i < n; i++) ll += -0.5 * Math.log(2 * Math.PI * c2 * v[i]) - (e[i] * e[i]) / (2 * c2 * v[i]) - jac[i];
  return ll;
}


/** Mean interval score, summed over levels, of a calibration's bands around the origins' own points. */
function insampleScore(c: Calibration, rolled: RollingErrors, levels: readonly number[]): number {
  const spreads = (c.scale === 'log' ? rolled.log : rolled.none)?.spreads;
  let total = 0;
  let count = 0;
  for (let k = 0; k < rolled.point.length; k++) {
    const pts = rolled.point[k];
    for (let i = 0; i < pts.length; i++) {
      const y = rolled.actual[k][i];
      for (const level of levels) {
        const [lo, up] = bandAt(c, level, pts[i], k + 1, spreads ? spreads[k][i] : 0);
        const alpha = 1 - level / 100;
        total += up - lo + (y < lo ? (2 / alpha) * (lo - y) : 0) + (y > up ? (2 / alpha) * (y - up) : 0);
      }
      count++;
    }
  }
  return count > 0 ? total / count : Infinity;
}

/**
 * The smoothed profile and multipliers of per-lead errors: steps 3 and 4 of the module comment.
 */
export function profileOf(scaled: ScaledErrors, rolled: Pick<RollingErrors, 'origins' | 'firstOrigin'>, levels: readonly number[], options: CalibrationOptions = {}): Calibration {
  const { scale, spreads } = scaled;
  const { origins, firstOrigin } = rolled;
  const errors = scaled.errors;
  const useSpread = (options.spread ?? 'normalised') === 'normalised';
  const h = errors.length;
  const counts = new Int32Array(h);
  const rmse = new Float64Array(h).fill(NaN);
  // Weighted least squares of ln MS_k on ln k.
  let sw = 0;
  let sx = 0;
  let sy = 0;
  let sxx = 0;
  let sxy = 0;
  const robust = (options.profile ?? 'rms') === 'robust';
  for (let k = 1; k <= h; k++) {
    const list = errors[k - 1].filter(Number.isFinite);
    counts[k - 1] = list.length;
    if (list.length === 0) continue;
    const ms = robust ? (medianAbs(list) / MAD_NORMAL) ** 2 : meanSquare(list);
    rmse[k - 1] = Math.sqrt(ms);
    if (!(ms > 0)) continue;
    const w = list.length;
    const x = Math.log(k);
    const y = Math.log(ms);
    sw += w;
    sx += w * x;
    sy += w * y;
    sxx += w * x * x;
    sxy += w * x * y;
  }
  let growth = 1;
  const det = sw * sxx - sx * sx;
  if (sw > 0 && det > 1e-12 * sw * sw) growth = Math.min(2, Math.max(0, (sw * sxy - sx * sy) / det));
  const intercept = sw > 0 ? (sy - growth * sx) / sw : Math.log(1e-300);
  const kappa = options.prior ?? 10;
  const profile = new Float64Array(h);
  for (let j = 0; j < h; j++) {
    const fit = Math.exp(intercept + growth * Math.log(j + 1));
    const nk = counts[j];
    const ms = nk > 0 ? rmse[j] * rmse[j] : 0;
    const blended = (nk * ms + kappa * fit) / (nk + kappa);
    profile[j] = Math.max(Math.sqrt(blended), j > 0 ? profile[j - 1] : 0);
  }

  const scores: number[] = [];
  for (let k = 1; k <= h; k++) {
    const list = errors[k - 1];
    for (let i = 0; i < list.length; i++) if (Number.isFinite(list[i])) scores.push(Math.abs(list[i]) / widthScale(profile[k - 1], useSpread ? spreads[k - 1][i] : 0));
  }
  scores.sort((a, b) => a - b);
  const N = scores.length;
  let ss = 0;
  for (const u of scores) ss += u * u;
  const rms = N > 0 ? Math.sqrt(ss / N) : NaN;
  const small = options.smallSample ?? true;
  const multipliers = levels.map((level) => {
    const L = level / 100;
    const widen = small ? studentTQuantile(0.5 + L / 2, origins / (options.originsPerDof ?? 2)) / normalQuantile(0.5 + L / 2) : 1;
    const rank = Math.ceil((N + 1) * L);
    if (rank <= N) return { level, q: widen * scores[rank - 1], rule: 'conformal' as const };
    return { level, q: widen * normalQuantile(0.5 + L / 2) * rms * Math.sqrt(1 + 1 / Math.max(N, 1)), rule: 'gaussian' as const };
  });
  return { scale, origins, firstOrigin, counts, rmse, profile, growth, spread: useSpread, scores: N, multipliers };
}

/** Φ⁻¹(3/4): the median absolute value of a standard normal variable. */
const MAD_NORMAL = 0.6744897501960817;

function medianAbs(list: readonly number[]): number {
  const a = list.map(Math.abs).sort((x, y) => x - y);
  const m = a.length >> 1;
  return a.length % 2 === 1 ? a[m] : 0.5 * (a[m - 1] + a[m]);
}

function meanSquare(list: readonly number[]): number {
  let ss = 0;
  for (const e of list) ss += e * e;
  return ss / list.length;
}

/** The normaliser of a score and of a band: √(s_k² + spread²). */
function widthScale(profile: number, spread: number): number {
  return Math.sqrt(profile * profile + spread * spread);
}

/**
 * The calibrated bands around a delivered point forecast (module comment, step 4). `spread` is
 * the members' spread by lead at this origin (`memberSpread`; ignored unless the calibration
 * uses it).
 */
export function calibratedBands(point: Float64Array, calibration: Calibration, levels: readonly number[], spread?: ArrayLike<number>): Band[] {
  const h = point.length;
  return levels.map((level) => {
    const lower = new Float64Array(h);
    const upper = new Float64Array(h);
    for (let j = 0; j < h; j++) [lower[j], upper[j]] = bandAt(calibration, level, point[j], j + 1, spread ? spread[j] : 0);
    return { level, lower, upper };
  });
}

/** The band at one level around one point F at lead k: g⁻¹(g(F) ± q_L·√(s_k² + spread²)). */
export function bandAt(calibration: Calibration, level: number, point: number, k: number, spread: number): [number, number] {
  const m = calibration.multipliers.find((x) => x.level === level);
  if (m === undefined) throw new RangeError(`calibratedBands: no multiplier for level ${level}`);
  const w = m.q * widthScale(profileAt(calibration, k), calibration.spread ? spread : 0);
  if (calibration.scale === 'log') {
    if (point > 0) return [point * Math.exp(-w), point * Math.exp(w)];
    const half = Math.abs(point) * (Math.exp(w) - 1);
    return [point - half, point + half];
  }
  return [point - w, point + w];
}

/** The profile at lead k, extrapolated by its power law past the horizon it was measured on. */
export function profileAt(calibration: Calibration, k: number): number {
  const h = calibration.profile.length;
  if (k <= h) return calibration.profile[k - 1];
  return calibration.profile[h - 1] * Math.pow(k / h, calibration.growth / 2);
}
