/**
 * The structure search: a deterministic candidate grid from every requested family, each
 * candidate fitted and scored on one common sample, ranked by an information criterion.
 *
 * Procedure.
 * 1. Resolve the bounds (every "auto" becomes the list of alternatives) and ask each family, in
 *    registry order, for its candidates (registry.ts). Grid order is fixed by the families.
 * 2. Common sample: rows t ∈ [from, n) with from = the largest `history` among all candidates
 *    and the `maxHistory` of every family that explores (or a later `sampleStart`), so every
 *    candidate predicts the same observations. The grid's candidates are scored first; then
 *    each exploring family tries further structures through a scorer that fits and scores them
 *    on the same sample (the ARX family's guided search over each input's delay and lags with
 *    two or more inputs, models/arx-inputs.ts); each key is fitted once.
 * 3. Each candidate is estimated on that sample (`estimate`), its one-step predictions of
 *    z_t = g(y_t) are formed (`oneStep`, or taken from the estimate when the structure returns
 *    them with it, `Estimate.oneStep`), and RSS = Σ (z_t − ẑ_t)² enters the Gaussian
 *    criteria of criteria.ts with k = active coefficients + 1 (the noise variance) and, for log
 *    candidates, the log-Jacobian −Σ ln y_t over the sample, so all candidates are scored on the
 *    original scale.
 * 4. Candidates that cannot be fitted (too few rows, rank lost, explosive fitted dynamics,
 *    non-finite predictions, undefined criterion) stay in the ranking as failed, with the reason.
 * 5. Fitted candidates are sorted by the criterion, ties broken by key; Δ is the distance to
 *    the best and the Akaike weights are taken over the fitted set (criteria.ts). The winner's
 *    residuals get a Ljung–Box whiteness check (whiteness.ts).
 *
 * Defaults (small enough for interactive use: 336 ARX candidates on a positive monthly series
 * with one input; see bench/search.bench.ts): maxAr 3 (max(1, ⌊n/10⌋) below 30 points, `defaultMaxAr`), maxInputLags 2, maxDelay 2, harmonics 'auto' (K = 0…min(2, ⌊s/2⌋) when
 * the series has a season; for the structures of the change K = 0, 1 and ⌊s/2⌋ for seasons up to
 * 12 periods, `autoChangeHarmonics`),
 * transform 'auto' (ln tried only for strictly positive series), trend 'auto' (with and without;
 * on the log scale, where a level structure's trend is an exponential line that its forecast
 * returns to and compounds over the horizon, without: `logTrend`), seasonalLag 'off',
 * differencing 'none', criterion 'aicc', all registered families and all inputs of the series.
 */
import type { Series } from '../data/series.js';
import { CertaError, DataError, ModelError, UsageError } from '../data/errors.js';
import { formatTime } from '../data/calendar.js';
import type { Derived, Estimate, Structure, StructureSpec, Transform } from '../models/structure.js';
import {
  FAMILIES,
  dynamicMask,
  familyNames,
  getFamily,
  isStable,
  unstableReason,
  type CandidateBounds,
  type CandidateScorer,
  type Differencing,
  type FamilyDefinition,
} from '../models/registry.js';
import { forward, isStrictlyPositive, logJacobian } from '../models/transforms.js';
import { isHarmonicSeason, maxHarmonics } from '../models/terms.js';
import { akaikeWeights, criteria, type Criterion } from './criteria.js';
import { defaultLjungBoxLags, ljungBox, type LjungBoxResult } from './whiteness.js';
import type { SeasonEvidence } from './seasons.js';

export type Switch = 'on' | 'off' | 'auto';

export interface SearchOptions {
  /** Families to search, by name (default: every registered family, registry order). */
  families?: string[];
  /** Largest number of AR lags (default 3). */
  maxAr?: number;
  /** Largest number of lags per input (default 2; 0 searches without inputs). */
  maxInputLags?: number;
  /** Largest input delay (default 2). */
  maxDelay?: number;
  /**
   * Largest number of harmonic pairs, or 'auto' = min(2, ⌊s/2⌋), and for the structures of the
   * change 0, 1 and ⌊s/2⌋ pairs (`autoChangeHarmonics`) (default 'auto').
   */
  harmonics?: number | 'auto';
  /** Season length for seasonal terms (default `series.season`; null switches them off). */
  season?: number | null;
  /**
   * Daily series: also search the yearly cycle (365.25 days) by harmonics beside the weekly
   * season and keep the one the data support (select/seasons.ts; default true).
   */
  yearly?: boolean;
  /** Scoring-scale transform (default 'auto': none, plus log for strictly positive series). */
  transform?: 'auto' | 'none' | 'log';
  /** Linear trend term (default 'auto': with and without). */
  trend?: Switch;
  /**
   * Linear trend term of level structures on the log scale, an exponential line (default: 'off'
   * when `trend` is 'auto', else as `trend`).
   */
  logTrend?: Switch;
  /** Seasonal lag y[t−s] (default 'off'). */
  seasonalLag?: Switch;
  /** Differencing (default 'none'; 'auto' tries none, first and, with a season, seasonal). */
  differencing?: Differencing | 'auto';
  /** Inputs the search may use (default: all inputs of the series). */
  inputs?: string[];
  /** Ranking criterion (default 'aicc'). */
  criterion?: Criterion;
  /** First row of the common sample, when later than the largest history (to compare searches). */
  sampleStart?: number;
  /** Lags of the Ljung–Box check (default min(10 or 2s, ⌊n/5⌋)). */
  whitenessLags?: number;
  /** Family definitions to draw from (default: the registry's). */
  registry?: readonly FamilyDefinition[];
  /** Called after each candidate is scored, with the count done and the total (progress bars). */
  onProgress?: (done: number, total: number) => void;
}

export const SEARCH_DEFAULTS = {
  maxAr: 3,
  maxInputLags: 2,
  maxDelay: 2,
  harmonics: 'auto' as const,
  autoHarmonicsCap: 2,
  autoFullSeasonCap: 12,
  transform: 'auto' as const,
  trend: 'auto' as const,
  seasonalLag: 'off' as const,
  differencing: 'none' as const,
  criterion: 'aicc' as Criterion,
};

export interface CandidateResult {
  key: string;
  label: string;
  family: string;
  spec: StructureSpec;
  structure: Structure;
  status: 'fitted' | 'failed';
  /** Why a failed candidate could not be fitted, and the kind of failure (`failureKind`). */
  reason?: string;
  failure?: FailureKind;
  /** 1-based position among fitted candidates (null for failed ones). */
  rank: number | null;
  /** Value of the ranking criterion, its distance to the best, and the Akaike weight. */
  score: number;
  delta: number;
  weight: number;
  aic: number;
  aicc: number;
  bic: number;
  logLik: number;
  rss: number;
  /** Parameters counted: active coefficients + 1. */
  k: number;
  /** Observations scored. */
  n: number;
  /** Time indices scored, [from, to). */
  from: number;
  to: number;
  estimate?: Estimate;
}

/**
 * Why a candidate was set aside: `explosive` (its fitted dynamics run away: a root on or outside
 * the unit circle, a state that blows up in finite time), `estimation` (the fit itself failed:
 * rank loss, a transform the data do not allow, too few rows), `non-finite` (its one-step
 * predictions are not finite), `exact-fit` (zero one-step errors).
 */
export type FailureKind = 'explosive' | 'estimation' | 'non-finite' | 'exact-fit';

const FAILURE_WORDS: Record<FailureKind, string> = {
  explosive: 'explosive (fitted dynamics run away)',
  estimation: 'not estimable',
  'non-finite': 'with non-finite predictions',
  'exact-fit': 'exact fits (an input restates the target)',
};

/** Counts of set-aside candidates by kind (kinds with none left out). */
export function setAsideCounts(failures: readonly Pick<CandidateResult, 'failure'>[]): Partial<Record<FailureKind, number>> {
  const out: Partial<Record<FailureKind, number>> = {};
  for (const k of Object.keys(FAILURE_WORDS) as FailureKind[]) {
    const c = failures.filter((f) => (f.failure ?? 'estimation') === k).length;
    if (c > 0) out[k] = c;
  }
  return out;
}

/** The counts in words, e.g. "35 explosive (fitted dynamics run away), 2 not estimable". */
export function setAsideWords(counts: Partial<Record<FailureKind, number>>): string {
  return (Object.keys(FAILURE_WORDS) as FailureKind[])
    .filter((k) => (counts[k] ?? 0) > 0)
    .map((k) => `${counts[k]} ${FAILURE_WORDS[k]}`)
    .join(', ');
}

export interface SearchSample {
  from: number;
  to: number;
  n: number;
  /** First and last scored time stamps, formatted for the frequency. */
  start: string;
  end: string;
}

export interface SearchWinner {
  structure: Structure;
  estimate: Estimate;
  result: CandidateResult;
  /** The fitted equation, coefficients inline (their standard errors are in `estimate.se`). */
  equation: string;
  derived: Derived[];
  /** One-step predictions ẑ and residuals z − ẑ on the common sample (scoring scale). */
  predictions: Float64Array;
  residuals: Float64Array;
  whiteness: LjungBoxResult;
}

export interface SearchResult {
  series: { name: string; frequency: string; step?: number; season: number | null; length: number; inputs: string[]; source?: string };
  criterion: Criterion;
  bounds: CandidateBounds;
  families: string[];
  sample: SearchSample;
  /** Fitted candidates best first, then failed ones in grid order. */
  ranking: CandidateResult[];
  fitted: number;
  failed: number;
  /** The failed candidates counted by why they were set aside. */
  setAside: Partial<Record<FailureKind, number>>;
  winner: SearchWinner;
  warnings: string[];
  /** Which season the data support, when the search ran through seasons.ts `searchSeasons`. */
  seasons?: SeasonEvidence;
}

function checkInt(name: string, value: number, min: number, max: number): number {
  if (!Number.isInteger(value) || value < min || value > max) {
    throw new UsageError('bad-search-bound', `search bound ${name} must be a whole number from ${min} to ${max}`, {
      found: String(value),
      expected: `${min}…${max}`,
    });
  }
  return value;
}

function switchValues(s: Switch): boolean[] {
  return s === 'on' ? [true] : s === 'off' ? [false] : [false, true];
}

/** Checks the series itself: finite target, not constant, complete inputs unlike the target. */
function validateSeries(series: Series): void {
  const y = series.values;
  const where = (t: number) => formatTime(series.time[t], series.frequency);
  for (let t = 0; t < y.length; t++) {
    if (!Number.isFinite(y[t])) {
      throw new DataError('missing-values', `series "${series.name}" has a missing value at ${where(t)}`, {
        column: series.name,
        found: String(y[t]),
        expected: 'a complete series',
        hint: 'fill or drop the gap when loading',
      });
    }
  }
  let min = Infinity;
  let max = -Infinity;
  for (let t = 0; t < y.length; t++) {
    if (y[t] < min) min = y[t];
    if (y[t] > max) max = y[t];
  }
  if (y.length > 0 && max - min <= 1e-12 * Math.max(1, Math.abs(max))) {
    throw new ModelError('constant-series', `series "${series.name}" is constant (every value is ${y[0]}); there is nothing to identify`, {
      column: series.name,
      found: String(y[0]),
      expected: 'a series that varies',
    });
  }
  for (const inp of series.inputs) {
    if (inp.values.length !== y.length) {
      throw new DataError('input-length', `input "${inp.name}" has ${inp.values.length} values, the series ${y.length}`, {
        column: inp.name,
        expected: `${y.length} values`,
      });
    }
    for (let t = 0; t < y.length; t++) {
      if (!Number.isFinite(inp.values[t])) {
        throw new DataError('input-missing', `input "${inp.name}" has a missing value at ${where(t)}`, {
          column: inp.name,
          found: String(inp.values[t]),
          expected: 'a value at every time of the series',
          hint: 'inputs must be complete: fill the gap in the file or leave the input out',
        });
      }
    }
    let same = true;
    for (let t = 0; t < y.length && same; t++) same = inp.values[t] === y[t];
    if (same) {
      throw new UsageError('input-is-target', `input "${inp.name}" is identical to the series "${series.name}" itself`, {
        column: inp.name,
        expected: 'an input that differs from the target',
        hint: 'an input must be another variable; leave this one out',
      });
    }
  }
}

/**
 * The default AR bound for a series of n points: 3, lowered to max(1, ⌊n/10⌋) on short series.
 * Every candidate loses the longest lag's first rows from the common sample, so the lags may
 * take at most a tenth of the observations: 1 lag below 20 points, 2 below 30.
 */
export function defaultMaxAr(n: number): number {
  return Math.min(SEARCH_DEFAULTS.maxAr, Math.max(1, Math.floor(n / 10)));
}

/**
 * The harmonic counts 'auto' tries for season s in level structures (ARX, ODE): 0 … min(2, ⌊s/2⌋).
 * @example autoHarmonics(12) → [0, 1, 2]; autoHarmonics(2) → [0, 1]
 */
export function autoHarmonics(s: number): number[] {
  return Array.from({ length: Math.min(SEARCH_DEFAULTS.autoHarmonicsCap, maxHarmonics(s)) + 1 }, (_, k) => k);
}

/**
 * The harmonic counts 'auto' tries for season s in the structures of the change (the change and
 * smoothed-level families): none, one pair (the fundamental wave) and the full set ⌊s/2⌋, which
 * spans every periodic pattern (terms.ts), when that takes at most `autoFullSeasonCap` (12)
 * periods, i.e. at most 11 seasonal columns; for longer seasons as `autoHarmonics`. So quarterly
 * data try K = 0, 1, 2 and monthly data K = 0, 1, 6. These structures carry the series on from
 * its end, and the harmonics of the change are all the seasonal memory they have; on the
 * accuracy benchmark's monthly data the full set improved them (README), while level structures
 * scored the same with it at about twice their cost per candidate.
 * @example autoChangeHarmonics(12) → [0, 1, 6]; autoChangeHarmonics(4) → [0, 1, 2]; autoChangeHarmonics(52) → [0, 1, 2]
 */
export function autoChangeHarmonics(s: number): number[] {
  const full = maxHarmonics(s);
  if (s > SEARCH_DEFAULTS.autoFullSeasonCap) return autoHarmonics(s);
  return [...new Set([0, 1, full].map((k) => Math.min(k, full)))];
}

/** Resolves options to explicit bounds. */
export function resolveBounds(series: Series, options: SearchOptions = {}): CandidateBounds {
  const maxAr = checkInt('maxAr', options.maxAr ?? defaultMaxAr(series.values.length), 0, 24);
  const maxInputLags = checkInt('maxInputLags', options.maxInputLags ?? SEARCH_DEFAULTS.maxInputLags, 0, 24);
  const maxDelay = checkInt('maxDelay', options.maxDelay ?? SEARCH_DEFAULTS.maxDelay, 0, 60);
  const season = options.season !== undefined ? options.season : series.season;
  if (season !== null && (!Number.isInteger(season) || season < 2) && !isHarmonicSeason(season)) {
    throw new UsageError('bad-season', 'the season length must be a whole number ≥ 2', { found: String(season), expected: 'an integer ≥ 2 (or, for harmonics alone, a multiple of 1/4 such as 365.25)' });
  }
  // A season of whole quarter periods (365.25 days) serves harmonics only: no seasonal lag or differences.
  const whole = season !== null && Number.isInteger(season);
  let harmonics: number[] = [];
  let changeHarmonics: number[] = [];
  if (season !== null) {
    const h = options.harmonics ?? SEARCH_DEFAULTS.harmonics;
    harmonics = h === 'auto' ? autoHarmonics(season) : Array.from({ length: checkInt('harmonics', h, 0, maxHarmonics(season)) + 1 }, (_, k) => k);
    changeHarmonics = h === 'auto' ? autoChangeHarmonics(season) : harmonics;
  } else if (typeof options.harmonics === 'number' && options.harmonics > 0) {
    throw new UsageError('no-season', `harmonics need a season; series "${series.name}" has none`, {
      found: `harmonics ${options.harmonics}`,
      expected: 'a season length (set one when loading) or harmonics 0',
    });
  }
  const positive = isStrictlyPositive(series.values);
  const transform = options.transform ?? SEARCH_DEFAULTS.transform;
  let transforms: Transform[];
  if (transform === 'log') {
    if (!positive) {
      throw new UsageError('log-not-positive', `the log transform needs a strictly positive series; "${series.name}" has values ≤ 0`, {
        expected: 'all values > 0',
        hint: 'use --transform none or auto',
      });
    }
    transforms = ['log'];
  } else if (transform === 'none') transforms = ['none'];
  else transforms = positive ? ['none', 'log'] : ['none'];
  const known = series.inputs.map((i) => i.name);
  const inputs = options.inputs ?? known;
  for (const name of inputs) {
    if (!known.includes(name)) {
      throw new UsageError('unknown-input', `the search was asked to use input "${name}", which the series does not have`, {
        found: name,
        expected: known.length > 0 ? `one of ${known.join(', ')}` : 'no inputs (the series has none)',
      });
    }
  }
  const diff = options.differencing ?? SEARCH_DEFAULTS.differencing;
  const differencing: Differencing[] =
    diff === 'auto' ? (whole ? ['none', 'first', 'seasonal'] : ['none', 'first']) : [diff];
  if (diff === 'seasonal' && !whole) {
    throw new UsageError('no-season', `seasonal differencing needs a season; series "${series.name}" has none`, { expected: 'a season length' });
  }
  const seasonalLag = !whole ? [false] : switchValues(options.seasonalLag ?? SEARCH_DEFAULTS.seasonalLag);
  const trend = options.trend ?? SEARCH_DEFAULTS.trend;
  return {
    maxAr,
    maxInputLags,
    maxDelay,
    inputs: known.filter((n) => inputs.includes(n)),
    harmonics,
    changeHarmonics,
    season,
    transforms,
    trend: switchValues(trend),
    logTrend: switchValues(options.logTrend ?? (trend === 'auto' ? 'off' : trend)),
    seasonalLag,
    differencing,
  };
}

function failed(s: Structure, reason: string, from: number, to: number, failure: FailureKind): CandidateResult {
  return {
    key: s.key,
    label: s.label,
    family: s.family,
    spec: s.spec,
    structure: s,
    status: 'failed',
    reason,
    failure,
    rank: null,
    score: NaN,
    delta: NaN,
    weight: 0,
    aic: NaN,
    aicc: NaN,
    bic: NaN,
    logLik: NaN,
    rss: NaN,
    k: s.terms.length + 1,
    n: to - from,
    from,
    to,
  };
}

/** Runs the structure search; see the file comment for the procedure and defaults. */
export function search(series: Series, options: SearchOptions = {}): SearchResult {
  validateSeries(series);
  const registry = options.registry ?? FAMILIES;
  const criterion = options.criterion ?? SEARCH_DEFAULTS.criterion;
  if (criterion !== 'aic' && criterion !== 'aicc' && criterion !== 'bic') {
    throw new UsageError('bad-criterion', `unknown criterion "${String(criterion)}"`, { found: String(criterion), expected: 'aicc, aic or bic' });
  }
  const names = options.families ?? familyNames(registry);
  const families = names.map((n) => getFamily(n, registry));
  const bounds = resolveBounds(series, options);
  const candidates: Structure[] = [];
  for (const f of families) candidates.push(...f.candidates(series, bounds));
  const guided = families.filter((f) => f.explore !== undefined);
  if (candidates.length === 0 && guided.length === 0) {
    throw new UsageError('no-candidates', 'the search bounds leave no candidate structure', { expected: 'at least one family and valid bounds' });
  }

  const n = series.values.length;
  let maxHistory = 0;
  let minTerms = Infinity;
  let maxTerms = 0;
  for (const s of candidates) {
    maxHistory = Math.max(maxHistory, s.history);
    minTerms = Math.min(minTerms, s.terms.length);
    maxTerms = Math.max(maxTerms, s.terms.length);
  }
  // A guided family's structures are not known before scoring: the sample starts after the
  // longest history any of them may need.
  for (const f of guided) maxHistory = Math.max(maxHistory, f.maxHistory ? f.maxHistory(series, bounds) : 0);
  if (!Number.isFinite(minTerms)) minTerms = 1;
  let from = maxHistory;
  if (options.sampleStart !== undefined) {
    if (!Number.isInteger(options.sampleStart) || options.sampleStart < maxHistory) {
      throw new UsageError('bad-sample-start', `the common sample cannot start at ${options.sampleStart}: the candidates need ${maxHistory} past points`, {
        found: String(options.sampleStart),
        expected: `an index ≥ ${maxHistory}`,
      });
    }
    from = options.sampleStart;
  }
  const to = n;
  // The smallest candidate needs k = terms + 1 parameters and n − k − 1 > 0 rows for AICc.
  const minRows = minTerms + 3;
  if (to - from < minRows) {
    throw new ModelError(
      'too-short',
      `series "${series.name}" has ${n} points; the search needs at least ${from + minRows} ` +
        `(${from} past points for the longest lag plus ${minRows} rows to fit the smallest candidate; ` +
        `${from + maxTerms + 3} to fit every candidate)`,
      { found: `${n} points`, expected: `at least ${from + minRows} points`, hint: 'lower --max-ar, --max-delay, --max-input-lags or the seasonal options' },
    );
  }

  const y = series.values;
  const zByTransform = new Map<Transform, Float64Array>();
  const jacByTransform = new Map<Transform, number>();
  const tssByTransform = new Map<Transform, number>();
  const zOf = (t: Transform) => {
    let z = zByTransform.get(t);
    if (!z) {
      z = forward(t, y);
      zByTransform.set(t, z);
      jacByTransform.set(t, logJacobian(t, y, from, to));
      let mean = 0;
      for (let i = from; i < to; i++) mean += z[i];
      mean /= to - from;
      let tss = 0;
      for (let i = from; i < to; i++) tss += (z[i] - mean) ** 2;
      tssByTransform.set(t, tss);
    }
    return z;
  };
  const rows = to - from;
  /** Fits and scores one candidate on the common sample [from, to). */
  const scoreOne = (s: Structure): CandidateResult => {
    let est: Estimate;
    try {
      est = s.estimate(series, from, to);
    } catch (e) {
      if (e instanceof CertaError) return failed(s, e.message, from, to, 'estimation');
      throw e;
    }
    if (!isStable(s, est.theta, registry, { series, to })) return failed(s, unstableReason(s, registry), from, to, 'explosive');
    // The fit's own one-step predictions when the structure gives them (Estimate.oneStep).
    const pred = est.oneStep !== undefined && est.oneStep.length === rows ? est.oneStep : s.oneStep(est.theta, series, from, to);
    const z = zOf(s.transform);
    let rss = 0;
    for (let t = from; t < to; t++) {
      const e = z[t] - pred[t - from];
      rss += e * e;
    }
    if (!Number.isFinite(rss)) return failed(s, 'non-finite one-step predictions', from, to, 'non-finite');
    let active = 0;
    for (const a of est.active) if (a) active++;
    const k = active + 1;
    if (rows - k - 1 <= 0) return failed(s, `too short: ${rows} rows for ${k} parameters (AICc needs n − k − 1 > 0)`, from, to, 'estimation');
    // An exact fit (up to rounding: RSS ≤ 1e−20 of the total sum of squares) makes log L
    // unbounded; it means an input restates the target, not that the structure is right.
    if (rss <= 1e-20 * (tssByTransform.get(s.transform) ?? 0)) {
      return failed(s, 'exact fit (zero one-step errors): the target is a deterministic function of its regressors', from, to, 'exact-fit');
    }
    const c = criteria(rss, rows, k, { logJacobian: jacByTransform.get(s.transform) ?? 0 });
    return {
      key: s.key,
      label: s.label,
      family: s.family,
      spec: s.spec,
      structure: s,
      status: 'fitted',
      rank: null,
      score: c[criterion],
      delta: 0,
      weight: 0,
      aic: c.aic,
      aicc: c.aicc,
      bic: c.bic,
      logLik: c.logLik,
      rss,
      k,
      n: rows,
      from,
      to,
      estimate: est,
    };
  };
  // Every candidate is scored once, in the order it is first met (grid order, then the order
  // guided families try theirs); a key met again returns its first result.
  const results: CandidateResult[] = [];
  const byKey = new Map<string, CandidateResult>();
  let total = candidates.length;
  const scorer: CandidateScorer = {
    score(s: Structure): number {
      let r = byKey.get(s.key);
      if (r === undefined) {
        options.onProgress?.(results.length, Math.max(total, results.length + 1));
        r = scoreOne(s);
        byKey.set(s.key, r);
        results.push(r);
      }
      return r.status === 'fitted' ? r.score : Infinity;
    },
  };
  for (const s of candidates) scorer.score(s);
  for (const f of guided) {
    total = results.length;
    f.explore?.(series, bounds, scorer);
  }
  if (results.length === 0) {
    throw new UsageError('no-candidates', 'the search bounds leave no candidate structure', { expected: 'at least one family and valid bounds' });
  }

  const fitted = results.filter((r) => r.status === 'fitted');
  const failures = results.filter((r) => r.status === 'failed');
  if (fitted.length === 0) {
    const reasons = [...new Set(failures.map((r) => r.reason))].slice(0, 3).join('; ');
    throw new ModelError('no-fit', `none of the ${results.length} candidate structures could be fitted to "${series.name}"`, {
      found: reasons,
      expected: 'at least one candidate fitted',
      hint: 'check the inputs for constant or duplicated columns, or widen the search bounds',
    });
  }
  fitted.sort((a, b) => a.score - b.score || (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
  const weights = akaikeWeights(fitted.map((r) => r.score));
  const best = fitted[0].score;
  fitted.forEach((r, i) => {
    r.rank = i + 1;
    r.delta = r.score - best;
    r.weight = weights[i];
  });

  const top = fitted[0];
  const structure = top.structure;
  const estimate = top.estimate as Estimate;
  const predictions = structure.oneStep(estimate.theta, series, from, to);
  const z = zOf(structure.transform);
  const residuals = new Float64Array(rows);
  for (let t = from; t < to; t++) residuals[t - from] = z[t] - predictions[t - from];
  const mask = dynamicMask(structure, registry);
  let dynamic = 0;
  mask.forEach((m, j) => {
    if (m && estimate.active[j]) dynamic++;
  });
  const whiteness = ljungBox(residuals, { lags: options.whitenessLags ?? defaultLjungBoxLags(rows, bounds.season), fittedDynamic: dynamic });
  const warnings: string[] = [...estimate.warnings];
  if (!whiteness.white) {
    warnings.push(
      `the winner's residuals are not white (Ljung–Box Q = ${whiteness.q.toFixed(2)} on ${whiteness.dof} dof, p = ${whiteness.pValue.toPrecision(2)} < ${whiteness.level}): ` +
        'structure is left in the errors; consider more lags, seasonal terms or another input',
    );
  }
  // Explosive fits are routine (the ranking and the summary count them); a fit that fails
  // otherwise usually points at the data (a constant or duplicated input, a transform they do not allow).
  const troubled = failures.filter((r) => r.failure !== 'explosive');
  if (troubled.length > 0) {
    warnings.push(`${troubled.length} of ${results.length} candidates could not be estimated: ${setAsideWords(setAsideCounts(troubled))}; first reason: ${troubled[0].reason}`);
  }

  return {
    series: {
      name: series.name,
      frequency: series.frequency,
      ...(series.step !== undefined && series.step > 1 ? { step: series.step } : {}),
      season: series.season,
      length: n,
      inputs: series.inputs.map((i) => i.name),
      ...(series.source !== undefined ? { source: series.source } : {}),
    },
    criterion,
    bounds,
    families: names,
    sample: {
      from,
      to,
      n: rows,
      start: formatTime(series.time[from], series.frequency),
      end: formatTime(series.time[to - 1], series.frequency),
    },
    ranking: [...fitted, ...failures],
    fitted: fitted.length,
    failed: failures.length,
    setAside: setAsideCounts(failures),
    winner: {
      structure,
      estimate,
      result: top,
      equation: structure.describe(estimate.theta),
      derived: structure.derived(estimate.theta, series),
      predictions,
      residuals,
      whiteness,
    },
    warnings,
  };
}
