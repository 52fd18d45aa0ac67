/**
 * `certa update <model.json> <new-data>`: keeps a saved model learning. Holds the model's lock
 * (store/lock.ts) around read → update → write; reads the new file with the shared data options
 * (the model's inputs by default; the model's series chosen by name when the file has several);
 * learns the rows after the model's last time stamp (forecast/update.ts); writes forecast.csv,
 * summary.json, forecast.png (unless --no-charts) and report.html (unless --no-report) into --out (default: the model's folder),
 * then the updated model (the previous version kept as model.prev.json). Forecast files are
 * written before the model, so a run cut short can simply be repeated. With 0 new rows nothing
 * is written. Exit code 3 with --fail-on-drift when a drift alarm fired.
 */
import type { Command } from 'commander';
import { existsSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { DataError, UsageError } from '../data/errors.js';
import type { Series } from '../data/series.js';
import { DRIFT_POLICIES, update, type DriftPolicy, type UpdateOptions, type UpdateResult } from '../forecast/update.js';
import { updateCharts, updateFiles, updateSummary, updateSummaryJson, updateText } from '../report/update-report.js';
import { updateHtml } from '../report/update-html.js';
import type { ReportOptions } from '../report/html-report.js';
import { withLock } from '../store/lock.js';
import { readModelFile, writeModelFile, type ModelBody } from '../store/model-file.js';
import { addDataOptions, loadSeriesFromCli, parseDataOptions } from './data-options.js';
import { ExitRequest, type CliIO } from './main.js';
import { runClock, writeFiles } from './output.js';
import { BANDS_HELP, parseBands } from './forecast.js';
import type { IntervalMethod } from '../forecast/intervals.js';
import { resultDocument, resultDocumentText, summaryDocument, type WrittenResultEntry } from '../report/result-json.js';
import { toJson } from '../report/tables.js';
import { batchModels, updateBatch, type UpdateRow } from '../batch/update-batch.js';
import type { Frequency } from '../data/calendar.js';
import { outcomeError } from '../batch/run.js';
import { addBatchOptions, batchReporter, batchText, failIfSome, parseBatchOptions } from './batch.js';

export interface CliUpdateOptions {
  onDrift: DriftPolicy;
  failOnDrift: boolean;
  acceptRevisions: boolean;
  horizon?: number;
  levels?: number[];
  bands?: IntervalMethod;
  out?: string;
  charts: boolean;
  /** Write report.html (`--no-report` turns it off). */
  report: boolean;
  json: boolean;
}

function num(option: string, raw: unknown, check: (v: number) => boolean, expected: string, integer: boolean): number {
  const s = String(raw).trim();
  const v = (integer ? /^\d+$/ : /^(\d+\.?\d*|\.\d+)$/).test(s) ? Number(s) : NaN;
  if (!check(v)) throw new UsageError('option-invalid', `option ${option} has an unusable value`, { found: String(raw), expected });
  return v;
}

export function parseUpdateOptions(opts: Record<string, unknown>): CliUpdateOptions {
  const onDrift = String(opts.onDrift ?? 'warn');
  if (!(DRIFT_POLICIES as readonly string[]).includes(onDrift)) {
    throw new UsageError('option-invalid', 'option --on-drift has an unusable value', { found: onDrift, expected: DRIFT_POLICIES.join(', ') });
  }
  const out: CliUpdateOptions = {
    onDrift: onDrift as DriftPolicy,
    failOnDrift: Boolean(opts.failOnDrift),
    acceptRevisions: Boolean(opts.acceptRevisions),
    charts: opts.charts !== false,
    report: opts.report !== false,
    json: Boolean(opts.json),
  };
  if (opts.horizon !== undefined) out.horizon = num('--horizon', opts.horizon, (v) => v >= 1 && v <= 10_000, 'a whole number of periods from 1 to 10000', true);
  const bands = parseBands(opts.bands);
  if (bands !== undefined) out.bands = bands;
  if (opts.levels !== undefined) {
    out.levels = String(opts.levels)
      .split(',')
      .map((s) => num('--levels', s, (v) => v > 0 && v < 100, 'levels in percent between 0 and 100, e.g. 50,90', false));
  }
  if (opts.out !== undefined) out.out = String(opts.out);
  return out;
}

/** The model's series among those loaded: by name, or the only one. */
export function pickSeries(loaded: Series[], body: ModelBody, file: string): Series {
  const name = body.series.name;
  const named = loaded.find((s) => s.name === name);
  if (named) return named;
  if (loaded.length === 1) return loaded[0];
  throw new DataError('series-not-found', `the new data hold ${loaded.length} series but none named "${name}", the model's series`, {
    file,
    found: loaded.map((s) => s.name).join(', '),
    expected: `a series named "${name}"`,
    hint: '--series <name> picks one series; --value <column> names the value column',
  });
}

export interface UpdateRun {
  result: UpdateResult;
  summary: Record<string, unknown>;
  text: string;
}

/** Refuses a --season that differs from the model's (another season needs a new model). */
function checkSeason(body: ModelBody, modelPath: string, opts: Record<string, unknown>): void {
  const season = parseDataOptions(opts).season;
  if (season !== undefined && season !== body.series.season) {
    throw new UsageError('season-mismatch', `--season ${season} differs from the model's season (${body.series.season ?? 'none'})`, {
      file: modelPath,
      found: `--season ${season}`,
      expected: `the model's season ${body.series.season ?? '(none)'}; another season needs a new model`,
      hint: `drop --season, or fit a new model with certa forecast --season ${season}`,
    });
  }
}

/**
 * Updates the model read from `modelPath` (`body`, its lock held by the caller) with the new rows
 * of its series and writes the forecast files into `folder`, then the model: what one
 * `certa update` does after reading its data, and each series of a batch update alike (whose
 * report.html loads the chart library its batch folder keeps: `html`).
 */
async function applyUpdate(
  modelPath: string,
  body: ModelBody,
  rows: Series,
  dataFile: string,
  cli: CliUpdateOptions,
  notes: readonly string[],
  folder: string,
  html: ReportOptions = {},
): Promise<{ result: UpdateResult; summary: Record<string, unknown> }> {
  const options: UpdateOptions = { now: runClock(), onDrift: cli.onDrift, acceptRevisions: cli.acceptRevisions };
  if (cli.horizon !== undefined) options.horizon = cli.horizon;
  if (cli.levels !== undefined) options.levels = cli.levels;
  if (cli.bands !== undefined) options.intervals = { method: cli.bands };
  const result = update(body, { ...rows, source: dataFile }, options);
  const warnings = [...notes];
  if (!result.changed) {
    const summary = updateSummary(result, { model: modelPath, data: dataFile, files: [], outDir: folder, warnings });
    return { result, summary };
  }
  const files: Record<string, string | Uint8Array> = { ...updateFiles(result) };
  if (cli.charts) Object.assign(files, updateCharts(result));
  const modelName = join(folder, 'model.json') === modelPath ? ['model.json'] : [];
  const names = [...Object.keys(files), 'summary.json', ...modelName, ...(cli.report ? ['report.html'] : [])].sort();
  const summary = updateSummary(result, { model: modelPath, data: dataFile, files: names, outDir: folder, warnings });
  files['summary.json'] = updateSummaryJson(summaryDocument('update', summary));
  if (cli.report) files['report.html'] = updateHtml(result, summary, html);
  await writeFiles(folder, files);
  const written = await writeModelFile(modelPath, result.body);
  if (written.note) warnings.push(written.note);
  return { result, summary };
}

/**
 * One model's update under its lock (store/lock.ts): read the model, check --season, take its new
 * rows (`rowsFor`: the rows of the model's series and the load notes for its summary), update and
 * write (`applyUpdate`); a note of the lock joins the summary's warnings. `certa update` on one
 * model and each series of a batch update go through it.
 */
export async function updateModel(
  modelPath: string,
  dataFile: string,
  cli: CliUpdateOptions,
  opts: Record<string, unknown>,
  folder: string,
  rowsFor: (body: ModelBody) => Promise<{ rows: Series; notes: readonly string[] }>,
  html: ReportOptions = {},
): Promise<{ result: UpdateResult; summary: Record<string, unknown> }> {
  const locked = await withLock(
    modelPath,
    async () => {
      const body = await readModelFile(modelPath);
      checkSeason(body, modelPath, opts);
      const { rows, notes } = await rowsFor(body);
      return applyUpdate(modelPath, body, rows, dataFile, cli, notes, folder, html);
    },
    { command: `certa update ${modelPath} ${dataFile}` },
  );
  const { result, summary } = locked.value;
  if (locked.note) (summary.warnings as string[]).push(locked.note);
  return { result, summary };
}

/** Lock, read, update, write (see the module comment). */
export async function runUpdate(modelPath: string, dataFile: string, cli: CliUpdateOptions, opts: Record<string, unknown>, io: CliIO): Promise<UpdateRun> {
  const { result, summary } = await updateModel(modelPath, dataFile, cli, opts, cli.out ?? dirname(modelPath), async (body) => {
    const dataOpts = { ...opts };
    if (dataOpts.inputs === undefined && body.series.inputs.length > 0) dataOpts.inputs = body.series.inputs.join(',');
    const { series, report } = await loadSeriesFromCli(dataFile, dataOpts, io, { singleStampFrequency: body.series.frequency as Frequency });
    return { rows: pickSeries(series, body, dataFile), notes: report.notes };
  });
  return { result, summary, text: updateText(result, summary) };
}

export function register(program: Command, io: CliIO): void {
  const command = program
    .command('update')
    .description('keep a saved model learning: add new observations, watch for drift, forecast again')
    .argument('<model>', 'the model.json written by certa forecast or certa search (or its folder), or a batch folder: every model in it')
    .argument('<file>', 'new data: CSV, TSV, XLSX or JSON (may repeat rows the model has seen), or - for standard input')
    .option('--on-drift <policy>', `what to do on a drift alarm: ${DRIFT_POLICIES.join(', ')} (default warn)`)
    .option('--fail-on-drift', 'exit with code 3 when a drift alarm fired (after writing)')
    .option('--accept-revisions', 'accept changed values of rows the model has seen and re-estimate on the revised history')
    .option('--horizon <n>', 'periods to forecast (default: as when the model was made)')
    .option('--levels <list>', 'prediction interval levels in percent (default: as when the model was made)')
    .option('--bands <method>', `${BANDS_HELP}; default: as when the model was made`)
    .option('--out <folder>', 'folder for forecast.csv, summary.json and charts (default: the model file’s folder)')
    .option('--no-charts', 'do not render PNG charts')
    .option('--no-report', 'do not write report.html (written anew, so it never shows an older forecast than forecast.csv)')
    .option('--json', 'print summary.json instead of the text summary');
  addDataOptions(command);
  addBatchOptions(command, { shard: false, verb: 'updated', workersFor: 'a batch folder' });
  command.action(async (model: string, file: string, opts: Record<string, unknown>) => {
    const cli = parseUpdateOptions(opts);
    if (statSync(model, { throwIfNoEntry: false })?.isDirectory()) {
      if (existsSync(join(model, 'batch.json'))) return runBatchUpdate(model, file, cli, opts, io);
      if (!existsSync(join(model, 'model.json'))) {
        throw new UsageError('not-a-model', 'the folder holds neither a model (model.json) nor a batch (batch.json)', {
          file: model,
          expected: 'a model.json written by certa forecast or certa search, or a batch folder written by certa forecast over a file of several series',
        });
      }
      model = join(model, 'model.json');
    }
    const { result, summary, text } = await runUpdate(model, file, cli, opts, io);
    const folder = cli.out ?? dirname(model);
    const name = (result.body.series as { name: string }).name;
    if (cli.json) io.out(toJson(resultDocument('update', [{ series: name, status: 'ok', folder, reason: null, detail: summaryDocument('update', summary) }])));
    else if (!opts.quiet) io.out(text);
    if (cli.failOnDrift && result.alarms.length > 0) throw new ExitRequest(3);
  });
  program.addHelpText(
    'after',
    '\nUpdate a saved model with new data:\n  certa update output/sales/model.json sales-2024.csv --on-drift adapt\n' +
      'Update every model of a batch folder:\n  certa update output lines-2024-07.csv --id line\n',
  );
}

/** The line of one series in the text summary of a batch update. */
export function updateLine(r: UpdateRow): string {
  if (r.status === 'failed') return `failed     ${r.reason ?? r.series}`;
  if (r.status === 'unchanged') return `unchanged  ${r.series}: ${r.reason ?? ''}`;
  const alarms = r.alarms === 0 ? 'no drift alarm' : `${r.alarms} drift alarm${r.alarms === 1 ? '' : 's'} (${r.policy})`;
  const warn = r.warnings.length > 0 ? `; ${r.warnings.length} warning${r.warnings.length === 1 ? '' : 's'}` : '';
  return `updated    ${r.series}: ${r.rowsAdded} new row${r.rowsAdded === 1 ? '' : 's'} to ${r.lastTime}; ${alarms}; ${r.structure}${warn} → ${r.folder}`;
}

/**
 * `certa update <batch folder> <file>` (batch/update-batch.ts): the new file is read once (with
 * the inputs of the batch's models unless --inputs is given, and their frequency for a file of
 * one time stamp per series), its series are updated by the
 * pool, one line per series and totals are printed (or the one JSON result document). Exit code
 * 4 when some series failed (1 when a failure was a bug), else 3 with --fail-on-drift when a
 * drift alarm fired.
 */
async function runBatchUpdate(dir: string, file: string, cli: CliUpdateOptions, opts: Record<string, unknown>, io: CliIO): Promise<void> {
  if (cli.out !== undefined) {
    throw new UsageError('option-invalid', '--out names the folder of one model’s files; a batch folder is updated in place', {
      found: `--out ${cli.out}`,
      expected: 'no --out with a batch folder',
      hint: `drop --out; to keep the batch as it is, copy ${dir} first and update the copy`,
    });
  }
  const batch = parseBatchOptions(opts);
  const dataOpts = { ...opts };
  const models = await batchModels(dir);
  if (dataOpts.inputs === undefined && models.inputs.length > 0) dataOpts.inputs = models.inputs.join(',');
  const single = models.frequency !== null ? { singleStampFrequency: models.frequency } : {};
  const { series, report } = await loadSeriesFromCli(file, dataOpts, io, { keepGoing: !batch.failFast, ...single });
  const progress = batchReporter(io, batch.quiet);
  const result = await updateBatch(dir, series, report.failed, { opts, data: file, loadNotes: report.notes }, {
    workers: batch.workers,
    failFast: batch.failFast,
    keepSummary: cli.json,
    onStart: progress.start,
    onOutcome: (o, done) => progress.outcome(o.error ? o.row.reason : null, done),
  });
  progress.stop();
  if (result.stoppedBy) throw outcomeError(result.stoppedBy);
  const rows = result.outcomes.map((o) => o.row);
  const count = (s: UpdateRow['status']): number => rows.filter((r) => r.status === s).length;
  const failed = count('failed');
  const alarms = rows.reduce((a, r) => a + (r.alarms ?? 0), 0);
  if (cli.json) {
    const entries: WrittenResultEntry[] = result.outcomes
      .filter((o) => o.inFile)
      .map((o) => ({ series: o.row.series, status: o.error ? 'failed' : 'ok', folder: o.row.folder, reason: o.row.reason, detailJson: o.summaryJson }));
    io.out(resultDocumentText('update', entries));
  } else if (!batch.quiet) {
    const shard = result.manifest.shard ? ` (shard ${result.manifest.shard.k} of ${result.manifest.shard.n})` : '';
    const totals = `${rows.length} series${shard}: ${count('updated')} updated, ${count('unchanged')} unchanged, ${failed} failed; ${alarms} drift alarm${alarms === 1 ? '' : 's'}`;
    io.out(batchText(rows.map(updateLine), totals, `Wrote ${result.tables.join(', ')} and the files of each updated series to ${dir}`));
  }
  failIfSome(io, failed, rows.length, !(batch.quiet || cli.json), `updates.csv in ${dir}`, result.outcomes.some((o) => o.error?.internal));
  if (cli.failOnDrift && alarms > 0) throw new ExitRequest(3);
}
