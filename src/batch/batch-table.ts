/**
 * The tables at the top of a batch folder, built from per-series rows:
 *
 * - `batch.csv`: one row per series of the run, in the order of the file — its position in the
 *   file, name, folder (relative to the batch folder; empty when it failed), status (`forecast`
 *   or `failed`), the reason of a failure, the asserted structure, the holdout MASE of the
 *   delivered point forecast, the best baseline and its MASE, and the warnings (joined by ` | `).
 * - `forecasts.csv`: the holdout and forecast rows of every series (tidy: series, time, kind,
 *   value, point, lower_<level>, upper_<level>), series in the order of batch.csv.
 * - `batch.json`: what the run covered (how many series the file held, which shard, whether
 *   reports were written), so that `certa merge` can check it was given every shard, and the
 *   rows of batch.csv as data (from which `index.html`, the page linking every series' report,
 *   is made, by one run or by a merge alike).
 *
 * `BatchRow` is also what a later index page of a batch reads.
 */
import { renderBatchIndex, type BatchIndexUpdate, type BatchIndexUpdateTotals } from '../report/batch-index.js';
import { toCsv, toJson, type Cell } from '../report/tables.js';
import type { Shard } from './shard.js';

export type BatchStatus = 'forecast' | 'failed';

/** One series of a batch, as batch.csv lists it. */
export interface BatchRow {
  /** 1-based position of the series in the file (after --series). */
  position: number;
  series: string;
  /** Folder relative to the batch folder; null when the series failed (no folder is left). */
  folder: string | null;
  status: BatchStatus;
  reason: string | null;
  structure: string | null;
  holdoutMase: number | null;
  bestBaseline: string | null;
  baselineMase: number | null;
  warnings: string[];
}

export const BATCH_COLUMNS = ['position', 'series', 'folder', 'status', 'reason', 'structure', 'holdout_mase', 'best_baseline', 'baseline_mase', 'warnings'];

export function batchRecord(r: BatchRow): Cell[] {
  return [r.position, r.series, r.folder, r.status, r.reason, r.structure, r.holdoutMase, r.bestBaseline, r.baselineMase, r.warnings.length > 0 ? r.warnings.join(' | ') : null];
}

/** `batch.csv` of rows already in file order. */
export function batchCsv(rows: readonly BatchRow[]): string {
  return toCsv(BATCH_COLUMNS, rows.map(batchRecord));
}

/** The columns of forecasts.csv for these interval levels. */
export function forecastsColumns(levels: readonly number[]): string[] {
  return ['series', 'time', 'kind', 'value', 'point', ...levels.flatMap((l) => [`lower_${l}`, `upper_${l}`])];
}

/** The header record of a CSV with these columns (as toCsv writes it). */
export function csvHeader(columns: string[]): string {
  return toCsv(columns, []);
}

export const BATCH_FORMAT = 'certa-batch';
export const BATCH_VERSION = 2;

/** A batch row as batch.json holds it (snake_case, as every machine output of certa). */
export function batchRowJson(r: BatchRow): Record<string, unknown> {
  return {
    position: r.position,
    series: r.series,
    folder: r.folder,
    status: r.status,
    reason: r.reason,
    structure: r.structure,
    holdout_mase: r.holdoutMase,
    best_baseline: r.bestBaseline,
    baseline_mase: r.baselineMase,
    warnings: [...r.warnings],
  };
}

/** The inverse of batchRowJson (batch.json is validated by its reader first). */
export function batchRowFromJson(j: Record<string, unknown>): BatchRow {
  return {
    position: j.position as number,
    series: j.series as string,
    folder: (j.folder as string | null) ?? null,
    status: j.status as BatchStatus,
    reason: (j.reason as string | null) ?? null,
    structure: (j.structure as string | null) ?? null,
    holdoutMase: (j.holdout_mase as number | null) ?? null,
    bestBaseline: (j.best_baseline as string | null) ?? null,
    baselineMase: (j.baseline_mase as number | null) ?? null,
    warnings: [...((j.warnings as string[] | undefined) ?? [])],
  };
}

/** What a batch run covered and what it found, for `batch.json`. */
export interface BatchManifest {
  seriesInFile: number;
  shard: Shard | null;
  levels: readonly number[];
  /** Whether each series' report.html and the batch's index.html were written. */
  report: boolean;
  rows: readonly BatchRow[];
}

/** `batch.json`: the run's coverage and its rows. */
export function batchManifest(m: BatchManifest): string {
  return toJson({
    format: BATCH_FORMAT,
    version: BATCH_VERSION,
    series_in_file: m.seriesInFile,
    shard: m.shard ? { k: m.shard.k, n: m.shard.n } : null,
    levels: [...m.levels],
    report: m.report,
    series: m.rows.map(batchRowJson),
  });
}

/**
 * `index.html` of a batch: every series with its status, linked to its report when it has one;
 * after a batch update (`updates`: each series' part by its name, and the totals) also what the
 * update did.
 */
export function batchIndexHtml(rows: readonly BatchRow[], updates: { bySeries: ReadonlyMap<string, BatchIndexUpdate>; totals: BatchIndexUpdateTotals } | null = null): string {
  return renderBatchIndex(
    rows.map((r) => ({
      ...(updates?.bySeries.has(r.series) ? { update: updates.bySeries.get(r.series)! } : {}),
      series: r.series,
      folder: r.folder ?? '',
      status: r.status,
      reason: r.reason,
      structure: r.structure,
      holdoutMase: r.holdoutMase,
      bestBaseline: r.bestBaseline !== null && r.baselineMase !== null ? { name: r.bestBaseline, mase: r.baselineMase } : null,
    })),
    undefined,
    updates?.totals ?? null,
  );
}
