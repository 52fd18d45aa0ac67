/**
 * A batch update: `certa update <batch folder> <new data>` keeps every model of a batch folder
 * (written by `certa forecast` over a file of several series, or one shard of it) learning from
 * one file of new rows, on the worker pool (pool.ts), and brings the batch's tables up to date.
 *
 * Matching. Each series of the new file is matched by name to its row in batch.json; its model is
 * `<folder>/model.json` and its files are written into its folder as `certa update` on that model
 * writes them (the same bytes: each series goes through `applyUpdate`, holding its model's lock).
 * In a shard's folder only the series of that shard are taken (batch/shard.ts); the others
 * belong to other shards and are not mentioned. The levels are the batch's, so that every series'
 * records fit forecasts.csv's columns.
 *
 * Outcomes, one per series of the batch and per series of the file without a model:
 * - `updated`: new rows were learnt, the files and the model written;
 * - `unchanged`: the file holds the series but no row after its model's last time stamp, or does
 *   not hold it at all (nothing written for it);
 * - `failed`: the file holds a series that has no model in the batch (a new series, or one whose
 *   forecast failed), or the update failed (data of another frequency, revised rows, ...). Its
 *   folder and model stay as they were. The others go on, unless `failFast`.
 *
 * Written at the top of the batch folder, after every series (each atomically, under a lock on
 * batch.json so that two batch updates never interleave):
 * - `forecasts.csv`: as a forecast run writes it, each updated series' records replaced by its
 *   new forecast rows, the other series' records kept (unless they no longer start where the
 *   model's forecast does: a run cut short after updating a series is mended by running again);
 * - `updates.csv`: the last update, one row per outcome (`UPDATE_COLUMNS`): the batch's series in
 *   their order, then the file's series without a model in file order.
 * - `index.html` (when the batch has reports): the forecast run's page with a column saying what
 *   this update did to each series (a drift alarm tagged), and its totals at the top.
 * batch.csv and batch.json stay those of the forecast run (its holdout scores); each series'
 * summary.json and report.html tell its last update.
 */
import { existsSync, promises as fsp } from 'node:fs';
import { join } from 'node:path';
import { UsageError } from '../data/errors.js';
import type { Series } from '../data/series.js';
import type { Frequency } from '../data/calendar.js';
import type { LoadFailure } from '../data/load.js';
import { writeFileAtomic } from '../store/atomic.js';
import { CHART_ASSET, chartAssetSrc } from '../report/html.js';
import { withLock } from '../store/lock.js';
import { readModelFile } from '../store/model-file.js';
import { parseUpdateOptions, updateModel } from '../cli/update.js';
import { summaryDocument } from '../report/result-json.js';
import { updateRecords, updateSummaryJson } from '../report/update-report.js';
import { csvField, toCsv, type Cell } from '../report/tables.js';
import { batchIndexHtml, csvHeader, forecastsColumns, type BatchRow } from './batch-table.js';
import type { BatchIndexUpdate, BatchIndexUpdateTotals } from '../report/batch-index.js';
import { byFirstField, rawRecords, type RawRecord } from './csv-records.js';
import { readBatchManifest, type Manifest } from './merge.js';
import { runJobPool, type PoolJob } from './pool.js';
import { failureText, jobError, notesNaming, type JobError } from './series-job.js';
import { shardOf } from './shard.js';

export type UpdateStatus = 'updated' | 'unchanged' | 'failed';

/** One row of updates.csv. */
export interface UpdateRow {
  /** Position of the series in the batch (null for a series of the file without a model). */
  position: number | null;
  series: string;
  folder: string | null;
  status: UpdateStatus;
  reason: string | null;
  /** New rows learnt, the model's last time stamp after the update, drift alarms raised, the policy applied. */
  rowsAdded: number | null;
  lastTime: string | null;
  alarms: number | null;
  policy: string | null;
  /** The asserted structure after the update. */
  structure: string | null;
  warnings: string[];
}

export const UPDATE_COLUMNS = ['position', 'series', 'folder', 'status', 'reason', 'rows_added', 'last_time', 'alarms', 'policy', 'structure', 'warnings'];

function updateRecord(r: UpdateRow): Cell[] {
  return [r.position, r.series, r.folder, r.status, r.reason, r.rowsAdded, r.lastTime, r.alarms, r.policy, r.structure, r.warnings.length > 0 ? r.warnings.join(' | ') : null];
}

/** `updates.csv` of rows in their order. */
export function updatesCsv(rows: readonly UpdateRow[]): string {
  return toCsv(UPDATE_COLUMNS, rows.map(updateRecord));
}

/** One series of a batch update, as a task of the pool. */
export interface UpdateTask {
  /** Index of the outcome this task fills (the order of updates.csv). */
  index: number;
  row: BatchRow;
  series: Series;
  /** The series' folder (batch folder joined with its folder name) and its model file. */
  path: string;
  model: string;
}

export interface UpdateSettings {
  /** The command's parsed commander options (each worker parses them again). */
  opts: Record<string, unknown>;
  /** The new data file as given (summary.json names it). */
  data: string;
  /** Notes from loading the file (each series keeps those that name it). */
  loadNotes: string[];
  /** The batch's interval levels. */
  levels: number[];
  /** Whether the batch folder keeps the chart library its reports load (`CHART_ASSET`). */
  sharedCharts: boolean;
  keepSummary: boolean;
}

export interface UpdateOutcome {
  index: number;
  row: UpdateRow;
  /**
   * The forecasts.csv records of the series' model as it now stands (null when the series was not
   * updated: absent from the file, or failed). An unchanged series keeps its old records unless
   * they no longer start where its model's forecast starts (`mergedForecasts`).
   */
  forecasts: string | null;
  /** The series' summary.json text when the settings keep it (for --json). */
  summaryJson: string | null;
  /** Whether the series is of the new file (what --json lists). */
  inFile: boolean;
  error: JobError | null;
}

/** The update of one series (in a worker or in this thread): a failure is an outcome, not an exception. */
export async function runUpdateJob(task: UpdateTask, settings: UpdateSettings): Promise<UpdateOutcome> {
  const base: UpdateRow = { position: task.row.position, series: task.row.series, folder: task.row.folder, status: 'failed', reason: null, rowsAdded: null, lastTime: null, alarms: null, policy: null, structure: null, warnings: [] };
  try {
    const cli = { ...parseUpdateOptions(settings.opts), levels: settings.levels };
    const html = settings.sharedCharts ? { chartLibrarySrc: chartAssetSrc(task.row.folder!) } : {};
    const rows = { rows: task.series, notes: notesNaming(task.series.name, settings.loadNotes) };
    const { result, summary } = await updateModel(task.model, settings.data, cli, settings.opts, task.path, async () => rows, html);
    const row: UpdateRow = {
      ...base,
      status: result.changed ? 'updated' : 'unchanged',
      reason: result.changed ? null : 'no rows after the model’s last time stamp',
      rowsAdded: result.added,
      lastTime: result.body.series.lastTimeLabel,
      alarms: result.alarms.length,
      policy: result.policy.name,
      structure: result.policy.after.label,
      warnings: [...(summary.warnings as string[])],
    };
    return {
      index: task.index,
      row,
      forecasts: updateRecords(result),
      summaryJson: settings.keepSummary ? updateSummaryJson(summaryDocument('update', summary)) : null,
      inFile: true,
      error: null,
    };
  } catch (e) {
    const error = jobError(e);
    return { index: task.index, row: { ...base, reason: failureText(task.series.name, error.line) }, forecasts: null, summaryJson: null, inFile: true, error };
  }
}

const UPDATE_JOB: PoolJob<UpdateTask, UpdateSettings, UpdateOutcome> = { run: runUpdateJob, entry: 'update-worker' };

export interface UpdateBatchOptions {
  workers: number;
  failFast: boolean;
  keepSummary: boolean;
  /** Called once the outcomes to come are known, and after each. */
  onStart?: (total: number) => void;
  onOutcome?: (outcome: UpdateOutcome, done: number, total: number) => void;
}

export interface UpdateBatchResult {
  manifest: Manifest;
  /** Every outcome, in the order of updates.csv. */
  outcomes: UpdateOutcome[];
  /** Files written at the top of the batch folder. */
  tables: string[];
  /** The first failure when failFast stopped the update (nothing written at the top then). */
  stoppedBy: UpdateOutcome | null;
}

/** The batch's interval levels, or a UsageError when --levels asks for others. */
function batchLevels(manifest: Manifest, asked: number[] | undefined, dir: string): number[] {
  if (asked !== undefined && asked.join(',') !== manifest.levels.join(',')) {
    throw new UsageError('batch-levels', `--levels ${asked.join(',')} differs from the batch's levels (${manifest.levels.join(',')})`, {
      file: join(dir, 'batch.json'),
      found: `--levels ${asked.join(',')}`,
      expected: `the batch's levels ${manifest.levels.join(',')}: forecasts.csv has one set of band columns`,
      hint: `drop --levels, or forecast the batch again with --levels ${asked.join(',')}`,
    });
  }
  return [...manifest.levels];
}

/**
 * The inputs the batch's models read and their frequency (those of the first forecast series'
 * model: one forecast run gave every series of the file the same), for loading the new file.
 */
export async function batchModels(dir: string): Promise<{ inputs: string[]; frequency: Frequency | null }> {
  const manifest = await readBatchManifest(dir, BATCH_FOLDER);
  const first = manifest.rows.find((r) => r.status === 'forecast' && r.folder !== null);
  if (!first) return { inputs: [], frequency: null };
  const body = await readModelFile(join(dir, first.folder!, 'model.json'));
  return { inputs: body.series.inputs, frequency: body.series.frequency as Frequency };
}

const BATCH_FOLDER = 'a batch folder written by certa forecast over a file of several series';

/** An outcome decided without updating: the series' row of updates.csv with nothing learnt. */
function outcomeOf(index: number, series: string, row: BatchRow | undefined, status: UpdateStatus, reason: string, error: JobError | null, inFile = true): UpdateOutcome {
  return {
    index,
    row: { position: row?.position ?? null, series, folder: row?.folder ?? null, status, reason, rowsAdded: status === 'unchanged' ? 0 : null, lastTime: null, alarms: null, policy: null, structure: null, warnings: [] },
    forecasts: null,
    summaryJson: null,
    inFile,
    error,
  };
}

/** A series of the file that has no model in the batch (`row` when its forecast failed), as a failed outcome. */
function withoutModel(index: number, name: string, row: BatchRow | undefined): UpdateOutcome {
  const line = row
    ? 'no model in this batch: its forecast failed (see batch.csv); forecast it again once it can be'
    : 'no model in this batch: the batch was not forecast for it; forecast it with certa forecast first';
  const error: JobError = { code: 'no-model', message: line, line, hint: null, exitCode: 2, internal: false };
  return outcomeOf(index, name, row && { ...row, folder: null }, 'failed', `series "${name}": ${line}`, error);
}

function failedAtLoad(index: number, f: LoadFailure, row: BatchRow | undefined): UpdateOutcome {
  const error = jobError(f.error);
  return outcomeOf(index, f.name, row, 'failed', failureText(f.name, error.line), error);
}

/** The batch update (see the module comment). `series` and `failed` are the new file's series as loaded. */
export async function updateBatch(
  dir: string,
  series: readonly Series[],
  failed: readonly LoadFailure[],
  settings: Omit<UpdateSettings, 'levels' | 'keepSummary' | 'sharedCharts'>,
  options: UpdateBatchOptions,
): Promise<UpdateBatchResult> {
  const locked = await withLock(
    join(dir, 'batch.json'),
    async () => {
      const manifest = await readBatchManifest(dir, BATCH_FOLDER);
      const levels = batchLevels(manifest, parseUpdateOptions(settings.opts).levels, dir);
      const inShard = (name: string): boolean => manifest.shard === null || shardOf(name, manifest.shard.n) === manifest.shard.k;
      const byName = new Map(manifest.rows.map((r) => [r.series, r]));
      const loaded = new Map(series.map((s) => [s.name, s]));
      const unreadable = new Map(failed.map((f) => [f.name, f]));
      const outcomes: (UpdateOutcome | undefined)[] = [];
      const tasks: UpdateTask[] = [];
      for (const row of manifest.rows) {
        const index = outcomes.length;
        const s = loaded.get(row.series);
        const bad = unreadable.get(row.series);
        if (bad) outcomes.push(failedAtLoad(index, bad, row));
        else if (!s) outcomes.push(outcomeOf(index, row.series, row, 'unchanged', 'not in the new data', null, false));
        else if (row.status !== 'forecast' || row.folder === null) outcomes.push(withoutModel(index, row.series, row));
        else {
          outcomes.push(undefined);
          const path = join(dir, row.folder);
          tasks.push({ index, row, series: s, path, model: join(path, 'model.json') });
        }
      }
      // The file's series without a row in the batch, in file order (those of this shard).
      const fileOrder = [...series.map((s) => s.name), ...failed.map((f) => f.name)];
      for (const name of fileOrder) {
        if (byName.has(name) || !inShard(name)) continue;
        outcomes.push(withoutModel(outcomes.length, name, undefined));
      }
      const early = options.failFast ? outcomes.find((o) => o?.error) : undefined;
      if (early) return { manifest, outcomes: outcomes.filter((o): o is UpdateOutcome => o !== undefined), tables: [], stoppedBy: early };
      const total = outcomes.length;
      options.onStart?.(total);
      let done = 0;
      for (const o of outcomes) if (o) options.onOutcome?.(o, ++done, total);
      const sharedCharts = existsSync(join(dir, CHART_ASSET));
      await runJobPool(UPDATE_JOB, tasks, { ...settings, levels, keepSummary: options.keepSummary, sharedCharts }, {
        workers: options.workers,
        failFast: options.failFast,
        onOutcome: (o) => {
          outcomes[o.index] = o;
          options.onOutcome?.(o, ++done, total);
        },
      });
      const finished = outcomes.filter((o): o is UpdateOutcome => o !== undefined);
      if (options.failFast) {
        const first = finished.find((o) => o.error);
        if (first) return { manifest, outcomes: finished, tables: [], stoppedBy: first };
      }
      await writeFileAtomic(join(dir, 'forecasts.csv'), await mergedForecasts(dir, manifest, finished, levels), { mkdir: true });
      await writeFileAtomic(join(dir, 'updates.csv'), updatesCsv(finished.map((o) => o.row)), { mkdir: true });
      const tables = ['forecasts.csv', 'updates.csv'];
      if (manifest.report) {
        await writeFileAtomic(join(dir, 'index.html'), batchIndexHtml(manifest.rows, indexUpdates(manifest, finished)), { mkdir: true });
        tables.push('index.html');
      }
      return { manifest, outcomes: finished, tables, stoppedBy: null };
    },
    { command: `certa update ${dir} ${settings.data}` },
  );
  return locked.value;
}

/** What the update did to each series of the batch, in words, and its totals, for index.html. */
function indexUpdates(manifest: Manifest, outcomes: readonly UpdateOutcome[]): { bySeries: Map<string, BatchIndexUpdate>; totals: BatchIndexUpdateTotals } {
  const structures = new Map(manifest.rows.map((r) => [r.series, r.structure]));
  const bySeries = new Map<string, BatchIndexUpdate>();
  const totals: BatchIndexUpdateTotals = { updated: 0, unchanged: 0, failed: 0, alarms: 0, withoutModel: 0 };
  for (const o of outcomes) {
    const r = o.row;
    totals[r.status]++;
    totals.alarms += r.alarms ?? 0;
    if (r.position === null) {
      totals.withoutModel++;
      continue;
    }
    // a failure in its own words (the row's reason names the series, which the page's row does)
    let text = o.error?.line ?? r.reason ?? '';
    if (r.status === 'updated') {
      text = `${r.rowsAdded} new row${r.rowsAdded === 1 ? '' : 's'} to ${r.lastTime}`;
      if ((r.alarms ?? 0) > 0) text += `; policy ${r.policy}`;
      if (r.structure !== structures.get(r.series)) text += `; now ${r.structure}`;
    }
    bySeries.set(r.series, { status: r.status, text, alarms: r.alarms ?? 0 });
  }
  return { bySeries, totals };
}

/**
 * forecasts.csv after the update: the batch's series in their order, each with its new records
 * when it was updated and its records of the old file otherwise.
 */
async function mergedForecasts(dir: string, manifest: Manifest, outcomes: readonly UpdateOutcome[], levels: number[]): Promise<string> {
  const file = join(dir, 'forecasts.csv');
  const header = csvHeader(forecastsColumns(levels));
  let old = '';
  try {
    old = await fsp.readFile(file, 'utf8');
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw e;
  }
  const [head, ...records] = rawRecords(old);
  const updated = new Set(outcomes.filter((o) => o.row.status === 'updated').map((o) => o.row.series));
  if (head && head.text !== header) {
    throw new UsageError('batch-forecasts', 'forecasts.csv has other columns than the batch’s levels give', { file, found: head.text.trim(), expected: header.trim() });
  }
  const kept = byFirstField(records);
  const current = new Map(outcomes.filter((o) => o.forecasts !== null).map((o) => [o.row.series, o.forecasts as string]));
  let out = header;
  for (const row of manifest.rows) {
    const old = kept.get(csvField(row.series)) ?? [];
    const now = current.get(row.series);
    const replace = now !== undefined && (updated.has(row.series) || forecastStart(old) !== forecastStart(rawRecords(now)));
    out += replace ? now : old.map((r) => r.text).join('');
  }
  return out;
}

/**
 * The time of the first forecast record of a series (as written), or null. An unchanged series
 * whose old records start elsewhere than its model's forecast was updated by a run that stopped
 * before it rewrote forecasts.csv: its records are replaced, so a repeated run mends the table.
 */
function forecastStart(records: readonly RawRecord[]): string | null {
  return records.find((r) => r.fields[2] === 'forecast')?.fields[1] ?? null;
}
