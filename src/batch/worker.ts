/**
 * The worker-thread side of the batch pool (pool.ts): runs one series task at a time
 * (series-job.ts) and posts the outcome back (serve.ts).
 */
import { serveJobs } from './serve.js';
import { runSeriesJob } from './series-job.js';

serveJobs('batch/worker.ts', runSeriesJob);
