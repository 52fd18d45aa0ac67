/**
 * One series of a batch, start to end: forecast it, write its folder, and return what the batch
 * tables need. Runs the same in a worker thread (worker.ts) and in the main thread (one worker).
 * A failure is an outcome, not an exception: the folder this job created is removed again, so no
 * folder is left for a failed series.
 */
import { existsSync, rmSync } from 'node:fs';
import { isCertaError } from '../data/errors.js';
import type { Series } from '../data/series.js';
import { chartAssetSrc } from '../report/html.js';
import { parseForecastOptions, runForecast } from '../cli/forecast.js';
import type { CliIO } from '../cli/main.js';
import type { BatchRow } from './batch-table.js';

export interface SeriesTask {
  position: number;
  series: Series;
  /** Where the folder is written (the batch folder joined with the folder name). */
  path: string;
  /** The folder name, relative to the batch folder. */
  folder: string;
}

export interface JobSettings {
  /** The command's parsed commander options (parsed again here, so workers need nothing else). */
  opts: Record<string, unknown>;
  /** Notes from loading the file (each series' summary lists them, as for one series). */
  loadNotes: string[];
  /** Keep the text of summary.json for --json. */
  keepSummary: boolean;
}

/** A failure as data (it crosses from a worker thread as a plain object). */
export interface JobError {
  code: string;
  message: string;
  line: string;
  hint: string | null;
  exitCode: number;
  /** True for a bug (not a CertaError). */
  internal: boolean;
}

export interface SeriesOutcome {
  row: BatchRow;
  /** forecasts.csv records of this series (no header); '' when it failed. */
  forecasts: string;
  /** The text of the series' summary.json when the settings keep it (for --json), else null. */
  summaryJson: string | null;
  error: JobError | null;
}

const quietIO: CliIO = {
  out: () => undefined,
  err: () => undefined,
  stdin: () => Promise.reject(new Error('standard input is read by the main thread only')),
  isTTY: false,
};

/** A failure's line, naming the series unless the line already does. */
export function failureText(series: string, line: string): string {
  return line.includes(`series "${series}"`) ? line : `series "${series}": ${line}`;
}

/** Warnings of one series: those of its run and the load notes that name it. */
function seriesWarnings(name: string, runWarnings: string[], notes: string[]): string[] {
  return [...notesNaming(name, notes).map((n) => n.replace(/^warning: /, '')), ...runWarnings];
}

/** The notes from loading a file that name this series (a batch gives each series its own). */
export function notesNaming(name: string, notes: readonly string[]): string[] {
  const tag = `series "${name}"`;
  return notes.filter((n) => n.includes(tag));
}

export async function runSeriesJob(task: SeriesTask, settings: JobSettings): Promise<SeriesOutcome> {
  const existed = existsSync(task.path);
  const base: BatchRow = {
    position: task.position,
    series: task.series.name,
    folder: null,
    status: 'failed',
    reason: null,
    structure: null,
    holdoutMase: null,
    bestBaseline: null,
    baselineMase: null,
    warnings: [],
  };
  try {
    const cli = parseForecastOptions(settings.opts);
    // report.html loads the chart library the batch folder keeps once (batch/run.ts writes it)
    // forecasts.csv keeps the holdout and forecast records of the series' forecast.csv, without rolling_point
    const { run, summaryJson, forecastRecords } = await runForecast(task.series, cli, task.path, settings.opts, quietIO, settings.loadNotes, task.folder, { chartLibrarySrc: chartAssetSrc(task.folder) });
    const verdict = run.evaluation?.verdict ?? null;
    return {
      row: {
        ...base,
        folder: task.folder,
        status: 'forecast',
        structure: run.asserted.structure.label,
        holdoutMase: verdict ? verdict.modelMase : null,
        bestBaseline: verdict ? verdict.baseline : null,
        baselineMase: verdict ? verdict.baselineMase : null,
        warnings: seriesWarnings(task.series.name, run.warnings, settings.loadNotes),
      },
      forecasts: forecastRecords,
      summaryJson: settings.keepSummary ? summaryJson : null,
      error: null,
    };
  } catch (e) {
    if (!existed) rmSync(task.path, { recursive: true, force: true });
    const error = jobError(e);
    return { row: { ...base, reason: error.line }, forecasts: '', summaryJson: null, error };
  }
}

/** A failure as the data an outcome carries (a CertaError, or a bug). */
export function jobError(e: unknown): JobError {
  if (isCertaError(e)) {
    return { code: e.code, message: e.message, line: e.line(), hint: e.context.hint ?? null, exitCode: e.exitCode, internal: false };
  }
  const err = e instanceof Error ? e : new Error(String(e));
  return { code: 'internal', message: err.message, line: `internal error: ${err.message}`, hint: null, exitCode: 1, internal: true };
}
