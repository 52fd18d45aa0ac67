/**
 * `certa forecast <file>`: the main job. Searches structures on the training part, evaluates the
 * winner on the holdout (fixed origin and rolling origin with online learning, against naive
 * baselines), asserts it refitted on all data, forecasts with prediction intervals, and writes
 * forecast.csv, metrics.csv, candidates.csv, model.json, summary.json, charts and report.html into
 * `--out`.
 */
import type { Command } from 'commander';
import { join } from 'node:path';
import { UsageError } from '../data/errors.js';
import type { Series } from '../data/series.js';
import { loadSeries } from '../data/load.js';
import { forecastSeries, type ForecastOptions, type ForecastRun } from '../forecast/pipeline.js';
import { futureFromSeries, INPUT_POLICIES, type InputPolicy } from '../forecast/future.js';
import { forecastCharts, forecastCsv, forecastFiles, forecastSummary, forecastText, runStory, summaryJson } from '../report/forecast-report.js';
import type { IntervalMethod } from '../forecast/intervals.js';
import { forecastHtml, type ReportOptions } from '../report/html-report.js';
import { keepPreviousModel, serializeModel } from '../store/model-file.js';
import { modelBody, storedCombination } from '../store/asserted.js';
import { replacesOwn } from '../forecast/combine.js';
import { addDataOptions, loadSeriesFromCli, parseDataOptions, readDataSource } from './data-options.js';
import { addSearchOptions, parseSearchOptions } from './search-options.js';
import { outputFolder, runClock, writeFiles } from './output.js';
import type { CliIO } from './main.js';
import { ProgressReporter } from './progress.js';
import { resultDocumentText, summaryDocument } from '../report/result-json.js';
import { addBatchOptions, parseBatchOptions, runForecastBatch } from './batch.js';

export function addForecastOptions(command: Command): Command {
  return command
    .option('--horizon <n>', 'periods to forecast (default: two seasons, or 8 without a season)')
    .option('--holdout <n>', 'last points withheld for evaluation (default: the smaller of two seasons and 20 % of the series; 0 skips evaluation)')
    .option('--levels <list>', 'prediction interval levels in percent (default 50,90)')
    .option('--point <kind>', 'what the point forecast is: combined (default: the leading structures of every family weighted together) or asserted (the asserted equation alone)')
    .option('--bands <method>', BANDS_HELP)
    .option('--forgetting <lambda>', 'forgetting factor of online learning, 0 < λ ≤ 1 (default 1)')
    .option('--input-policy <how>', 'future inputs without --future: hold (last value), trend (straight line) or seasonal (repeat the last season); default seasonal for seasonal series, else hold')
    .option('--future <file>', 'file of future input values (same columns, future dates)')
    .option('--seed <n>', 'seed of simulation intervals (default 1)')
    .option('--draws <n>', 'paths of simulation intervals (default 1000)')
    .option('--parameter-uncertainty', 'simulation intervals also draw the coefficients from their estimated covariance')
    .option('--window <n>', 'raw observations kept in model.json for later re-searches (default 240)')
    .option('--out <folder>', 'output folder: of the series when the file holds one (default output/<series>); of the batch when it holds several, one folder per series inside (default output)')
    .option('--no-charts', 'do not render PNG charts')
    .option('--no-report', 'do not write report.html')
    .option('--json', 'print summary.json instead of the text summary');
}

/** `--bands`, shared by forecast and update. */
export const BANDS_HELP =
  'how the prediction bands are made: calibrated (default: from the point forecast’s own errors at rolling origins inside the data), analytic or bootstrap (from the asserted equation alone, under certainty equivalence)';

/** Parses `--bands`; undefined when not given. */
export function parseBands(raw: unknown): IntervalMethod | undefined {
  if (raw === undefined) return undefined;
  const v = String(raw);
  if (v !== 'calibrated' && v !== 'analytic' && v !== 'bootstrap') throw new UsageError('option-invalid', 'option --bands has an unusable value', { found: v, expected: 'calibrated, analytic or bootstrap' });
  return v;
}

interface CliForecastOptions {
  forecast: Omit<ForecastOptions, 'future'>;
  future?: string;
  window?: number;
  out?: string;
  charts: boolean;
  json: boolean;
  /** Write report.html (`--no-report` turns it off). */
  report?: boolean;
}

function num(option: string, raw: unknown, check: (v: number) => boolean, expected: string, integer = true): number {
  const s = String(raw).trim();
  const v = (integer ? /^-?\d+$/ : /^-?(\d+\.?\d*|\.\d+)(e-?\d+)?$/i).test(s) ? Number(s) : NaN;
  if (!check(v)) throw new UsageError('option-invalid', `option ${option} has an unusable value`, { found: String(raw), expected });
  return v;
}

export function parseForecastOptions(opts: Record<string, unknown>): CliForecastOptions {
  const f: Omit<ForecastOptions, 'future'> = { search: parseSearchOptions(opts), intervals: {} };
  if (opts.horizon !== undefined) f.horizon = num('--horizon', opts.horizon, (v) => v >= 1 && v <= 10_000, 'a whole number of periods ≥ 1');
  if (opts.holdout !== undefined) f.holdout = num('--holdout', opts.holdout, (v) => v >= 0, 'a whole number of points ≥ 0 (0 skips evaluation)');
  if (opts.levels !== undefined) {
    f.levels = String(opts.levels)
      .split(',')
      .map((s) => num('--levels', s, (v) => v > 0 && v < 100, 'levels in percent between 0 and 100, e.g. 50,90', false));
  }
  if (opts.forgetting !== undefined) f.forgetting = num('--forgetting', opts.forgetting, (v) => v > 0 && v <= 1, 'a number in (0, 1], e.g. 1, 0.99 or 0.95', false);
  if (opts.inputPolicy !== undefined) {
    const p = String(opts.inputPolicy) as InputPolicy;
    if (!INPUT_POLICIES.includes(p)) throw new UsageError('option-invalid', 'option --input-policy has an unusable value', { found: p, expected: INPUT_POLICIES.join(', ') });
    f.inputPolicy = p;
  }
  if (opts.seed !== undefined) f.intervals!.seed = num('--seed', opts.seed, (v) => v >= 0 && v <= 2 ** 53, 'a whole number ≥ 0');
  if (opts.draws !== undefined) f.intervals!.draws = num('--draws', opts.draws, (v) => v >= 100 && v <= 100_000, 'a whole number from 100 to 100000');
  if (opts.parameterUncertainty) f.intervals!.parameterUncertainty = true;
  const bands = parseBands(opts.bands);
  if (bands !== undefined) f.intervals!.method = bands;
  if (opts.point !== undefined) {
    const p = String(opts.point);
    if (p !== 'combined' && p !== 'asserted') throw new UsageError('option-invalid', 'option --point has an unusable value', { found: p, expected: 'combined or asserted' });
    f.point = p;
  }
  const out: CliForecastOptions = { forecast: f, charts: opts.charts !== false, json: Boolean(opts.json) };
  out.report = opts.report !== false;
  if (opts.window !== undefined) out.window = num('--window', opts.window, (v) => v >= 10 && v <= 1_000_000, 'a whole number of observations ≥ 10');
  if (opts.future !== undefined) out.future = String(opts.future);
  if (opts.out !== undefined) out.out = String(opts.out);
  return out;
}

/** Reads a future-inputs file with the same data options; it carries the model's input columns. */
async function loadFuture(file: string, history: Series, opts: Record<string, unknown>, io: CliIO): Promise<Series> {
  const names = history.inputs.map((i) => i.name);
  if (names.length === 0) {
    throw new UsageError('future-without-inputs', '--future was given but the series has no inputs', { file, hint: 'name input columns with --inputs, or drop --future' });
  }
  const base = parseDataOptions({ ...opts, series: undefined, value: undefined, inputs: undefined, id: undefined, freq: undefined, aggregate: undefined });
  const { series } = await loadSeries(await readDataSource(file, io), { ...base, value: names[0], inputs: names.slice(1), gaps: 'error' });
  const s = series[0];
  return { ...s, inputs: [{ name: names[0], values: s.values }, ...s.inputs] };
}

/**
 * Runs the main job on one loaded series and writes its outputs; returns the run and what
 * writing them built (its summary, summary.json as document and as text, the forecast records);
 * the text summary is the caller's: a batch prints none. `reportOptions` says how report.html
 * gets its chart library (a batch passes its shared copy; by default the page inlines it).
 */
export async function runForecast(
  series: Series,
  cli: CliForecastOptions,
  folder: string,
  opts: Record<string, unknown>,
  io: CliIO,
  loadWarnings: string[] = [],
  shownFolder: string = folder,
  reportOptions: ReportOptions = {},
): Promise<{ run: ForecastRun } & ForecastOutputs> {
  let futureSeries: Series | undefined;
  if (cli.future !== undefined) futureSeries = await loadFuture(cli.future, series, opts, io);
  const progress = new ProgressReporter(io, `searching ${series.name}`);
  let run: ForecastRun;
  try {
    run = forecastSeries(series, {
      ...cli.forecast,
      search: { ...cli.forecast.search, onProgress: progress.callback() },
      ...(futureSeries ? { future: (h: Series, horizon: number, times: number[]) => futureFromSeries(h, futureSeries!, horizon, cli.future!, times) } : {}),
    });
  } finally {
    progress.stop();
  }
  return { run, ...(await writeForecast(run, series, cli, folder, loadWarnings, shownFolder, reportOptions)) };
}

/** What writing a run's folder built on the way, for callers that need it again. */
export interface ForecastOutputs {
  summary: Record<string, unknown>;
  /** The summary document, as summary.json holds it. */
  document: Record<string, unknown>;
  /** The text of summary.json (the document written by `toJson`). */
  summaryJson: string;
  /** The holdout and forecast records of forecast.csv as a batch's forecasts.csv holds them (`forecastCsv`). */
  forecastRecords: string;
}

/**
 * Writes the folder of a run: the tables, charts, summary.json, report.html and model.json, all
 * built first, then written side by side (each atomically), model.json after the previous model
 * file was kept, and one fsync of the folder for all the renames.
 */
export async function writeForecast(
  run: ForecastRun,
  series: Series,
  cli: CliForecastOptions,
  folder: string,
  loadWarnings: string[] = [],
  shownFolder: string = folder,
  reportOptions: ReportOptions = {},
): Promise<ForecastOutputs> {
  const forecast = forecastCsv(run);
  const files: Record<string, string | Uint8Array> = { ...forecastFiles(run, forecast) };
  if (cli.charts) Object.assign(files, forecastCharts(run));
  const names = [...Object.keys(files), 'model.json', 'summary.json', ...(cli.report !== false ? ['report.html'] : [])].sort();
  const summary = forecastSummary(run, { files: names, outDir: shownFolder, source: series.source, warnings: loadWarnings });
  const document = summaryDocument('forecast', summary);
  const summaryText = summaryJson(document);
  files['summary.json'] = summaryText;
  if (cli.report !== false) files['report.html'] = forecastHtml(run, summary, reportOptions);
  const a = run.asserted;
  const story = runStory(run);
  const body = modelBody({ structure: a.structure, learner: a.learner, se: a.estimate.se }, series, {
    criterion: run.search.criterion,
    criterionValue: run.search.winner.result.score,
    now: runClock(),
    windowCapacity: cli.window,
    meta: {
      key: a.structure.key,
      label: a.structure.label,
      equation: a.equation,
      horizon: run.horizon,
      levels: run.levels,
      intervalMethod: cli.forecast.intervals?.method ?? 'calibrated',
      point: { kind: story.point.kind, text: story.point.text, assertedShare: story.point.assertedShare },
      bands: { method: story.bands.method, text: story.bands.text },
    },
    combination: run.forecast.combination && replacesOwn(run.forecast.combination, a.structure.key) ? storedCombination(run.forecast.combination.members) : undefined,
  });
  files['model.json'] = serializeModel(body);
  // an earlier model.json in the folder is kept as model.prev.json before it is replaced
  await writeFiles(folder, files, { 'model.json': () => keepPreviousModel(join(folder, 'model.json')) });
  return { summary, document, summaryJson: summaryText, forecastRecords: forecast.records };
}

export function register(program: Command, io: CliIO): void {
  const command = program
    .command('forecast')
    .description('find the equation behind a series, evaluate it on held-out data, and forecast with it')
    .argument('<file>', 'CSV, TSV, XLSX or JSON file, or - for standard input');
  addForecastOptions(command);
  addSearchOptions(command);
  addDataOptions(command);
  addBatchOptions(command);
  command.action(async (file: string, opts: Record<string, unknown>) => {
    const cli = parseForecastOptions(opts);
    const batch = parseBatchOptions(opts);
    const { series, report } = await loadSeriesFromCli(file, opts, io, { keepGoing: !batch.failFast });
    if (series.length === 1 && report.failed.length === 0 && batch.shard === null) {
      const s = series[0];
      const folder = outputFolder(s, cli.out);
      const { run, summary, summaryJson: detailJson } = await runForecast(s, cli, folder, opts, io, report.notes);
      if (cli.json) io.out(resultDocumentText('forecast', [{ series: s.name, status: 'ok', folder, reason: null, detailJson }]));
      else if (!batch.quiet) io.out(forecastText(run, summary));
      return;
    }
    await runForecastBatch(series, report.failed, report.notes, cli, batch, opts, io);
  });
  program.addHelpText('after', '\nForecast a series (the main job):\n  certa forecast datasets/demo/vallmark-heatpumps.csv --inputs subsidy,frost_index\n');
}
