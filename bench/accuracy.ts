/**
 * `npm run bench:accuracy`: certa's default automatic pipeline on every yearly (645, horizon 6)
 * and quarterly (756, horizon 8) series of the M3 competition and on the development halves of
 * its monthly (714, horizon 18) and "other" (87, horizon 8) files (datasets/m3), scored as in the
 * competition (src/evaluate/m3.ts). Prints a point-accuracy table per category and overall beside
 * the published reference scores (with the mean wall time per series), an interval table (coverage of each band over all steps, at
 * the first and the last step, and the MSIS of the 95 % band, beside the seasonal-naive Gaussian
 * reference interval), and writes one row per series to output/bench/m3.csv.
 * `--categories yearly,monthly` scores only those files.
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
  M3_CATEGORIES,
  M3_FALLBACK,
  M3_PUBLISHED,
  type M3Category,
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

const FILES: Record<M3Category, string> = { yearly: 'M3Year.csv', quarterly: 'M3Quart.csv', monthly: 'M3Month-dev.csv', other: 'M3Other-dev.csv' };

function loadItems(every: number, categories: readonly M3Category[]): M3Item[] {
  const read = (f: M3Category) => parseM3(readFileSync(join(root, 'datasets/m3', FILES[f]), 'utf8'), f, `datasets/m3/${FILES[f]}`);
  return categories.flatMap((f) => read(f).filter((_, i) => i % every === 0));
}

interface Job {
  every: number;
  categories: M3Category[];
  part: number;
  parts: number;
  options: ForecastOptions;
}

function runPart(job: Job): { index: number; result: M3Result }[] {
  const items = loadItems(job.every, job.categories);
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

/** `--categories a,b`: the files to score (default all four). */
function categoriesOption(): M3Category[] {
  const at = process.argv.indexOf('--categories');
  if (at < 0) return [...M3_CATEGORIES];
  const list = (process.argv[at + 1] ?? '').split(',').map((s) => s.trim());
  for (const c of list) if (!(M3_CATEGORIES as readonly string[]).includes(c)) throw new Error(`--categories takes ${M3_CATEGORIES.join(', ')}, got ${c}`);
  return M3_CATEGORIES.filter((c) => list.includes(c));
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

/** Mean forecaster wall time per series (ms) of each category and of all results. */
function msPerSeries(results: readonly M3Result[]): Map<string, number> {
  const out = new Map<string, number>();
  const mean = (list: readonly M3Result[]) => list.reduce((a, r) => a + r.ms, 0) / Math.max(1, list.length);
  for (const c of M3_CATEGORIES) {
    const part = results.filter((r) => r.frequency === c);
    if (part.length > 0) out.set(c, mean(part));
  }
  out.set('all', mean(results));
  return out;
}

function table(summaries: M3Summary[], ms: Map<string, number>): string {
  const head = ['category', 'series', 'sMAPE', 'MASE', 'beats Naive2', 'Naive2 sMAPE', 'Naive2 MASE', 'pub. Naive2', 'pub. Theta', 'pub. B-J auto', 'failures', 'ms/series'];
  const rows = summaries.map((s) => {
    const pub = s.group in M3_PUBLISHED ? M3_PUBLISHED[s.group as M3Category] : null;
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
      (ms.get(s.group) ?? NaN).toFixed(1),
    ];
  });
  return layout(head, rows);
}

function layout(head: string[], rows: string[][]): string {
  const widths = head.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (cells: string[]) => cells.map((c, j) => pad(c, widths[j], j === 0)).join('  ');
  return [line(head), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n');
}

/** Coverage and MSIS per category: certa's bands beside the seasonal-naive Gaussian reference. */
function intervalTable(summaries: M3Summary[]): string {
  const pct = (x: number | undefined) => (x === undefined || !Number.isFinite(x) ? '' : `${(100 * x).toFixed(1)}`);
  const at = (list: M3Summary['bands'], level: number) => list.find((b) => b.level === level);
  const head = ['category', 'series', 'cover 80', '80 @1', '80 @h', 'cover 95', '95 @1', '95 @h', 'MSIS 95', 'ref cover 80', 'ref cover 95', 'ref 95 @h', 'ref MSIS 95'];
  const rows = summaries.map((s) => {
    const b80 = at(s.bands, 80);
    const b95 = at(s.bands, 95);
    const r80 = at(s.referenceBands, 80);
    const r95 = at(s.referenceBands, 95);
    return [
      s.group,
      String(b95?.series ?? 0),
      pct(b80?.coverage),
      pct(b80?.first),
      pct(b80?.last),
      pct(b95?.coverage),
      pct(b95?.first),
      pct(b95?.last),
      b95 ? b95.scaledScore.toFixed(2) : '',
      pct(r80?.coverage),
      pct(r95?.coverage),
      pct(r95?.last),
      r95 ? r95.scaledScore.toFixed(2) : '',
    ];
  });
  return layout(head, rows);
}

/** Worker entry: registers the TypeScript loader in the worker, then loads this file. */
const boot = `import(${JSON.stringify(import.meta.resolve('tsx/esm/api'))}).then((m) => { m.register(); return import(${JSON.stringify(import.meta.url)}); });`;

async function main(): Promise<void> {
  const every = option('every', 1);
  const categories = categoriesOption();
  const options = forecastOptions();
  const parts = option('workers', Math.max(1, Math.min(2, availableParallelism())));
  const started = performance.now();
  const chunks = await Promise.all(
    Array.from(
      { length: parts },
      (_, part) =>
        new Promise<{ index: number; result: M3Result }[]>((resolve, reject) => {
          const w = new Worker(boot, { eval: true, workerData: { every, categories, part, parts, options } satisfies Job });
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

  const band = (r: M3Result, level: number) => r.bands.find((b) => b.level === level);
  const ref95 = (r: M3Result) => r.referenceBands.find((b) => b.level === 95);
  const columns = ['series', 'category', 'domain', 'train', 'horizon', 'model', 'failure', 'smape', 'mase', 'naive2_smape', 'naive2_mase', 'band_method', 'cover_80', 'cover_95', 'msis_95', 'ref_cover_95', 'ref_msis_95', 'ms'];
  const rows = results.map((r) => [
    r.id,
    r.frequency,
    r.domain,
    r.train,
    r.horizon,
    r.model,
    r.failure,
    r.smape,
    r.mase,
    r.naive2Smape,
    r.naive2Mase,
    r.bandMethod,
    band(r, 80)?.coverage ?? null,
    band(r, 95)?.coverage ?? null,
    band(r, 95)?.scaledScore ?? null,
    ref95(r)?.coverage ?? null,
    ref95(r)?.scaledScore ?? null,
    Math.round(r.ms * 10) / 10,
  ]);
  const out = join(root, 'output/bench/m3.csv');
  writeFileAtomicSync(out, toCsv(columns, rows), { mkdir: true });

  const summaries = summariseM3ByFrequency(results);
  const variant = Object.keys(options).length > 0 ? `, options ${JSON.stringify(options)}` : ' default pipeline';
  process.stdout.write(`M3 accuracy, certa${variant}${every > 1 ? ` (every ${every}th series)` : ''}\n\n`);
  process.stdout.write(`${table(summaries, msPerSeries(results))}\n\n`);
  process.stdout.write('sMAPE in percent (mean over horizons, then series); MASE scale: in-sample naive (yearly, other), seasonal naive m = 4 (quarterly), m = 12 (monthly).\n');
  process.stdout.write('"beats Naive2": share of series with a strictly lower sMAPE than Naive2. Published: Makridakis & Hibon (2000), via Oreshkin et al. (2020) Table 14;\n');
  process.stdout.write('monthly and other are development halves (every 2nd series), so their published whole-category values are a yardstick only.\n');
  process.stdout.write('ms/series: wall time of the whole forecast (search, combination, intervals) per series in a worker; compare ratios within one run.\n\n');
  process.stdout.write(`Prediction intervals\n\n${intervalTable(summaries)}\n\n`);
  process.stdout.write('Coverage in percent: over all test steps, at step 1 (@1) and at the last step (@h). MSIS: interval score of the 95 % band scaled by the MASE scale\n');
  process.stdout.write('(Makridakis, Spiliotis & Assimakopoulos 2020, IJF 36(1)); lower is better. ref: the seasonal naive forecast with Gaussian bands (seasonal random walk variance).\n');
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
