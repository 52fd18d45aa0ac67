/**
 * The worker-thread side of the batch pool (pool.ts): receives one series task at a time, runs
 * it (series-job.ts) and posts the outcome back. The job settings arrive once, as workerData.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { runSeriesJob, type JobSettings, type SeriesTask } from './series-job.js';

const settings = workerData as JobSettings;
const port = parentPort;
if (!port) throw new Error('batch/worker.ts runs only as a worker thread');
port.on('message', (m: { index: number; task: SeriesTask }) => {
  runSeriesJob(m.task, settings).then(
    (outcome) => port.postMessage({ index: m.index, outcome }),
    (e: unknown) => {
      throw e;
    },
  );
});
