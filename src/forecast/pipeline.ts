/**
 * The main job as one function: search on the training part, evaluate on the holdout, refit the
 * asserted structure on all data, forecast with intervals. `certa forecast`, the library's
 * `forecast()` and the accuracy benchmark all run this same code path.
 *
 * Defaults: horizon = two seasons (8 periods without a season); holdout = the smaller of two
 * seasons (8 periods without a season) and 20 % of the series, 0 to skip evaluation; levels
 * 50 and 90 % (DEFAULT_LEVELS); forgetting λ = 1; future inputs repeat their last season (seasonal series) or
 * are held at their last values, unless given; the point forecast combines the leading
 * candidates, by Akaike weights within each group (a family on one scale) and by tempered
 * weights of the groups' best criterion values across groups (combine.ts; `combine: false` keeps
 * the asserted structure's own path).
 *
 * Combination. The asserted structure stays the single winner (its equation, refit, online
 * learner and holdout evaluation are unchanged); only the final point forecast is the combined
 * mean of the leading candidates' forecasts, each refitted on all data, and the winner's
 * interval bands are moved by the same amount at each step (their widths kept).
 */
import type { Series } from '../data/series.js';
import { sliceSeries, timesAfter } from '../data/series.js';
import { ModelError, UsageError } from '../data/errors.js';
import type { SearchOptions, SearchResult } from '../select/search.js';
import { searchSeasons } from '../select/seasons.js';
import type { Derived, Estimate, Structure } from '../models/structure.js';
import { forward, inverse } from '../models/transforms.js';
import { backtest, type Backtest } from '../evaluate/backtest.js';
import { DEFAULT_LEVELS, forecastWithIntervals, type ForecastPaths, type IntervalMethod, type IntervalOptions } from './intervals.js';
import { defaultInputPolicy, futureByPolicy, type FutureInputs, type InputPolicy } from './future.js';
import { Learner } from './online.js';
import { combinationMembers, combineForecasts, combinedPaths, replacesOwn, type Combination, type CombineOptions, type Member } from './combine.js';
import { calibratedPaths, OriginPaths, type CalibrationOptions } from './calibrate.js';

export interface ForecastOptions {
  search?: SearchOptions;
  horizon?: number;
  holdout?: number;
  levels?: number[];
  /** Forgetting factor of online learning λ ∈ (0, 1]. */
  forgetting?: number;
  inputPolicy?: InputPolicy;
  /** Future inputs for the final forecast (from a file); overrides `inputPolicy`. */
  future?: (history: Series, h: number, times: number[]) => FutureInputs;
  intervals?: { method?: IntervalMethod; draws?: number; seed?: number; parameterUncertainty?: boolean; calibration?: CalibrationOptions };
  /** Point forecast combined over the leading candidates (combine.ts; default on); false = the winner's path. */
  combine?: CombineOptions | false;
  /** What the point forecast is: 'combined' (default: `combine`'s combination) or 'asserted' (the asserted equation's own path; same as combine: false). */
  point?: 'combined' | 'asserted';
}

export interface AssertedModel {
  structure: Structure;
  estimate: Estimate;
  /** Estimation sample [from, to) of the refit on all data. */
  from: number;
  to: number;
  equation: string;
  derived: Derived[];
  learner: Learner;
}

export interface ForecastRun {
  series: Series;
  horizon: number;
  holdout: number;
  levels: number[];
  forgetting: number;
  /** Search on the training part (all data when holdout is 0). */
  search: SearchResult;
  evaluation: Backtest | null;
  asserted: AssertedModel;
  /**
   * One-step fitted values on the original scale over the estimation sample of the refit, and the
   * one-step residuals on the scoring scale (z − ẑ, the ones intervals resample).
   */
  fitted: { index: Int32Array; values: Float64Array; residuals: Float64Array };
  forecast: { times: Float64Array; paths: ForecastPaths; inputs: FutureInputs; combination: Combination | null };
  warnings: string[];
}

/** Said when the bands could not be calibrated and come from the asserted equation alone. */
export const UNCALIBRATED_WARNING =
  'the series is too short to calibrate the bands on its own forecast errors: they come from the asserted equation alone, under certainty equivalence, and are likely too narrow';

export function defaultHorizon(series: Series): number {
  return series.season ? 2 * series.season : 8;
}

export function defaultHoldout(series: Series): number {
  const cap = series.season ? 2 * series.season : 8;
  return Math.min(cap, Math.floor(0.2 * series.values.length));
}

function checkWhole(name: string, v: number, min: number, hint?: string): number {
  if (!Number.isInteger(v) || v < min) {
    throw new UsageError(`bad-${name}`, `--${name} must be a whole number ≥ ${min}`, { found: String(v), expected: `an integer ≥ ${min}`, hint });
  }
  return v;
}

/** Runs the main job on one regular series (see the module comment). */
export function forecastSeries(given: Series, options: ForecastOptions = {}): ForecastRun {
  // One season for every stage: a season asked of the search is the series' season.
  const season = options.search?.season;
  const series = season !== undefined && season !== given.season ? { ...given, season } : given;
  const n = series.values.length;
  const horizon = checkWhole('horizon', options.horizon ?? defaultHorizon(series), 1);
  const holdout = checkWhole('holdout', options.holdout ?? defaultHoldout(series), 0);
  if (holdout >= n) {
    throw new UsageError('holdout-too-long', `--holdout ${holdout} leaves no training data: series "${series.name}" has ${n} points`, {
      found: String(holdout),
      expected: `fewer than ${n} points (and enough left to fit a model)`,
      hint: 'lower --holdout, or use --holdout 0 to skip evaluation',
    });
  }
  const levels = (options.levels ?? [...DEFAULT_LEVELS]).map((l) => {
    if (!(l > 0 && l < 100)) throw new UsageError('bad-level', 'interval levels must lie strictly between 0 and 100', { found: String(l), expected: 'e.g. 50,90' });
    return l;
  });
  const forgetting = options.forgetting ?? 1;
  if (!(forgetting > 0 && forgetting <= 1)) {
    throw new UsageError('bad-forgetting', 'the forgetting factor must lie in (0, 1]', { found: String(forgetting), expected: 'a number such as 1, 0.99 or 0.95' });
  }
  const intervalOptions = { levels, ...options.intervals };
  const warnings: string[] = [];

  const nTrain = n - holdout;
  const train = sliceSeries(series, 0, nTrain);
  let found: SearchResult;
  try {
    found = searchSeasons(train, options.search);
  } catch (e) {
    if (e instanceof ModelError && holdout > 0 && e.code === 'too-short') {
      throw new ModelError(e.code, `${e.message} after holding out the last ${holdout}`, { ...e.context, hint: 'lower --holdout or use --holdout 0' });
    }
    throw e;
  }
  warnings.push(...found.warnings);
  const { structure } = found.winner;
  const from = found.sample.from;

  if (options.point !== undefined && options.point !== 'combined' && options.point !== 'asserted') {
    throw new UsageError('bad-point', 'the point forecast must be "combined" or "asserted"', { found: String(options.point), expected: 'combined or asserted' });
  }
  const combine = options.combine === false || options.point === 'asserted' ? null : options.combine ?? {};
  let evaluation: Backtest | null = null;
  // The calibrations of the holdout forecast and of the final one re-run the same members from
  // mostly the same origins: their paths are made once (calibrate.ts, OriginPaths).
  const shared = new OriginPaths(series, from, Math.max(horizon, holdout));
  if (holdout > 0) {
    const fixedInputs = series.inputs.map((i) => i.values.slice(nTrain, n));
    const fixed = deliveredForecast(found, structure, found.winner.estimate, train, fixedInputs, holdout, found.winner.residuals, intervalOptions, combine, (_, e) => e, from, shared);
    evaluation = backtest(structure, found.winner.estimate, series, nTrain, {
      horizon,
      lambda: forgetting,
      sampleFrom: from,
      fixed: fixed.paths,
      alone: fixed.alone,
    });
    warnings.push(...evaluation.warnings);
    if (fixed.uncalibrated) warnings.push('the training part is too short to calibrate the holdout forecast’s bands: its coverage is that of the asserted equation’s own bands');
  }

  // Assert: the chosen structure refitted on all data.
  const estimate = holdout > 0 ? structure.estimate(series, from, n) : found.winner.estimate;
  const learner = Learner.start(structure, estimate.active, series, from, n, { lambda: forgetting });
  const pred = structure.oneStep(estimate.theta, series, from, n);
  const z = forward(structure.transform, series.values);
  const residuals = new Float64Array(pred.length);
  const fittedValues = new Float64Array(pred.length);
  const index = new Int32Array(pred.length);
  for (let i = 0; i < pred.length; i++) {
    residuals[i] = z[from + i] - pred[i];
    fittedValues[i] = inverse(structure.transform, pred[i]);
    index[i] = from + i;
  }

  const times = timesAfter(series, horizon);
  const inputs =
    series.inputs.length === 0
      ? { values: [], source: 'no inputs' }
      : options.future
        ? options.future(series, horizon, Array.from(times))
        : futureByPolicy(series, horizon, options.inputPolicy ?? defaultInputPolicy(series));
  // Members other than the winner are refitted on all data after a holdout search.
  const refit = (s: Structure, e: Estimate): Estimate => (s.key === structure.key ? estimate : holdout > 0 ? s.estimate(series, from, n) : e);
  const { paths, combination, uncalibrated } = deliveredForecast(found, structure, estimate, series, inputs.values, horizon, residuals, intervalOptions, combine, refit, from, shared);
  for (let j = 0; j < horizon; j++) {
    if (!Number.isFinite(paths.point[j])) {
      warnings.push(`the forecast is not finite from step ${j + 1} on: the asserted equation diverges over this horizon`);
      break;
    }
  }
  if (uncalibrated) warnings.push(UNCALIBRATED_WARNING);

  return {
    series,
    horizon,
    holdout,
    levels,
    forgetting,
    search: found,
    evaluation,
    asserted: {
      structure,
      estimate,
      from,
      to: n,
      equation: structure.describe(estimate.theta),
      derived: structure.derived(estimate.theta, series),
      learner,
    },
    fitted: { index, values: fittedValues, residuals },
    forecast: { times, paths, inputs, combination },
    warnings,
  };
}

/**
 * The forecast certa delivers from the end of `history`: the asserted structure's simulation with
 * its interval bands (intervals.ts) and, unless combining is off, the point replaced by the
 * combination of the leading candidates (combine.ts) with the bands moved by the
 * same amount at each step (their widths kept). `alone` is the asserted structure's own forecast
 * when it differs from the delivered one. The same function serves the holdout's fixed origin and
 * the final forecast, so the evaluation scores exactly what is delivered.
 */
function deliveredForecast(
  found: SearchResult,
  structure: Structure,
  estimate: Estimate,
  history: Series,
  future: Float64Array[],
  h: number,
  residuals: ArrayLike<number>,
  intervals: IntervalOptions,
  combine: CombineOptions | null,
  refit: (s: Structure, e: Estimate) => Estimate,
  from: number,
  shared: OriginPaths,
): { paths: ForecastPaths; alone: ForecastPaths | null; combination: Combination | null; uncalibrated: boolean } {
  const calibrated = intervals.method === undefined || intervals.method === 'calibrated';
  const modelOptions: IntervalOptions = calibrated ? { ...intervals, method: undefined } : intervals;
  let own: ForecastPaths | null = null;
  const ownPaths = (): ForecastPaths => (own ??= forecastWithIntervals(structure, estimate, history, future, h, residuals, modelOptions));
  let combination: Combination | null = null;
  let members: (Member & { share: number })[] = [{ key: structure.key, structure, estimate, group: '', weight: 1, share: 1 }];
  let point: Float64Array = structure.simulate(estimate.theta, history, future, h);
  if (combine !== null) {
    const candidates = combinationMembers(found.ranking, combine).map((m) => {
      try {
        return { ...m, estimate: refit(m.structure, m.estimate) };
      } catch (e) {
        return { ...m, failure: e instanceof Error ? e.message : String(e) };
      }
    });
    combination = combineForecasts(candidates, h, (s, e) => s.simulate(e.theta, history, future, h), history.values, combine);
    if (replacesOwn(combination, structure.key)) {
      point = Float64Array.from(combination.point);
      const shares = new Map(combination.members.map((m) => [m.key, m.share]));
      members = candidates.filter((m) => m.failure === undefined).map((m) => ({ ...m, share: shares.get(m.key) ?? 0 }));
    }
  }
  const replaced = members.length > 1 || members[0].key !== structure.key;
  const used = replaced && combination ? combination.members.filter((m) => !m.excluded && m.share > 0) : [];
  const cal = calibrated ? calibratedPaths(point, members, used, history, from, intervals.levels, intervals.calibration, shared) : null;
  const paths = cal ?? (replaced ? (combinedPaths(ownPaths(), combination as Combination, structure.key) as ForecastPaths) : ownPaths());
  const alone = replaced ? (cal ? { point: structure.simulate(estimate.theta, history, future, h), bands: [], method: paths.method } : ownPaths()) : null;
  return { paths, alone, combination, uncalibrated: calibrated && cal === null };
}
