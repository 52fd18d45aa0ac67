/**
 * Estimation-core throughput: least-squares fits per second (120×8 and 500×20) and recursive
 * least-squares updates per second (8 and 20 parameters). Targets on the 2-core reference
 * machine: a 120×8 fit under 20 µs, an 8-parameter update under 0.5 µs.
 * Run: `npm run bench -- linalg` (or `npx tsx bench/linalg.bench.ts`).
 */
import { cpus, loadavg } from 'node:os';
import { lstsq } from '../src/linalg/lstsq.js';
import type { DesignMatrix } from '../src/linalg/matrix.js';
import { qr } from '../src/linalg/qr.js';
import { createRng } from '../src/linalg/random.js';
import { Rls, type RlsStep } from '../src/linalg/rls.js';

function problem(n: number, p: number, seed: number): { phi: DesignMatrix; y: Float64Array; names: string[] } {
  const rng = createRng(seed);
  const data = new Float64Array(n * p);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    data[i * p] = 1;
    for (let j = 1; j < p; j++) data[i * p + j] = rng.normal();
    y[i] = rng.normal();
  }
  return { phi: { rows: n, cols: p, data }, y, names: Array.from({ length: p }, (_, j) => `x${j}`) };
}

/**
 * Runs `fn` in batches for about `ms` milliseconds of this process's CPU time, five rounds;
 * returns the best round's CPU µs per call (CPU time, so time spent descheduled on a busy
 * machine is not counted).
 */
function time(fn: () => void, ms = 300): number {
  for (let i = 0; i < 2000; i++) fn(); // warm-up for the optimising compiler
  let best = Infinity;
  for (let round = 0; round < 5; round++) {
    let calls = 0;
    const c0 = process.cpuUsage();
    let used = 0;
    while (used < ms * 1e3) {
      for (let i = 0; i < 100; i++) fn();
      calls += 100;
      const c = process.cpuUsage(c0);
      used = c.user + c.system;
    }
    best = Math.min(best, used / calls);
  }
  return best;
}

const rows: [string, number, number][] = [];
let sink = 0;
for (const [n, p] of [[120, 8], [500, 20]]) {
  const { phi, y, names } = problem(n, p, n + p);
  rows.push([`lstsq ${n}×${p}`, time(() => (sink += lstsq(phi, y, names).rss)), n === 120 ? 20 : NaN]);
  rows.push([`  qr factor + solve ${n}×${p}`, time(() => (sink += qr(phi).solve(y)[0])), NaN]);
}
for (const p of [8, 20]) {
  const { phi, y, names } = problem(4 * p, p, p);
  const rls = Rls.fromFit(lstsq(phi, y, names), { lambda: 0.99 });
  const rng = createRng(99);
  const m = 4096;
  const feed = new Float64Array(m * p);
  const ys = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    feed[i * p] = 1;
    for (let j = 1; j < p; j++) feed[i * p + j] = rng.normal();
    ys[i] = rng.normal();
  }
  const views = Array.from({ length: m }, (_, i) => feed.subarray(i * p, (i + 1) * p));
  const out: RlsStep = { prediction: 0, innovation: 0, innovationVariance: 0, gain: new Float64Array(p) };
  let k = 0;
  rows.push([
    `rls update p=${p}`,
    time(() => {
      rls.update(views[k], ys[k], out);
      sink += out.innovation;
      k = (k + 1) & (m - 1);
    }),
    p === 8 ? 0.5 : NaN,
  ]);
}

process.stdout.write(`${cpus().length} CPUs (${cpus()[0]?.model ?? 'unknown'}), load average ${loadavg()[0].toFixed(1)} at start of report\n`);
const w = Math.max(...rows.map((r) => r[0].length));
process.stdout.write(`${'operation'.padEnd(w)}  ${'µs/op'.padStart(9)}  ${'ops/s'.padStart(11)}  target\n`);
for (const [name, us, target] of rows) {
  const t = Number.isNaN(target) ? '' : `< ${target} µs ${us < target ? 'met' : 'MISSED'}`;
  process.stdout.write(`${name.padEnd(w)}  ${us.toFixed(3).padStart(9)}  ${Math.round(1e6 / us).toLocaleString('en-US').padStart(11)}  ${t}\n`);
}
if (!Number.isFinite(sink)) process.stdout.write('(non-finite checksum)\n');
