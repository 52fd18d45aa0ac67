/**
 * Loader throughput: a long-layout CSV of 2,000,000 rows (2,000 series × 1,000 days:
 * `id,date,value`) written to a temporary directory, read (a) by a bare
 * `readFile + split + parseFloat` pass and (b) by certa's loader through to regular Series.
 * Each reader runs in a child process of its own so its peak RSS is its own; each is timed on
 * its best of two runs. Prints rows/s, peak RSS, heap in use after the read, and the ratio.
 *
 * Run: npm run bench -- load
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const SERIES = 2_000;
const DAYS = 1_000;
const ROWS = SERIES * DAYS;

interface Result {
  seconds: number;
  peakRssMb: number;
  heapMb: number;
  check: number;
}

async function bare(file: string): Promise<number> {
  const text = (await readFile(file)).toString('utf8');
  const lines = text.split('\n');
  let sum = 0;
  for (let i = 1; i < lines.length; i++) {
    if (lines[i].length === 0) continue;
    const fields = lines[i].split(',');
    sum += parseFloat(fields[2]);
  }
  return sum;
}

async function certa(file: string): Promise<number> {
  const { loadSeries } = await import('../src/data/load.js');
  const { series } = await loadSeries(file);
  let sum = 0;
  for (const s of series) for (const v of s.values) sum += v;
  return sum;
}

async function child(which: string, file: string): Promise<void> {
  const run = which === 'bare' ? bare : certa;
  let best = Infinity;
  let check = 0;
  for (let k = 0; k < 2; k++) {
    (globalThis as { gc?: () => void }).gc?.();
    const t0 = process.hrtime.bigint();
    check = await run(file);
    best = Math.min(best, Number(process.hrtime.bigint() - t0) / 1e9);
  }
  const result: Result = {
    seconds: best,
    peakRssMb: process.resourceUsage().maxRSS / 1024,
    heapMb: process.memoryUsage().heapUsed / 2 ** 20,
    check,
  };
  process.stdout.write(JSON.stringify(result));
}

function generate(file: string): void {
  // A seeded xorshift32 stream for the values; dates 2020-01-01 onward.
  let state = 123_456_789;
  const next = (): number => {
    state ^= state << 13;
    state >>>= 0;
    state ^= state >>> 17;
    state ^= state << 5;
    state >>>= 0;
    return state / 4_294_967_296;
  };
  const dates = Array.from({ length: DAYS }, (_, d) => new Date(Date.UTC(2020, 0, 1 + d)).toISOString().slice(0, 10));
  const chunks: string[] = ['id,date,value\n'];
  for (let s = 0; s < SERIES; s++) {
    const id = `s${String(s).padStart(4, '0')}`;
    const lines: string[] = [];
    for (let d = 0; d < DAYS; d++) lines.push(`${id},${dates[d]},${(100 + 50 * next()).toFixed(3)}`);
    chunks.push(lines.join('\n'), '\n');
  }
  writeFileSync(file, chunks.join(''));
}

async function parent(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'certa-bench-'));
  const file = join(dir, 'long.csv');
  try {
    generate(file);
    const sizeMb = readFileSync(file).length / 2 ** 20;
    const self = fileURLToPath(import.meta.url);
    const measure = (which: string): Result => {
      const r = spawnSync(process.execPath, ['--expose-gc', '--max-old-space-size=4096', '--import', 'tsx', self, '--child', which, file], { encoding: 'utf8', maxBuffer: 1 << 20 });
      if (r.status !== 0) throw new Error(`${which} failed: ${r.stderr}`);
      return JSON.parse(r.stdout) as Result;
    };
    const b = measure('bare');
    const c = measure('certa');
    const row = (name: string, r: Result) =>
      `${name.padEnd(34)}${(ROWS / r.seconds / 1e6).toFixed(2).padStart(8)} M rows/s${r.seconds.toFixed(2).padStart(8)} s${r.peakRssMb.toFixed(0).padStart(8)} MB${r.heapMb.toFixed(0).padStart(8)} MB`;
    console.log(`long CSV: ${ROWS.toLocaleString('en-US')} rows (${SERIES} series × ${DAYS} days), ${sizeMb.toFixed(1)} MB`);
    console.log(`${'reader'.padEnd(34)}${'speed'.padStart(17)}${'time'.padStart(10)}${'peak RSS'.padStart(11)}${'heap'.padStart(8)}`);
    console.log(row('bare readFile+split+parseFloat', b));
    console.log(row('certa loadSeries → Series[]', c));
    console.log(`ratio certa / bare speed: ${(b.seconds / c.seconds).toFixed(2)} (aim ≥ 0.25)`);
    if (Math.abs(b.check - c.check) > 1e-6 * Math.abs(b.check)) console.log(`value sums differ: ${b.check} vs ${c.check}`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const at = process.argv.indexOf('--child');
if (at >= 0) await child(process.argv[at + 1], process.argv[at + 2]);
else await parent();
