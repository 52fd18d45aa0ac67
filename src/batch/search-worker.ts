/**
 * The worker-thread side of a search over several series (cli/search.ts through pool.ts):
 * searches one series at a time and writes its files (`searchJob`), and posts the outcome back
 * (serve.ts).
 */
import { searchJob } from '../cli/search.js';
import { serveJobs } from './serve.js';

serveJobs('batch/search-worker.ts', searchJob);
