/**
 * The worker-thread side of a pool (pool.ts): receives one task at a time, runs it with the
 * settings that arrived once as workerData, and posts the outcome back under the task's index.
 * A job that throws (a bug: jobs return their failures as outcomes) ends the worker, which the
 * pool reports.
 */
import { parentPort, workerData } from 'node:worker_threads';

export function serveJobs<Task, Settings, Outcome>(file: string, job: (task: Task, settings: Settings) => Promise<Outcome>): void {
  const settings = workerData as Settings;
  const port = parentPort;
  if (!port) throw new Error(`${file} runs only as a worker thread`);
  port.on('message', (m: { index: number; task: Task }) => {
    job(m.task, settings).then(
      (outcome) => port.postMessage({ index: m.index, outcome }),
      (e: unknown) => {
        throw e;
      },
    );
  });
}
