/**
 * The worker-thread side of a batch update (update-batch.ts through pool.ts): updates one
 * series' model at a time and writes its files (`runUpdateJob`), and posts the outcome back
 * (serve.ts).
 */
import { serveJobs } from './serve.js';
import { runUpdateJob } from './update-batch.js';

serveJobs('batch/update-worker.ts', runUpdateJob);
