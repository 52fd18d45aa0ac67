/**
 * Out-of-sample evaluation of an asserted structure on the last `holdout` observations.
 *
 * Two views, both reported (Tashman 2000, "Out-of-sample tests of forecasting accuracy",
 * IJF 16:437–450):
 *  (a) fixed origin: one forecast of every holdout point from the end of the training data —
 *      the forecast certa delivers (pipeline.ts: combined over candidates unless switched off),
 *      made by the caller, with the asserted structure's own forecast beside it when they differ;
 *  (b) rolling origin: at each holdout time o the model forecasts o, o+1, …, o+h−1; then y_o
 *      arrives and the parameters learn from it by recursive least squares with forgetting λ
 *      (no structure re-search). The same rolling run with frozen parameters is kept beside it,
 *      so the value of online learning is visible.
 * Forecasts over the holdout use the actual inputs observed there (an ex-post evaluation: the
 * equation is judged, not a guess of the inputs).
 */
import type { Series } from '../data/series.js';
import { sliceSeries } from '../data/series.js';
import type { Estimate, Structure } from '../models/structure.js';
import { Learner } from '../forecast/online.js';
import type { ForecastPaths } from '../forecast/intervals.js';
import { BASELINES, BASELINE_NAMES, type BaselineName } from './baselines.js';
import { metricTable, type MetricTable } from './metrics.js';

export interface RollingRun {
  /** One-step forecast of each holdout point (index j ↔ time nTrain + j). */
  oneStep: Float64Array;
  /** forecasts[j][k]: the (k+1)-step forecast made at origin nTrain + j, of time nTrain + j + k. */
  paths: Float64Array[];
  /** Mean absolute error by lead time 1…h over all origins that reach it. */
  maeByLead: Float64Array;
}

export interface BacktestOptions {
  /** Rolling-origin lead times (default: the holdout length). */
  horizon: number;
  /** Forgetting factor of the rolling run (default 1). */
  lambda: number;
  /** First time index of the estimation sample (the search's common sample start). */
  sampleFrom: number;
  /** The delivered fixed-origin forecast of the holdout from the end of training, with bands. */
  fixed: ForecastPaths;
  /** The asserted structure's own fixed-origin forecast, when the delivered one combines several. */
  alone?: ForecastPaths | null;
}

export interface MetricRow {
  /** What was forecast and how: `model`, `model rolling (learning)`, `last-value`, ... */
  method: string;
  view: 'fixed-origin' | 'rolling-one-step';
  metrics: MetricTable;
  /** Interval metrics per level (fixed origin of the model only). */
  intervals?: { level: number; coverage: number; intervalScore: number }[];
}

/** The holdout verdict against the baselines (fixed origin, by MASE). */
export interface BaselineVerdict {
  /** The baseline with the lowest fixed-origin MASE, its MASE, and the delivered forecast's. */
  baseline: string;
  baselineMase: number;
  modelMase: number;
  /** True when that baseline's MASE is strictly below the delivered forecast's. */
  beaten: boolean;
}

export interface Backtest {
  nTrain: number;
  holdout: number;
  times: Float64Array;
  actual: Float64Array;
  fixed: ForecastPaths;
  rolling: RollingRun;
  frozen: RollingRun;
  table: MetricRow[];
  /** The best baseline on the fixed-origin holdout and whether it beat the model (null when MASE is undefined). */
  verdict: BaselineVerdict | null;
  warnings: string[];
}

/** Runs both views for a structure estimated on the first `nTrain` points of `series`. */
export function backtest(structure: Structure, estimate: Estimate, series: Series, nTrain: number, options: BacktestOptions): Backtest {
  const n = series.values.length;
  const holdout = n - nTrain;
  const actual = series.values.slice(nTrain, n);
  const fixed = options.fixed;

  const learner = Learner.start(structure, estimate.active, series, options.sampleFrom, nTrain, { lambda: options.lambda });
  const rolling = roll(structure, series, nTrain, options.horizon, () => learner.theta, (o) => learner.learn(sliceSeries(series, 0, o + 1)));
  const frozenTheta = estimate.theta;
  const frozen = roll(structure, series, nTrain, options.horizon, () => frozenTheta, () => undefined);

  const season = series.season;
  const trainValues = series.values.slice(0, nTrain);
  const warnings: string[] = [];
  const rows: MetricRow[] = [];
  const opts = { train: trainValues, season };
  const modelRow: MetricRow = { method: 'model', view: 'fixed-origin', metrics: metricTable(actual, fixed.point, opts) };
  modelRow.intervals = fixed.bands.map((b) => {
    const m = metricTable(actual, fixed.point, { ...opts, intervals: { lower: b.lower, upper: b.upper, alpha: 1 - b.level / 100 } });
    return { level: b.level, coverage: m.coverage ?? NaN, intervalScore: m.intervalScore ?? NaN };
  });
  rows.push(modelRow);
  if (options.alone) rows.push({ method: 'asserted equation alone', view: 'fixed-origin', metrics: metricTable(actual, options.alone.point, opts) });
  for (const name of fixedBaselines(season)) {
    rows.push({ method: name, view: 'fixed-origin', metrics: metricTable(actual, BASELINES[name](trainValues, holdout, season), opts) });
  }
  rows.push({ method: `model, learning (λ = ${options.lambda})`, view: 'rolling-one-step', metrics: metricTable(actual, rolling.oneStep, opts) });
  rows.push({ method: 'model, frozen', view: 'rolling-one-step', metrics: metricTable(actual, frozen.oneStep, opts) });
  for (const name of fixedBaselines(season)) {
    const one = new Float64Array(holdout);
    for (let j = 0; j < holdout; j++) one[j] = BASELINES[name](series.values.slice(0, nTrain + j), 1, season)[0];
    rows.push({ method: name, view: 'rolling-one-step', metrics: metricTable(actual, one, opts) });
  }
  const zeros = modelRow.metrics.mapeExcluded;
  if (zeros > 0) warnings.push(`MAPE leaves out ${zeros} holdout point(s) whose actual value is zero`);
  const verdict = baselineVerdict(rows);
  if (verdict?.beaten) {
    warnings.push(
      `the ${verdict.baseline} baseline beat the model on the holdout: MASE ${verdict.baselineMase.toFixed(3)} against the model's ${verdict.modelMase.toFixed(3)} ` +
        `(fixed origin, ${holdout} points); treat the forecast with care, or compare with that baseline`,
    );
  }
  return { nTrain, holdout, times: series.time.slice(nTrain, n), actual, fixed, rolling, frozen, table: rows, verdict, warnings };
}

/**
 * The baseline with the lowest fixed-origin MASE against the delivered forecast's (the `model`
 * row); null when either MASE is not finite. Ties go to the model (not beaten).
 */
export function baselineVerdict(rows: readonly MetricRow[]): BaselineVerdict | null {
  const model = rows.find((r) => r.view === 'fixed-origin' && r.method === 'model');
  if (!model || !Number.isFinite(model.metrics.mase)) return null;
  let best: MetricRow | null = null;
  for (const r of rows) {
    if (r.view !== 'fixed-origin' || !(BASELINE_NAMES as readonly string[]).includes(r.method) || !Number.isFinite(r.metrics.mase)) continue;
    if (best === null || r.metrics.mase < best.metrics.mase) best = r;
  }
  if (best === null) return null;
  return { baseline: best.method, baselineMase: best.metrics.mase, modelMase: model.metrics.mase, beaten: best.metrics.mase < model.metrics.mase };
}

function fixedBaselines(season: number | null): BaselineName[] {
  return season ? ['last-value', 'last-season', 'average-change'] : ['last-value', 'average-change'];
}

function roll(structure: Structure, series: Series, nTrain: number, horizon: number, theta: () => Float64Array, observe: (o: number) => unknown): RollingRun {
  const n = series.values.length;
  const holdout = n - nTrain;
  const oneStep = new Float64Array(holdout);
  const paths: Float64Array[] = [];
  const sumAbs = new Float64Array(horizon);
  const count = new Float64Array(horizon);
  for (let o = nTrain; o < n; o++) {
    const h = Math.min(horizon, n - o);
    const history = sliceSeries(series, 0, o);
    const future = series.inputs.map((i) => i.values.slice(o, o + h));
    const path = structure.simulate(theta(), history, future, h);
    paths.push(path);
    oneStep[o - nTrain] = path[0];
    for (let k = 0; k < h; k++) {
      sumAbs[k] += Math.abs(series.values[o + k] - path[k]);
      count[k]++;
    }
    observe(o);
  }
  const maeByLead = sumAbs.map((s, k) => (count[k] > 0 ? s / count[k] : NaN));
  return { oneStep, paths, maeByLead };
}
