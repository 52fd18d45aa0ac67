/**
 * A batch: every series of a file (or one shard of them) forecast by a pool of workers, one
 * folder per series inside the batch folder (folder-names.ts), and at the top batch.csv,
 * forecasts.csv, batch.json and (with reports) index.html (batch-table.ts) and the one copy of
 * the chart library every series' report.html loads (`CHART_ASSET`, written before the first
 * series, so a report is whole as soon as it is written). A series that cannot be forecast is
 * reported and the others go on, unless `failFast`.
 */
import { join } from 'node:path';
import { CertaError } from '../data/errors.js';
import type { Series } from '../data/series.js';
import type { LoadFailure } from '../data/load.js';
import { CHART_ASSET, chartLibraryScript } from '../report/html.js';
import { writeFileAtomic } from '../store/atomic.js';
import { batchCsv, batchIndexHtml, batchManifest, csvHeader, forecastsColumns, type BatchRow } from './batch-table.js';
import { folderNames } from './folder-names.js';
import { runPool } from './pool.js';
import { failureText, jobError, type JobError, type JobSettings, type SeriesOutcome, type SeriesTask } from './series-job.js';
import { shardOf, type Shard } from './shard.js';

export interface BatchOptions {
  /** The batch folder. */
  out: string;
  workers: number;
  shard: Shard | null;
  failFast: boolean;
  /** Interval levels of every series (the forecasts.csv columns). */
  levels: number[];
  /** Write each series' report.html, the chart library they share and the batch's index.html. */
  report: boolean;
  settings: JobSettings;
  onOutcome?: (outcome: SeriesOutcome, done: number, total: number) => void;
  /** Called once the tasks are known (after the shard was chosen). */
  onStart?: (total: number) => void;
}

export interface BatchResult {
  /** One row per series of the run, in file order: what batch.csv holds (and an index page reads). */
  rows: BatchRow[];
  outcomes: SeriesOutcome[];
  /** Files written at the top of the batch folder. */
  tables: string[];
  /** The first failure when failFast stopped the batch (nothing but the chart library written at the top then). */
  stoppedBy: SeriesOutcome | null;
}

/**
 * The series of a file this run takes, with their positions and folders, and the series that
 * could not be read as outcomes already failed. Positions and folders come from every series of
 * the file (read or not), so a shard gives each series what one run over the file gives it.
 */
export function batchTasks(series: readonly Series[], failedAtLoad: readonly LoadFailure[], out: string, shard: Shard | null): { tasks: SeriesTask[]; failed: SeriesOutcome[] } {
  const total = series.length + failedAtLoad.length;
  const slots: ({ series: Series } | { failure: LoadFailure })[] = new Array(total);
  for (const f of failedAtLoad) slots[f.index] = { failure: f };
  let next = 0;
  for (let i = 0; i < total; i++) if (!slots[i]) slots[i] = { series: series[next++] };
  const names = slots.map((s) => ('series' in s ? s.series.name : s.failure.name));
  const folders = folderNames(names);
  const tasks: SeriesTask[] = [];
  const failed: SeriesOutcome[] = [];
  slots.forEach((slot, i) => {
    if (shard && shardOf(names[i], shard.n) !== shard.k) return;
    if ('series' in slot) tasks.push({ position: i + 1, series: slot.series, path: join(out, folders[i]), folder: folders[i] });
    else failed.push(loadFailureOutcome(i + 1, slot.failure));
  });
  return { tasks, failed };
}

function loadFailureOutcome(position: number, f: LoadFailure): SeriesOutcome {
  const error = jobError(f.error);
  const row: BatchRow = { position, series: f.name, folder: null, status: 'failed', reason: error.line, structure: null, holdoutMase: null, bestBaseline: null, baselineMase: null, warnings: [] };
  return { row, forecasts: '', summaryJson: null, error };
}

export async function runBatch(series: readonly Series[], failedAtLoad: readonly LoadFailure[], options: BatchOptions): Promise<BatchResult> {
  const { tasks, failed } = batchTasks(series, failedAtLoad, options.out, options.shard);
  const total = tasks.length + failed.length;
  options.onStart?.(total);
  if (options.report) await writeFileAtomic(join(options.out, CHART_ASSET), chartLibraryScript(), { mkdir: true });
  let finished = 0;
  for (const o of failed) options.onOutcome?.(o, ++finished, total);
  const ran = await runPool(tasks, options.settings, {
    workers: options.workers,
    failFast: options.failFast,
    onOutcome: (o) => options.onOutcome?.(o, ++finished, total),
  });
  const outcomes: (SeriesOutcome | undefined)[] = [...failed, ...ran.filter((o): o is SeriesOutcome => o !== undefined)].sort((a, b) => a.row.position - b.row.position);
  if (options.failFast) {
    const first = outcomes.find((o) => o?.error);
    if (first) return { rows: [], outcomes: outcomes.filter((o): o is SeriesOutcome => o !== undefined), tables: [], stoppedBy: first };
  }
  const done = outcomes as SeriesOutcome[];
  const rows = done.map((o) => o.row);
  const header = csvHeader(forecastsColumns(options.levels));
  const forecasts = header + done.map((o) => o.forecasts).join('');
  await writeFileAtomic(join(options.out, 'batch.csv'), batchCsv(rows), { mkdir: true });
  await writeFileAtomic(join(options.out, 'forecasts.csv'), forecasts, { mkdir: true });
  const manifest = { seriesInFile: series.length + failedAtLoad.length, shard: options.shard, levels: options.levels, report: options.report, rows };
  await writeFileAtomic(join(options.out, 'batch.json'), batchManifest(manifest), { mkdir: true });
  const tables = ['batch.csv', 'batch.json', 'forecasts.csv'];
  if (options.report) {
    await writeFileAtomic(join(options.out, 'index.html'), batchIndexHtml(rows), { mkdir: true });
    tables.push('index.html', CHART_ASSET);
  }
  return { rows, outcomes: done, tables, stoppedBy: null };
}

/** A job failure as the CertaError the CLI prints (for --fail-fast, as before batches). */
export function outcomeError(o: { row: { series: string }; error: JobError | null }): Error {
  const e = o.error!;
  if (e.internal) return new Error(`series "${o.row.series}": ${e.message}`);
  return new CertaError(e.code, failureText(o.row.series, e.line), e.hint ? { hint: e.hint } : {}, e.exitCode);
}
