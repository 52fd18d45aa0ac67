/**
 * `npm run bench:accuracy`: certa's default automatic pipeline on every yearly (645, horizon 6)
 * and quarterly (756, horizon 8) series of the M3 competition (datasets/m3), scored as in the
 * competition (src/evaluate/m3.ts). Prints a table per category and overall beside the
 * published reference scores, and writes one row per series to output/bench/m3.csv.
 *
 * The series are split over worker threads (one per core, at most 2 by default; `--workers k`),
 * each taking every k-th series; results are put back in file order, so the output does not
 * depend on the number of workers. `--every k` scores only every k-th series of each file (a
 * quick look; the full run is the benchmark).
 *
 * `--options '<json>'` passes forecast options to the pipeline instead of the defaults, to
 * measure a variant on the same scoring, e.g. `--options '{"combine":false}'` (the winner
 * alone), `'{"search":{"families":["damped"]}}'` (one family) or `'{"combine":{"maxDelta":1e9}}'`
 * (equal weights over every group). The benchmark of record is the run without it.
 */
import { readFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import {
  M3_FALLBACK,
  M3_PUBLISHED,
  certaForecaster,
  parseM3,
  scoreM3,
  summariseM3ByFrequency,
  type M3Item,
  type M3Result,
  type M3Summary,
} from '../src/evaluate/m3.js';
import { toCsv } from '../src/report/tables.js';
import type { ForecastOptions } from '../src/forecast/pipeline.js';
import { writeFileAtomicSync } from '../src/store/atomic.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');

function loadItems(every: number): M3Item[] {
  const read = (file: string, f: 'yearly' | 'quarterly') => parseM3(readFileSync(join(root, 'datasets/m3', file), 'utf8'), f, `datasets/m3/${file}`);
  const keep = (items: M3Item[]) => items.filter((_, i) => i % every === 0);
  return [...keep(read('M3Year.csv', 'yearly')), ...keep(read('M3Quart.csv', 'quarterly'))];
}

interface Job {
  every: number;
  part: number;
  parts: number;
  options: ForecastOptions;
}

function runPart(job: Job): { index: number; result: M3Result }[] {
  const items = loadItems(job.every);
  const mine = items.map((item, index) => ({ item, index })).filter(({ index }) => index % job.parts === job.part);
  const results = scoreM3(
    mine.map((m) => m.item),
    certaForecaster(job.options),
  );
  return results.map((result, i) => ({ index: mine[i].index, result }));
}

function option(name: string, fallback: number): number {
  const at = process.argv.indexOf(`--${name}`);
  if (at < 0) return fallback;
  const v = Number(process.argv[at + 1]);
  if (!Number.isInteger(v) || v < 1) throw new Error(`--${name} needs a whole number ≥ 1, got ${process.argv[at + 1]}`);
  return v;
}

/** `--options '<json>'`: forecast options for a variant (an object), or none. */
function forecastOptions(): ForecastOptions {
  const at = process.argv.indexOf('--options');
  if (at < 0) return {};
  const text = process.argv[at + 1] ?? '';
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    throw new Error(`--options needs a JSON object, got ${text}`);
  }
  if (value === null || typeof value !== 'object' || Array.isArray(value)) throw new Error(`--options needs a JSON object, got ${text}`);
  return value as ForecastOptions;
}

function pad(s: string, w: number, right = false): string {
  return right ? s.padEnd(w) : s.padStart(w);
}

function table(summaries: M3Summary[]): string {
  const head = ['category', 'series', 'sMAPE', 'MASE', 'beats Naive2', 'Naive2 sMAPE', 'Naive2 MASE', 'pub. Naive2', 'pub. Theta', 'pub. B-J auto', 'failures'];
  const rows = summaries.map((s) => {
    const pub = s.group === 'yearly' || s.group === 'quarterly' ? M3_PUBLISHED[s.group] : null;
    return [
      s.group,
      String(s.series),
      s.smape.toFixed(2),
      s.mase.toFixed(3),
      `${(100 * s.beatsNaive2).toFixed(1)} %`,
      s.naive2Smape.toFixed(2),
      s.naive2Mase.toFixed(3),
      pub ? pub.naive2.toFixed(2) : '',
      pub ? pub.theta.toFixed(2) : '',
      pub ? pub.boxJenkins.toFixed(2) : '',
      String(s.failures),
    ];
  });
  const widths = head.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (cells: string[]) => cells.map((c, j) => pad(c, widths[j], j === 0)).join('  ');
  return [line(head), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n');
}

/** Worker entry: registers the TypeScript loader in the worker, then loads this file. */
const boot = `import(${JSON.stringify(import.meta.resolve('tsx/esm/api'))}).then((m) => { m.register(); return import(${JSON.stringify(import.meta.url)}); });`;

async function main(): Promise<void> {
  const every = option('every', 1);
  const options = forecastOptions();
  const parts = option('workers', Math.max(1, Math.min(2, availableParallelism())));
  const started = performance.now();
  const chunks = await Promise.all(
    Array.from(
      { length: parts },
      (_, part) =>
        new Promise<{ index: number; result: M3Result }[]>((resolve, reject) => {
          const w = new Worker(boot, { eval: true, workerData: { every, part, parts, options } satisfies Job });
          w.once('message', resolve);
          w.once('error', reject);
          w.once('exit', (code) => {
            if (code !== 0) reject(new Error(`worker ${part} stopped with exit code ${code}`));
          });
        }),
    ),
  );
  const seconds = (performance.now() - started) / 1000;
  const results = chunks
    .flat()
    .sort((a, b) => a.index - b.index)
    .map((c) => c.result);

  const columns = ['series', 'frequency', 'domain', 'train', 'horizon', 'model', 'failure', 'smape', 'mase', 'naive2_smape', 'naive2_mase', 'ms'];
  const rows = results.map((r) => [r.id, r.frequency, r.domain, r.train, r.horizon, r.model, r.failure, r.smape, r.mase, r.naive2Smape, r.naive2Mase, Math.round(r.ms * 10) / 10]);
  const out = join(root, 'output/bench/m3.csv');
  writeFileAtomicSync(out, toCsv(columns, rows), { mkdir: true });

  const summaries = summariseM3ByFrequency(results);
  const variant = Object.keys(options).length > 0 ? `, options ${JSON.stringify(options)}` : ' default pipeline';
  process.stdout.write(`M3 accuracy, certa${variant}${every > 1 ? ` (every ${every}th series)` : ''}\n\n`);
  process.stdout.write(`${table(summaries)}\n\n`);
  process.stdout.write('sMAPE in percent (mean over horizons, then series); MASE scale: in-sample naive (yearly), seasonal naive m = 4 (quarterly).\n');
  process.stdout.write('"beats Naive2": share of series with a strictly lower sMAPE than Naive2. Published: Makridakis & Hibon (2000), via Oreshkin et al. (2020) Table 14.\n');
  const failed = results.filter((r) => r.failure !== null);
  if (failed.length > 0) {
    process.stdout.write(`\n${failed.length} series failed and were scored with the ${M3_FALLBACK} forecast:\n`);
    for (const r of failed.slice(0, 20)) process.stdout.write(`  ${r.id} (${r.frequency}): ${r.failure}\n`);
    if (failed.length > 20) process.stdout.write(`  … and ${failed.length - 20} more (see the failure column of the CSV)\n`);
  }
  process.stdout.write(`\n${results.length} series in ${seconds.toFixed(1)} s on ${parts} worker thread${parts > 1 ? 's' : ''}; per-series results: output/bench/m3.csv\n`);
}

if (isMainThread) {
  main().catch((e) => {
    process.stderr.write(`${e instanceof Error ? (e.stack ?? e.message) : String(e)}\n`);
    process.exitCode = 1;
  });
} else {
  parentPort?.postMessage(runPart(workerData as Job));
}
