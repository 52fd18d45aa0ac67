/**
 * A batch: every series of a file (or one shard of them) forecast by a pool of workers, one
 * folder per series inside the batch folder (folder-names.ts), and at the top batch.csv,
 * forecasts.csv and batch.json (batch-table.ts). A series that cannot be forecast is reported and
 * the others go on, unless `failFast`.
 */
import { join } from 'node:path';
import { CertaError } from '../data/errors.js';
import type { Series } from '../data/series.js';
import { writeFileAtomic } from '../store/atomic.js';
import { batchCsv, batchManifest, csvHeader, forecastsColumns, type BatchRow } from './batch-table.js';
import { folderNames } from './folder-names.js';
import { runPool } from './pool.js';
import type { JobSettings, SeriesOutcome, SeriesTask } from './series-job.js';
import { shardOf, type Shard } from './shard.js';

export interface BatchOptions {
  /** The batch folder. */
  out: string;
  workers: number;
  shard: Shard | null;
  failFast: boolean;
  /** Interval levels as asked (for the forecasts.csv header when every series failed). */
  levels: number[];
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
  /** The first failure when failFast stopped the batch (nothing written at the top then). */
  stoppedBy: SeriesOutcome | null;
}

/** The series of a file this run takes, with their positions and folders. */
export function batchTasks(series: readonly Series[], out: string, shard: Shard | null): SeriesTask[] {
  const folders = folderNames(series.map((s) => s.name));
  const tasks: SeriesTask[] = [];
  series.forEach((s, i) => {
    if (shard && shardOf(s.name, shard.n) !== shard.k) return;
    tasks.push({ position: i + 1, series: s, path: join(out, folders[i]), folder: folders[i] });
  });
  return tasks;
}

export async function runBatch(series: readonly Series[], options: BatchOptions): Promise<BatchResult> {
  const tasks = batchTasks(series, options.out, options.shard);
  options.onStart?.(tasks.length);
  const outcomes = await runPool(tasks, options.settings, {
    workers: options.workers,
    failFast: options.failFast,
    onOutcome: (o, done) => options.onOutcome?.(o, done, tasks.length),
  });
  if (options.failFast) {
    const first = outcomes.find((o) => o?.error);
    if (first) return { rows: [], outcomes: outcomes.filter((o): o is SeriesOutcome => o !== undefined), tables: [], stoppedBy: first };
  }
  const done = outcomes as SeriesOutcome[];
  const rows = done.map((o) => o.row);
  const columns = done.find((o) => o.columns)?.columns ?? forecastsColumns(options.levels);
  const header = csvHeader(columns);
  const forecasts = header + done.map((o) => o.forecasts).join('');
  await writeFileAtomic(join(options.out, 'batch.csv'), batchCsv(rows), { mkdir: true });
  await writeFileAtomic(join(options.out, 'forecasts.csv'), forecasts, { mkdir: true });
  await writeFileAtomic(join(options.out, 'batch.json'), batchManifest(series.length, options.shard, options.levels), { mkdir: true });
  return { rows, outcomes: done, tables: ['batch.csv', 'batch.json', 'forecasts.csv'], stoppedBy: null };
}

/** A job failure as the CertaError the CLI prints (for --fail-fast, as before batches). */
export function outcomeError(o: SeriesOutcome): Error {
  const e = o.error!;
  if (e.internal) return new Error(`series "${o.row.series}": ${e.message}`);
  const tag = `series "${o.row.series}"`;
  return new CertaError(e.code, e.line.includes(tag) ? e.line : `${tag}: ${e.line}`, e.hint ? { hint: e.hint } : {}, e.exitCode);
}
