/**
 * The batch side of `certa forecast`: options (--workers, --shard, --fail-fast, --quiet), the run
 * (batch/run.ts), and what a person reads — one line per series, totals, the caution once, each
 * failure also on standard error — or the one JSON result document. Exit code 4 when some series
 * failed (1 when a failure was a bug), so a scheduler sees it; `--fail-fast` stops at the first
 * failure with that series' error instead, as a run over one series would.
 */
import { DEFAULT_LEVELS } from '../forecast/intervals.js';
import type { Command } from 'commander';
import { UsageError } from '../data/errors.js';
import type { Series } from '../data/series.js';
import type { LoadFailure } from '../data/load.js';
import { defaultWorkers } from '../batch/pool.js';
import { outcomeError, runBatch } from '../batch/run.js';
import { failureText } from '../batch/series-job.js';
import { parseShard, type Shard } from '../batch/shard.js';
import type { BatchRow } from '../batch/batch-table.js';
import { FORECAST_CAUTION } from '../report/cautions.js';
import { resultDocumentText, type WrittenResultEntry } from '../report/result-json.js';
import { BatchProgress } from './progress.js';
import { ExitRequest, type CliIO } from './main.js';
import type { parseForecastOptions } from './forecast.js';

/** Exit code of a batch in which some series failed (the others were completed). */
export const EXIT_SOME_FAILED = 4;

export interface CliBatchOptions {
  workers: number;
  shard: Shard | null;
  failFast: boolean;
  quiet: boolean;
}

/**
 * The batch options of a command over the series of a file: `--workers`, `--fail-fast`, `--quiet`
 * and, for forecast (`shard`), `--shard`. `certa search` takes no --shard: a search writes no
 * batch tables, so there is nothing for certa merge to join, and --json would hold one shard's
 * series only; `certa update` none either (it updates a shard's folder in place). `verb` names
 * what is done to a series in the --fail-fast help, `workersFor` what the workers share out.
 */
export function addBatchOptions(command: Command, { shard = true, verb = 'forecast', workersFor = 'a file of several series' }: { shard?: boolean; verb?: string; workersFor?: string } = {}): Command {
  command.option('--workers <n>', `worker threads for ${workersFor} (default: one per core); the output does not depend on it`);
  if (shard) command.option('--shard <k/n>', 'process only shard k of n (by a stable hash of the series name), for array jobs; join them with certa merge');
  return command
    .option('--fail-fast', `stop at the first series that cannot be ${verb} (default: report it and go on, exit code 4)`)
    .option('--quiet', 'print nothing on standard output (files, failures on standard error and the exit code still tell)');
}

export function parseBatchOptions(opts: Record<string, unknown>): CliBatchOptions {
  let workers = defaultWorkers();
  if (opts.workers !== undefined) {
    const raw = String(opts.workers).trim();
    if (!/^\d+$/.test(raw) || Number(raw) < 1 || Number(raw) > 256) {
      throw new UsageError('option-invalid', 'option --workers has an unusable value', { found: raw, expected: 'a whole number from 1 to 256' });
    }
    workers = Number(raw);
  }
  return { workers, shard: opts.shard !== undefined ? parseShard(opts.shard) : null, failFast: Boolean(opts.failFast), quiet: Boolean(opts.quiet) };
}

function fixed(x: number | null): string {
  return x === null ? '—' : x.toFixed(3);
}

/** The line of one series in the text summary of a batch. */
export function batchLine(r: BatchRow): string {
  if (r.status === 'failed') return `failed    ${r.series}: ${r.reason ?? ''}`;
  const verdict = r.holdoutMase === null ? 'no holdout' : `holdout MASE ${fixed(r.holdoutMase)}, best baseline ${r.bestBaseline} ${fixed(r.baselineMase)}`;
  const warn = r.warnings.length > 0 ? `; ${r.warnings.length} warning${r.warnings.length === 1 ? '' : 's'}` : '';
  return `forecast  ${r.series}: ${r.structure}; ${verdict}${warn} → ${r.folder}`;
}

export async function runForecastBatch(
  series: Series[],
  failedAtLoad: LoadFailure[],
  loadNotes: string[],
  cli: ReturnType<typeof parseForecastOptions>,
  batch: CliBatchOptions,
  opts: Record<string, unknown>,
  io: CliIO,
): Promise<void> {
  const out = cli.out ?? 'output';
  const report = batchReporter(io, batch.quiet);
  const result = await runBatch(series, failedAtLoad, {
    out,
    workers: batch.workers,
    shard: batch.shard,
    failFast: batch.failFast,
    levels: cli.forecast.levels ?? [...DEFAULT_LEVELS],
    report: cli.report !== false,
    settings: { opts, loadNotes, keepSummary: cli.json },
    onStart: report.start,
    onOutcome: (o, done) => report.outcome(o.error ? failureText(o.row.series, o.error.line) : null, done),
  });
  report.stop();
  if (result.stoppedBy) throw outcomeError(result.stoppedBy);
  const rows = result.rows;
  const failed = rows.filter((r) => r.status === 'failed');
  if (cli.json) {
    const entries: WrittenResultEntry[] = result.outcomes.map((o) => ({
      series: o.row.series,
      status: o.row.status === 'failed' ? 'failed' : 'ok',
      folder: o.row.folder,
      reason: o.row.reason,
      detailJson: o.summaryJson,
    }));
    io.out(resultDocumentText('forecast', entries));
  } else if (!batch.quiet) {
    const shard = batch.shard ? ` (shard ${batch.shard.k} of ${batch.shard.n} of ${series.length + failedAtLoad.length} series in the file)` : '';
    io.out(batchText(rows.map(batchLine), `${rows.length} series${shard}: ${rows.length - failed.length} forecast, ${failed.length} failed`, `Wrote ${result.tables.join(', ')} and one folder per forecast series to ${out}`));
  }
  failIfSome(io, failed.length, rows.length, !(batch.quiet || cli.json), `batch.csv in ${out}`, result.outcomes.some((o) => o.error?.internal));
}

/**
 * "series k of n" on standard error while a batch runs (a terminal only; nothing with --quiet),
 * cleared for the `certa:` line of each failure as it comes.
 */
export interface BatchReporter {
  start: (total: number) => void;
  /** A failure's `certa:` line (`failure`), when one came, then the count done. */
  outcome: (failure: string | null, done: number) => void;
  /** A failure's line alone (the count follows with `outcome`). */
  fail: (failure: string) => void;
  stop: () => void;
}

export function batchReporter(io: CliIO, quiet: boolean): BatchReporter {
  let progress: BatchProgress | null = null;
  const fail = (failure: string): void => {
    progress?.stop();
    io.err(`certa: ${failure}\n`);
  };
  return {
    start: (total) => {
      if (!quiet) progress = new BatchProgress(io, total);
    },
    outcome: (failure, done) => {
      if (failure !== null) fail(failure);
      progress?.update(done);
    },
    fail,
    stop: () => progress?.stop(),
  };
}

/** The text summary of a batch: one line per series, its totals, what it wrote, and the caution once. */
export function batchText(lines: readonly string[], totals: string, wrote: string): string {
  return `${[...lines, '', totals, wrote, '', FORECAST_CAUTION].join('\n')}\n`;
}

/**
 * Exit code 4 when some series of a batch failed (1 when a failure was a bug), with a line on
 * standard error saying how many when the text summary did not (`shown` false: --quiet, --json).
 */
export function failIfSome(io: CliIO, failed: number, total: number, shown: boolean, where: string, internal: boolean): void {
  if (failed === 0) return;
  if (!shown) io.err(`certa: ${failed} of ${total} series failed (see ${where})\n`);
  throw new ExitRequest(internal ? 1 : EXIT_SOME_FAILED);
}
