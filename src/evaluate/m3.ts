/**
 * Forecast accuracy on the M3 competition series: reading the competition files into Series and
 * scoring a forecaster on their held-back ends. The accuracy benchmark (`npm run bench:accuracy`)
 * and the accuracy guard in the test suite share these functions, so both score the same way.
 *
 * Protocol (Makridakis & Hibon, "The M3-Competition: results, conclusions and implications",
 * International Journal of Forecasting 16 (2000), section 2): for each series the last `nf`
 * values (6 yearly, 8 quarterly) are the test set; the forecaster sees only the values before
 * them. Scores per series:
 * - sMAPE = (1/h) Σ_k 200·|X_k − F_k| / (X_k + F_k) (metrics.ts `smape`), then averaged over
 *   series;
 * - MASE = mean |X_k − F_k| / Q with Q the in-sample mean absolute error of the seasonal naive
 *   forecast of period m on the training part (Hyndman & Koehler 2006; m = 1 yearly, m = 4
 *   quarterly);
 * - the same two for Naive2 (baselines.ts), the competition's benchmark.
 * A forecaster that throws, or returns a non-finite or wrong-length forecast, is counted as a
 * failure and Naive2's forecast is scored in its place, so no series is dropped.
 */
import type { Frequency } from '../data/calendar.js';
import type { Series } from '../data/series.js';
import { DataError } from '../data/errors.js';
import { forecastSeries, type ForecastOptions } from '../forecast/pipeline.js';
import { naive2 } from './baselines.js';
import { mase, smape } from './metrics.js';

/** The M3 frequencies certa scores. */
export type M3Frequency = Extract<Frequency, 'yearly' | 'quarterly'>;

/** One competition series: the whole series and how much of its end is the test set. */
export interface M3Item {
  /** Series id as in the file, trimmed (e.g. "N 1"). */
  id: string;
  frequency: M3Frequency;
  /** Competition domain (MICRO, INDUSTRY, MACRO, FINANCE, DEMOGRAPHIC, OTHER). */
  domain: string;
  /** Test-set length nf (the forecast horizon). */
  horizon: number;
  /** The whole series, test set included. */
  series: Series;
}

/**
 * Reads one M3 file of this project's layout (datasets/m3/README.md): header
 * `series,n,nf,category,start_year,start_period,values`, values space-separated. Time stamps:
 * yearly series start on 1 January of `start_year`; quarterly ones on the first day of quarter
 * `start_period` of `start_year` (a start_period above 4 is read as a month and mapped to its
 * quarter). The period in a yearly file is ignored. Season: none yearly, 4 quarterly.
 * Errors: a `DataError` naming the row when a field is missing, `n` disagrees with the values,
 * or a value is not a finite number.
 */
export function parseM3(text: string, frequency: M3Frequency, file: string): M3Item[] {
  const lines = text.split(/\r?\n/).filter((l) => l.trim() !== '');
  const header = (lines[0] ?? '').split(',').map((s) => s.trim());
  const want = ['series', 'n', 'nf', 'category', 'start_year', 'start_period', 'values'];
  if (header.join(',') !== want.join(',')) {
    throw new DataError('m3-header', `${file}: unexpected header`, { file, row: 1, found: header.join(','), expected: want.join(',') });
  }
  const items: M3Item[] = [];
  for (let r = 1; r < lines.length; r++) {
    const fields = lines[r].split(',');
    const bad = (what: string, found: string): never => {
      throw new DataError('m3-row', `${file}: row ${r + 1}: ${what}`, { file, row: r + 1, found, expected: 'a row as described in datasets/m3/README.md' });
    };
    if (fields.length !== 7) bad('expected 7 fields', `${fields.length} fields`);
    const [id, nText, nfText, domain, yearText, periodText, valuesText] = fields;
    const n = Number(nText);
    const nf = Number(nfText);
    const year = Number(yearText);
    const period = Number(periodText);
    const values = Float64Array.from(valuesText.trim().split(/\s+/), Number);
    if (!Number.isInteger(n) || values.length !== n) bad(`n = ${nText} but ${values.length} values`, nText);
    if (!Number.isInteger(nf) || nf < 1 || nf >= n) bad('nf must be a whole number from 1 to n − 1', nfText);
    if (!Number.isInteger(year) || !Number.isInteger(period) || period < 1) bad('bad start_year or start_period', `${yearText}/${periodText}`);
    if (frequency === 'quarterly' && period > 12) bad('a quarter must be 1…4 (or a month 1…12)', periodText);
    for (const v of values) if (!Number.isFinite(v)) bad('a value is not a number', String(v));
    // One quarterly row of the source file (N1071) gives start_period 9, read as a month: Q3.
    const quarter = period > 4 ? Math.ceil(period / 3) : period;
    const month0 = frequency === 'quarterly' ? 3 * (quarter - 1) : 0;
    const time = Float64Array.from({ length: n }, (_, t) =>
      frequency === 'quarterly' ? Date.UTC(year, month0 + 3 * t, 1) : Date.UTC(year + t, 0, 1),
    );
    const name = id.trim().replace(/\s+/g, ' ');
    items.push({
      id: name,
      frequency,
      domain: domain.trim(),
      horizon: nf,
      series: { name, frequency, season: frequency === 'quarterly' ? 4 : null, time, values, inputs: [], source: file },
    });
  }
  return items;
}

/** A forecaster under test: h point forecasts from the training series, and a label for reports. */
export type PointForecaster = (train: Series, h: number) => { forecast: Float64Array; model: string };

/**
 * certa's default automatic pipeline (`forecastSeries`, as `certa forecast` runs it) with no
 * internal holdout and the competition's horizon. Interval bands do not change the point
 * forecast (intervals.ts: the point is always the noise-free simulation), so a single level and
 * few bootstrap draws are used to save time.
 */
export function certaForecaster(options: ForecastOptions = {}): PointForecaster {
  return (train, h) => {
    const run = forecastSeries(train, { levels: [80], intervals: { draws: 20 }, ...options, holdout: 0, horizon: h });
    return { forecast: run.forecast.paths.point, model: run.asserted.structure.key };
  };
}

/** Scores of one series. */
export interface M3Result {
  id: string;
  frequency: M3Frequency;
  domain: string;
  /** Training length (series length minus horizon). */
  train: number;
  horizon: number;
  /** The forecaster's model, or the fallback's name when it failed. */
  model: string;
  /** Why the forecaster failed (null when it succeeded). */
  failure: string | null;
  smape: number;
  mase: number;
  naive2Smape: number;
  naive2Mase: number;
  /** Wall time of the forecaster on this series, milliseconds. */
  ms: number;
}

/** The MASE seasonal period of a frequency: 1 yearly, 4 quarterly. */
export function maseSeason(frequency: M3Frequency): number {
  return frequency === 'quarterly' ? 4 : 1;
}

/** The fallback scored in place of a failed forecast. */
export const M3_FALLBACK = 'naive2';

/** Scores one series (see the module comment); never throws for a forecaster's failure. */
export function scoreM3Item(item: M3Item, forecaster: PointForecaster): M3Result {
  const { series, horizon: h } = item;
  const n = series.values.length - h;
  const trainValues = series.values.subarray(0, n);
  const actual = series.values.subarray(n);
  const train: Series = { ...series, time: series.time.subarray(0, n), values: trainValues };
  const m = maseSeason(item.frequency);
  const base = naive2(trainValues, h, series.season);
  let forecast: Float64Array = base;
  let model = M3_FALLBACK;
  let failure: string | null = null;
  const start = performance.now();
  try {
    const out = forecaster(train, h);
    if (out.forecast.length !== h) failure = `forecast has ${out.forecast.length} values, expected ${h}`;
    else if (!out.forecast.every(Number.isFinite)) failure = `non-finite forecast (${out.model})`;
    else {
      forecast = out.forecast;
      model = out.model;
    }
  } catch (e) {
    failure = e instanceof Error ? e.message : String(e);
  }
  const ms = performance.now() - start;
  return {
    id: item.id,
    frequency: item.frequency,
    domain: item.domain,
    train: n,
    horizon: h,
    model,
    failure,
    smape: smape(actual, forecast).value,
    mase: mase(actual, forecast, trainValues, m),
    naive2Smape: smape(actual, base).value,
    naive2Mase: mase(actual, base, trainValues, m),
    ms,
  };
}

/** Scores every item in order. */
export function scoreM3(items: readonly M3Item[], forecaster: PointForecaster): M3Result[] {
  return items.map((item) => scoreM3Item(item, forecaster));
}

/** Averages over one group of series. */
export interface M3Summary {
  group: string;
  series: number;
  smape: number;
  mase: number;
  naive2Smape: number;
  naive2Mase: number;
  /** Share of series (0–1) whose sMAPE is strictly below Naive2's. */
  beatsNaive2: number;
  /** Forecaster failures (scored with the fallback). */
  failures: number;
}

function mean(xs: number[]): number {
  let s = 0;
  for (const x of xs) s += x;
  return xs.length > 0 ? s / xs.length : NaN;
}

/** Summary of a set of results: arithmetic means over series of the per-series scores. */
export function summariseM3(group: string, results: readonly M3Result[]): M3Summary {
  return {
    group,
    series: results.length,
    smape: mean(results.map((r) => r.smape)),
    mase: mean(results.map((r) => r.mase)),
    naive2Smape: mean(results.map((r) => r.naive2Smape)),
    naive2Mase: mean(results.map((r) => r.naive2Mase)),
    beatsNaive2: results.length > 0 ? results.filter((r) => r.smape < r.naive2Smape).length / results.length : NaN,
    failures: results.filter((r) => r.failure !== null).length,
  };
}

/** Summaries per frequency (yearly, then quarterly, those present) and over all results. */
export function summariseM3ByFrequency(results: readonly M3Result[]): M3Summary[] {
  const out: M3Summary[] = [];
  for (const f of ['yearly', 'quarterly'] as const) {
    const part = results.filter((r) => r.frequency === f);
    if (part.length > 0) out.push(summariseM3(f, part));
  }
  out.push(summariseM3('all', results));
  return out;
}

/**
 * Published M3 sMAPE (percent, mean over all horizons): Makridakis & Hibon (2000), as reprinted
 * in Oreshkin et al. (ICLR 2020), Table 14 (Naive2, Theta); the automatic Box–Jenkins entry
 * from Makridakis & Hibon (2000).
 */
export const M3_PUBLISHED: Readonly<Record<M3Frequency, { naive2: number; theta: number; boxJenkins: number }>> = {
  yearly: { naive2: 17.88, theta: 16.9, boxJenkins: 17.73 },
  quarterly: { naive2: 9.95, theta: 8.96, boxJenkins: 10.26 },
};
