/**
 * A pool of worker threads (node:worker_threads) running series tasks (series-job.ts). Tasks go
 * out one at a time to whichever worker is free, so a slow series never holds up the others;
 * outcomes are returned indexed by task, so what the caller writes does not depend on the number
 * of workers or on which finished first. With one worker the tasks run in this thread (no thread
 * start-up), through the same job function.
 *
 * The worker entry is `worker.js` next to this module in dist/; when this module runs from the
 * TypeScript sources (tests, benchmarks) it is `worker.ts`, imported after registering tsx's
 * loader in the new thread.
 *
 * The pool runs forecast tasks by default (`runPool`); `runJobPool` runs another kind of task
 * (a `PoolJob`: its function and the worker entry that serves it, e.g. search-worker.ts).
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { runSeriesJob, type JobSettings, type SeriesOutcome, type SeriesTask } from './series-job.js';

export interface PoolOptions<O = SeriesOutcome> {
  workers: number;
  /** Called after each outcome, in completion order, with how many are done. */
  onOutcome?: (outcome: O, done: number) => void;
  /** Stop handing out tasks after the first failure (those running still finish). */
  failFast?: boolean;
}

/**
 * Tasks a worker holds at once. The compute of a series blocks its thread, the writes of its
 * folder wait on the disk (fsync); with two, a worker computes one series while the files of
 * the other are written.
 */
const IN_FLIGHT = 2;

/**
 * Heap limits of a worker thread. A series allocates many short-lived arrays (fits, paths, the
 * texts of its files); a young generation of 128 MB (V8's default behaves like 48 MB) lets most
 * of them die before a scavenge, which halves the scavenges of a batch and cuts its CPU time
 * by about a tenth (measured on 1,000 monthly series, two workers), for about 150 MB more
 * resident memory. Only young objects are concerned; the old generation keeps V8's default.
 */
const WORKER_LIMITS = { maxYoungGenerationSizeMb: 128 };

/** One worker per core unless told otherwise. */
export function defaultWorkers(): number {
  return Math.max(1, availableParallelism());
}

/**
 * A kind of task: the function running one (the same in this thread and in a worker; a failure
 * is an outcome with `error` set, not an exception) and the worker entry next to this module that
 * runs it in a thread (its name without extension; it takes the settings as workerData, and
 * answers each `{ index, task }` message with `{ index, outcome }`).
 */
export interface PoolJob<T, S, O extends { error: unknown }> {
  run: (task: T, settings: S) => Promise<O>;
  entry: string;
}

const SERIES_JOB: PoolJob<SeriesTask, JobSettings, SeriesOutcome> = { run: runSeriesJob, entry: 'worker' };

/** Outcomes by task index; a task never started (after a failure under failFast) is undefined. */
export async function runPool(tasks: readonly SeriesTask[], settings: JobSettings, options: PoolOptions): Promise<(SeriesOutcome | undefined)[]> {
  return runJobPool(SERIES_JOB, tasks, settings, options);
}

/** `runPool` for tasks of any kind. */
export async function runJobPool<T, S, O extends { error: unknown }>(job: PoolJob<T, S, O>, tasks: readonly T[], settings: S, options: PoolOptions<O>): Promise<(O | undefined)[]> {
  const outcomes: (O | undefined)[] = new Array(tasks.length).fill(undefined);
  const count = Math.max(1, Math.min(options.workers, tasks.length));
  let done = 0;
  let stop = false;
  const record = (i: number, outcome: O): void => {
    outcomes[i] = outcome;
    done++;
    if (outcome.error && options.failFast) stop = true;
    options.onOutcome?.(outcome, done);
  };
  if (count === 1) {
    // In this thread, with the same overlap of compute and writes as a worker.
    let cursor = 0;
    const lane = async (): Promise<void> => {
      while (!stop && cursor < tasks.length) {
        const i = cursor++;
        record(i, await job.run(tasks[i], settings));
      }
    };
    await Promise.all(Array.from({ length: IN_FLIGHT }, lane));
    return outcomes;
  }
  const fromSources = import.meta.url.endsWith('.ts');
  let next = 0;
  await new Promise<void>((resolve, reject) => {
    const workers: Worker[] = [];
    let running = 0;
    let settled = false;
    const finish = (error?: Error): void => {
      if (settled) return;
      settled = true;
      for (const w of workers) void w.terminate();
      if (error) reject(error);
      else resolve();
    };
    const feed = (w: Worker): void => {
      if (stop || next >= tasks.length) {
        if (running === 0) finish();
        return;
      }
      running++;
      w.postMessage({ index: next, task: tasks[next] });
      next++;
    };
    for (let k = 0; k < count; k++) {
      const w = fromSources ? sourceWorker(job.entry, settings) : new Worker(new URL(`./${job.entry}.js`, import.meta.url), { workerData: settings, resourceLimits: WORKER_LIMITS });
      workers.push(w);
      w.on('message', (m: { index: number; outcome: O }) => {
        running--;
        record(m.index, m.outcome);
        feed(w);
      });
      w.on('error', (e) => finish(e instanceof Error ? e : new Error(String(e))));
      w.on('exit', (code) => {
        if (code !== 0 && !settled) finish(new Error(`a batch worker stopped with code ${code}`));
      });
      // Two tasks in flight per worker: one computes while the other's files are written.
      for (let j = 0; j < IN_FLIGHT; j++) feed(w);
    }
  });
  return outcomes;
}

/** A worker running an entry (worker.ts) from the sources: it registers the tsx loader, then imports it. */
function sourceWorker(name: string, settings: unknown): Worker {
  const entry = new URL(`./${name}.ts`, import.meta.url).href;
  const boot = `import('tsx/esm/api').then((m) => { m.register(); return import(${JSON.stringify(entry)}); });`;
  return new Worker(boot, { eval: true, workerData: settings, resourceLimits: WORKER_LIMITS });
}
