/**
 * Forecast accuracy on the M3 competition series: reading the competition files into Series and
 * scoring a forecaster on their held-back ends. The accuracy benchmark (`npm run bench:accuracy`)
 * and the accuracy guard in the test suite share these functions, so both score the same way.
 *
 * Protocol (Makridakis & Hibon, "The M3-Competition: results, conclusions and implications",
 * International Journal of Forecasting 16 (2000), section 2): for each series the last `nf`
 * values (6 yearly, 8 quarterly, 18 monthly, 8 "other") are the test set; the forecaster sees
 * only the values before them. Scores per series:
 * - sMAPE = (1/h) Σ_k 200·|X_k − F_k| / (X_k + F_k) (metrics.ts `smape`), then averaged over
 *   series;
 * - MASE = mean |X_k − F_k| / Q with Q the in-sample mean absolute error of the seasonal naive
 *   forecast of period m on the training part (Hyndman & Koehler 2006; m = 1 yearly, m = 4
 *   quarterly, m = 12 monthly, m = 1 other);
 * - the same two for Naive2 (baselines.ts), the competition's benchmark;
 * - when the forecaster gives prediction intervals: the empirical coverage of each band (over all
 *   steps, at step 1 and at step h) and the mean scaled interval score of the 95 % band,
 *   MSIS = (1/h) Σ_k [(U_k − L_k) + (2/α)(L_k − X_k)·1{X_k < L_k} + (2/α)(X_k − U_k)·1{X_k > U_k}] / Q
 *   with α = 0.05 and Q the MASE scale above (Makridakis, Spiliotis & Assimakopoulos, "The M4
 *   Competition: 100,000 time series and 61 forecasting methods", IJF 36(1), 2020, section 2.2);
 *   the same for a reference interval, the seasonal naive forecast with Gaussian bands
 *   (`seasonalNaiveGaussian`).
 * A forecaster that throws, or returns a non-finite or wrong-length forecast, is counted as a
 * failure and Naive2's forecast is scored in its place, so no series is dropped.
 */
import type { Frequency } from '../data/calendar.js';
import type { Series } from '../data/series.js';
import { DataError } from '../data/errors.js';
import { forecastSeries, type ForecastOptions } from '../forecast/pipeline.js';
import { naive2 } from './baselines.js';
import { intervalCoverage, intervalScore, mase, maseScale, smape } from './metrics.js';
import { normalQuantile } from '../forecast/normal.js';

/** The M3 categories certa scores: the competition's files. */
export type M3Category = 'yearly' | 'quarterly' | 'monthly' | 'other';

/** The categories in report order. */
export const M3_CATEGORIES: readonly M3Category[] = ['yearly', 'quarterly', 'monthly', 'other'];

/** The series frequency and season of each category ("other" has no calendar: a step counter). */
const CATEGORY: Readonly<Record<M3Category, { frequency: Frequency; season: number | null }>> = {
  yearly: { frequency: 'yearly', season: null },
  quarterly: { frequency: 'quarterly', season: 4 },
  monthly: { frequency: 'monthly', season: 12 },
  other: { frequency: 'index', season: null },
};

/** The interval levels the benchmark scores (percent). */
export const M3_LEVELS = [80, 95] as const;

/** One competition series: the whole series and how much of its end is the test set. */
export interface M3Item {
  /** Series id as in the file, trimmed (e.g. "N 1"). */
  id: string;
  /** The competition category (file) of the series. */
  frequency: M3Category;
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
 * quarter); monthly ones on the first day of month `start_period`, and a monthly series without
 * a date (start year 0) starts in January 1990 (any plausible start serves: the competition
 * gives none); "other" series are counted 1, 2, … (frequency `index`). The period in a yearly
 * file is ignored. Season: none yearly and other, 4 quarterly, 12 monthly.
 * Errors: a `DataError` naming the row when a field is missing, `n` disagrees with the values,
 * or a value is not a finite number.
 */
export function parseM3(text: string, category: M3Category, file: string): M3Item[] {
  const { frequency, season } = CATEGORY[category];
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
    const undated = category === 'other' || (category === 'monthly' && year === 0);
    if (!Number.isInteger(year) || !Number.isInteger(period) || (!undated && period < 1)) bad('bad start_year or start_period', `${yearText}/${periodText}`);
    if ((category === 'quarterly' || category === 'monthly') && period > 12) bad('a quarter must be 1…4 (or a month 1…12)', periodText);
    for (const v of values) if (!Number.isFinite(v)) bad('a value is not a number', String(v));
    // One quarterly row of the source file (N1071) gives start_period 9, read as a month: Q3.
    const quarter = period > 4 ? Math.ceil(period / 3) : period;
    const month0 = category === 'quarterly' ? 3 * (quarter - 1) : category === 'monthly' ? (undated ? 0 : period - 1) : 0;
    const year0 = category === 'monthly' && undated ? 1990 : year;
    const time = Float64Array.from({ length: n }, (_, t) =>
      category === 'quarterly'
        ? Date.UTC(year0, month0 + 3 * t, 1)
        : category === 'monthly'
          ? Date.UTC(year0, month0 + t, 1)
          : category === 'other'
            ? t + 1
            : Date.UTC(year0 + t, 0, 1),
    );
    const name = id.trim().replace(/\s+/g, ' ');
    items.push({
      id: name,
      frequency: category,
      domain: domain.trim(),
      horizon: nf,
      series: { name, frequency, season, time, values, inputs: [], source: file },
    });
  }
  return items;
}

/** One prediction band of a forecaster under test (nominal level in percent). */
export interface M3Band {
  level: number;
  lower: Float64Array;
  upper: Float64Array;
}

/** A forecaster under test: h point forecasts (and, optionally, bands) from the training series, and a label. */
export type PointForecaster = (train: Series, h: number) => { forecast: Float64Array; model: string; bands?: M3Band[]; bandMethod?: string };

/**
 * certa's default automatic pipeline (`forecastSeries`, as `certa forecast` runs it) with no
 * internal holdout and the competition's horizon, with the benchmark's interval levels.
 */
export function certaForecaster(options: ForecastOptions = {}): PointForecaster {
  return (train, h) => {
    const run = forecastSeries(train, { ...options, levels: options.levels ?? [...M3_LEVELS], holdout: 0, horizon: h });
    const bands = run.forecast.paths.bands.map((b) => ({ level: b.level, lower: b.lower, upper: b.upper }));
    return { forecast: run.forecast.paths.point, model: run.asserted.structure.key, bands, bandMethod: run.forecast.paths.method + (run.forecast.paths.calibration ? ` (${run.forecast.paths.calibration.scale} scale)` : '') };
  };
}

/** Interval scores of one band on one series. */
export interface M3BandScore {
  level: number;
  /** Share of the h test values inside the band (0–1). */
  coverage: number;
  /** Inside the band at step 1, and at step h (0 or 1). */
  first: number;
  last: number;
  /** Interval score over the test set scaled by the MASE scale Q (the MSIS for the 95 % band). */
  scaledScore: number;
}

/** Scores of one series. */
export interface M3Result {
  id: string;
  frequency: M3Category;
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
  /** The forecaster's bands (empty when it gives none or failed: then no interval score). */
  bands: M3BandScore[];
  /** How the forecaster made its bands, when it says. */
  bandMethod: string | null;
  /** The same scores of the reference interval (`seasonalNaiveGaussian`) at the benchmark's levels. */
  referenceBands: M3BandScore[];
  /** Wall time of the forecaster on this series, milliseconds. */
  ms: number;
}

/** The MASE (and MSIS) seasonal period of a category: 1 yearly and other, 4 quarterly, 12 monthly. */
export function maseSeason(category: M3Category): number {
  return CATEGORY[category].season ?? 1;
}

/** The fallback scored in place of a failed forecast. */
export const M3_FALLBACK = 'naive2';

/**
 * The reference prediction interval: the seasonal naive forecast (period m; the naive forecast
 * when m = 1) with Gaussian bands F_k ± z_{(1+L)/2}·σ̂·√(⌊(k − 1)/m⌋ + 1), σ̂² the mean squared
 * in-sample seasonal-naive error (y_t − y_{t−m}). The variance is that of a seasonal random walk
 * (Hyndman & Athanasopoulos, "Forecasting: principles and practice", 3rd ed., 2021, §5.5,
 * Table 5.2).
 * @example seasonalNaiveGaussian([1, 2, 3, 4], 2, 1, [95]) → point [4, 4], σ̂ = 1, 95 % ± 1.96 and ± 2.77
 */
export function seasonalNaiveGaussian(train: Float64Array, h: number, m: number, levels: readonly number[]): { point: Float64Array; bands: M3Band[] } {
  const n = train.length;
  const point = new Float64Array(h);
  for (let k = 1; k <= h; k++) point[k - 1] = train[n - m + ((k - 1) % m)];
  let ss = 0;
  for (let t = m; t < n; t++) ss += (train[t] - train[t - m]) ** 2;
  const sigma = n > m ? Math.sqrt(ss / (n - m)) : NaN;
  const bands = levels.map((level) => {
    const z = normalQuantile(0.5 + level / 200);
    const lower = new Float64Array(h);
    const upper = new Float64Array(h);
    for (let k = 1; k <= h; k++) {
      const w = z * sigma * Math.sqrt(Math.floor((k - 1) / m) + 1);
      lower[k - 1] = point[k - 1] - w;
      upper[k - 1] = point[k - 1] + w;
    }
    return { level, lower, upper };
  });
  return { point, bands };
}

function bandScores(actual: Float64Array, bands: readonly M3Band[], scale: number): M3BandScore[] {
  const h = actual.length;
  return bands.map((b) => {
    const inside = (k: number) => (actual[k] >= b.lower[k] && actual[k] <= b.upper[k] ? 1 : 0);
    return {
      level: b.level,
      coverage: intervalCoverage(actual, b.lower, b.upper),
      first: inside(0),
      last: inside(h - 1),
      scaledScore: intervalScore(actual, b.lower, b.upper, 1 - b.level / 100) / scale,
    };
  });
}

function validBands(bands: readonly M3Band[] | undefined, h: number): bands is M3Band[] {
  if (!bands || bands.length === 0) return false;
  return bands.every((b) => b.lower.length === h && b.upper.length === h && b.lower.every(Number.isFinite) && b.upper.every(Number.isFinite));
}

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
  let bands: M3Band[] = [];
  let bandMethod: string | null = null;
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
      if (validBands(out.bands, h)) {
        bands = out.bands;
        bandMethod = out.bandMethod ?? null;
      }
    }
  } catch (e) {
    failure = e instanceof Error ? e.message : String(e);
  }
  const ms = performance.now() - start;
  const scale = maseScale(trainValues, m);
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
    bands: bandScores(actual, bands, scale),
    bandMethod,
    referenceBands: bandScores(actual, seasonalNaiveGaussian(trainValues, h, m, M3_LEVELS).bands, scale),
    ms,
  };
}

/** Scores every item in order. */
export function scoreM3(items: readonly M3Item[], forecaster: PointForecaster): M3Result[] {
  return items.map((item) => scoreM3Item(item, forecaster));
}

/** Interval scores averaged over the series that gave the band. */
export interface M3BandSummary {
  level: number;
  /** Series scored (those whose forecaster gave this band). */
  series: number;
  /** Mean coverage over all steps and series, at step 1 and at step h (0–1). */
  coverage: number;
  first: number;
  last: number;
  /** Mean over series of the scaled interval score (MSIS for the 95 % band). */
  scaledScore: number;
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
  /** The forecaster's bands and the reference interval's, per level. */
  bands: M3BandSummary[];
  referenceBands: M3BandSummary[];
}

function mean(xs: number[]): number {
  let s = 0;
  for (const x of xs) s += x;
  return xs.length > 0 ? s / xs.length : NaN;
}

function summariseBands(scores: readonly M3BandScore[][]): M3BandSummary[] {
  const levels = [...new Set(scores.flatMap((list) => list.map((b) => b.level)))].sort((a, b) => a - b);
  return levels.map((level) => {
    const part = scores.flatMap((list) => list.filter((b) => b.level === level));
    return {
      level,
      series: part.length,
      coverage: mean(part.map((b) => b.coverage)),
      first: mean(part.map((b) => b.first)),
      last: mean(part.map((b) => b.last)),
      scaledScore: mean(part.map((b) => b.scaledScore)),
    };
  });
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
    bands: summariseBands(results.map((r) => r.bands)),
    referenceBands: summariseBands(results.map((r) => r.referenceBands)),
  };
}

/** Summaries per category (in `M3_CATEGORIES` order, those present) and over all results. */
export function summariseM3ByFrequency(results: readonly M3Result[]): M3Summary[] {
  const out: M3Summary[] = [];
  for (const f of M3_CATEGORIES) {
    const part = results.filter((r) => r.frequency === f);
    if (part.length > 0) out.push(summariseM3(f, part));
  }
  out.push(summariseM3('all', results));
  return out;
}

/**
 * Published M3 sMAPE (percent, mean over all horizons) for the whole categories: Makridakis &
 * Hibon (2000), as reprinted in Oreshkin et al. (ICLR 2020), Table 14 (Naive2, Theta); the
 * automatic Box–Jenkins entry from Makridakis & Hibon (2000). The monthly and other values of
 * the Box–Jenkins entry (14.81, 4.93) are recalled from memory of that paper's tables, not
 * re-read from it. The monthly and other files here are development halves (datasets/m3/README.md),
 * so these whole-category figures are a yardstick, not a score on the same series.
 */
export const M3_PUBLISHED: Readonly<Record<M3Category, { naive2: number; theta: number; boxJenkins: number }>> = {
  yearly: { naive2: 17.88, theta: 16.9, boxJenkins: 17.73 },
  quarterly: { naive2: 9.95, theta: 8.96, boxJenkins: 10.26 },
  monthly: { naive2: 16.91, theta: 13.85, boxJenkins: 14.81 },
  other: { naive2: 6.3, theta: 4.41, boxJenkins: 4.93 },
};
