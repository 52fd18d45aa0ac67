/**
 * Batch throughput of `certa forecast` on long-layout files of invented monthly series: the
 * weekly-collected sales of the product lines of the Osterby trading cooperative, 120 months
 * each (trend, yearly pattern and noise of their own, seeded), written as one CSV per size.
 *
 * Each run is the built CLI as a child process with default options (workers: one per core),
 * `--quiet`, timed by wall clock, its peak memory read by GNU time as the maximum resident set
 * size (worker threads share the process, so this covers them), and what it wrote: the bytes of
 * the average series folder and of the files at the top of the batch folder. Reported: 1,000 and 10,000
 * series without charts (cost per series of each, to show the growth is linear) and 1,000 with
 * charts. Targets on the 2-core reference machine: 10,000 series without charts under 60 s wall
 * and under 1 GB peak memory. After each run without charts, the monthly refresh of the same
 * batch folder: `certa update <folder> <file>` with one new month per series (BATCH_UPDATE=0
 * skips it).
 * Run: `npm run bench -- batch` (BATCH_SIZES=1000 to run a subset).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { createRng } from '../src/linalg/random.js';

const root = process.cwd();
const work = mkdtempSync(join(tmpdir(), 'certa-batch-bench-'));

/**
 * A long-layout file of `count` series of 120 months from 2015-01 (seeded: the same bytes each
 * time), and beside it (`<file>.next.csv`) each series' 121st month, drawn from a stream of its
 * own, for the batch update.
 */
function writeFile(count: number): string {
  const rng = createRng(20_240 + count);
  const nextRng = createRng(70_240 + count);
  const next = ['line,month,sales'];
  const lines = ['line,month,sales'];
  for (let s = 0; s < count; s++) {
    const level = 200 + 800 * rng.uniform();
    const growth = (rng.uniform() - 0.3) * 0.01;
    const amplitude = 0.05 + 0.25 * rng.uniform();
    const phase = 2 * Math.PI * rng.uniform();
    const noise = 0.02 + 0.06 * rng.uniform();
    const name = `OC-${String(s + 1).padStart(5, '0')}`;
    let y = level;
    for (let t = 0; t < 120; t++) {
      y *= 1 + growth;
      const v = y * (1 + amplitude * Math.sin((2 * Math.PI * t) / 12 + phase)) * (1 + noise * rng.normal());
      lines.push(`${name},${2015 + Math.floor(t / 12)}-${String((t % 12) + 1).padStart(2, '0')}-01,${v.toFixed(1)}`);
    }
    y *= 1 + growth;
    const v = y * (1 + amplitude * Math.sin((2 * Math.PI * 120) / 12 + phase)) * (1 + noise * nextRng.normal());
    next.push(`${name},2025-01-01,${v.toFixed(1)}`);
  }
  const file = join(work, `lines-${count}.csv`);
  writeFileSync(file, `${lines.join('\n')}\n`);
  writeFileSync(`${file}.next.csv`, `${next.join('\n')}\n`);
  return file;
}

interface Measure {
  wall: number;
  rssMb: number;
  code: number | null;
  /** Mean bytes of a series folder (all its files). */
  perFolder: number;
  /** Bytes of everything at the top of the batch folder that is not a series folder. */
  top: number;
}

/** Bytes of every file under `dir`. */
function treeBytes(dir: string): number {
  let sum = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    sum += e.isDirectory() ? treeBytes(p) : statSync(p).size;
  }
  return sum;
}

/** The series folders of a batch (those batch.csv names) and the rest of its top level. */
function batchBytes(out: string): { perFolder: number; top: number } {
  const folders = new Set(readdirSync(out, { withFileTypes: true }).filter((e) => e.isDirectory() && e.name.startsWith('OC-')).map((e) => e.name));
  let inFolders = 0;
  for (const f of folders) inFolders += treeBytes(join(out, f));
  return { perFolder: folders.size > 0 ? inFolders / folders.size : NaN, top: treeBytes(out) - inFolders };
}

/** The built CLI with these arguments under GNU time: wall seconds, peak resident MB, exit code. */
function timed(args: string[]): { wall: number; rssMb: number; code: number | null } {
  const t0 = performance.now();
  const p = spawnSync('/usr/bin/time', ['-f', '%M', process.execPath, join(root, 'bin/certa.js'), ...args], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024, env: { ...process.env, TZ: 'UTC' } });
  const wall = (performance.now() - t0) / 1000;
  const kb = Number(p.stderr.trim().split('\n').pop() ?? '');
  if (p.status !== 0) process.stderr.write(p.stderr.slice(0, 2000));
  return { wall, rssMb: Number.isFinite(kb) ? kb / 1024 : NaN, code: p.status };
}

/** The batch forecast of `file`, and (`withUpdate`) the batch update of its folder with the next month. */
function run(file: string, charts: boolean, withUpdate = false): Measure & { update: ReturnType<typeof timed> | null } {
  const out = join(work, `out-${Date.now()}`);
  const forecast = timed(['forecast', file, '--id', 'line', '--out', out, '--quiet', ...(charts ? [] : ['--no-charts'])]);
  const bytes = batchBytes(out);
  const update = withUpdate ? timed(['update', out, `${file}.next.csv`, '--id', 'line', '--quiet', '--no-charts']) : null;
  rmSync(out, { recursive: true, force: true });
  return { ...forecast, ...bytes, update };
}

const sizes = (process.env.BATCH_SIZES ?? '1000,10000').split(',').map(Number);
const chartSize = Number(process.env.BATCH_CHARTS ?? 1000);
console.log(`batch: monthly series of 120 points, ${availableParallelism()} cores, default workers (load average ${loadavg()[0].toFixed(1)})`);
console.log('series   charts   wall (s)   per series (ms)   peak RSS (MB)   exit   KiB per series folder   KiB at the top');
const updates = process.env.BATCH_UPDATE !== '0';
const rows: [number, boolean, ReturnType<typeof run>][] = [];
for (const n of sizes) rows.push([n, false, run(writeFile(n), false, updates)]);
if (chartSize > 0) rows.push([chartSize, true, run(writeFile(chartSize), true)]);
for (const [n, charts, m] of rows) {
  console.log(`${String(n).padStart(6)}   ${(charts ? 'yes' : 'no').padEnd(6)}   ${m.wall.toFixed(1).padStart(8)}   ${((1000 * m.wall) / n).toFixed(2).padStart(15)}   ${m.rssMb.toFixed(0).padStart(13)}   ${String(m.code).padStart(4)}   ${(m.perFolder / 1024).toFixed(1).padStart(21)}   ${(m.top / 1024).toFixed(1).padStart(14)}`);
}
if (updates) {
  console.log('\nbatch update of the same folder with one new month per series (certa update <folder> <file>, --no-charts):');
  console.log('series   wall (s)   per series (ms)   peak RSS (MB)   exit');
  for (const [n, , m] of rows) {
    if (m.update) console.log(`${String(n).padStart(6)}   ${m.update.wall.toFixed(1).padStart(8)}   ${((1000 * m.update.wall) / n).toFixed(2).padStart(15)}   ${m.update.rssMb.toFixed(0).padStart(13)}   ${String(m.update.code).padStart(4)}`);
  }
}
const plain = rows.filter(([, c]) => !c);
if (plain.length >= 2) {
  const [a, b] = [plain[0], plain[plain.length - 1]];
  console.log(`growth: ${b[0] / a[0]}x the series took ${(b[2].wall / a[2].wall).toFixed(2)}x the time (linear: ${b[0] / a[0]})`);
}
const big = plain.find(([n]) => n === 10_000);
if (big) console.log(`target 10,000 series: < 60 s wall (${big[2].wall.toFixed(1)} s), < 1024 MB peak (${big[2].rssMb.toFixed(0)} MB)`);
rmSync(work, { recursive: true, force: true });
