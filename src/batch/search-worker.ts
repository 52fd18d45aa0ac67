/**
 * The worker-thread side of a search over several series (cli/search.ts through pool.ts):
 * receives one series at a time, searches it and writes its files (`searchJob`), and posts the
 * outcome back. The settings arrive once, as workerData.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { searchJob, type SearchSettings, type SearchTask } from '../cli/search.js';

const settings = workerData as SearchSettings;
const port = parentPort;
if (!port) throw new Error('batch/search-worker.ts runs only as a worker thread');
port.on('message', (m: { index: number; task: SearchTask }) => {
  searchJob(m.task, settings).then(
    (outcome) => port.postMessage({ index: m.index, outcome }),
    (e: unknown) => {
      throw e;
    },
  );
});
