/**
 * Structure-search throughput: a default search on a 120-point monthly series with one, two and
 * three inputs (seeded ARX data with a yearly pattern, each input acting at its own delay),
 * reported as candidates fitted and milliseconds per series (best of 25 runs after warm-up: on
 * shared, busy cores a handful of runs rarely contains an undisturbed one), for every registered
 * family and per family alone, with the process's CPU time beside the elapsed time (CPU time
 * leaves out the waits for a core that other processes hold). One input searches the full grid of lag counts and delays; two
 * and three inputs the guided search (src/models/arx-inputs.ts).
 * Target on the 2-core reference machine: under 25 ms per series on one core with up to two
 * inputs; the three-input figure is reported.
 * Run: `npm run bench -- search` (or `npx tsx bench/search.bench.ts`).
 */
import { loadavg } from 'node:os';
import type { Series } from '../src/data/series.js';
import { createRng } from '../src/linalg/random.js';
import { familyNames } from '../src/models/registry.js';
import { search, type SearchOptions } from '../src/select/search.js';

/** The inputs of the bench series: name, delay and coefficient (one lag each). */
const INPUTS: [string, number, number][] = [
  ['price', 1, 1.5],
  ['promo', 2, 0.8],
  ['weather', 0, -0.6],
];

function benchSeries(inputs: number): Series {
  const n = 120;
  const burn = 50;
  const rng = createRng(120);
  const used = INPUTS.slice(0, inputs);
  const u = used.map(() => Float64Array.from({ length: n + burn }, () => rng.normal()));
  const y = new Float64Array(n + burn);
  for (let t = 0; t < n + burn; t++) {
    const prev = t > 0 ? y[t - 1] : 40;
    let v = 20 + 0.5 * prev + 3 * Math.sin((2 * Math.PI * t) / 12) + 0.5 * rng.normal();
    used.forEach(([, delay, b], j) => {
      if (t >= delay) v += b * u[j][t - delay];
    });
    y[t] = v;
  }
  return {
    name: 'bench',
    frequency: 'monthly',
    season: 12,
    time: Float64Array.from({ length: n }, (_, t) => Date.UTC(2010, t, 1)),
    values: y.slice(burn),
    inputs: used.map(([name], j) => ({ name, values: u[j].slice(burn) })),
  };
}

/** Timed runs per case; the best one is reported. */
const ROUNDS = 25;

function measure(series: Series, options: SearchOptions): { ms: number; cpu: number; candidates: number; fitted: number } {
  let r = search(series, options);
  let best = Infinity;
  let cpu = Infinity;
  for (let round = 0; round < ROUNDS; round++) {
    const t0 = process.hrtime.bigint();
    const c0 = process.cpuUsage();
    r = search(series, options);
    const c = process.cpuUsage(c0);
    best = Math.min(best, Number(process.hrtime.bigint() - t0) / 1e6);
    cpu = Math.min(cpu, (c.user + c.system) / 1e3);
  }
  return { ms: best, cpu, candidates: r.ranking.length, fitted: r.fitted };
}

const cases: [string, Series, SearchOptions][] = [];
for (const inputs of [1, 2, 3]) {
  const series = benchSeries(inputs);
  const tag = `${inputs} input${inputs > 1 ? 's' : ''}`;
  cases.push([`default, ${tag} (all families)`, series, {}]);
  for (const f of familyNames()) cases.push([`  ${f} only`, series, { families: [f] }]);
}
// Warm-up of every case first, so the optimising compiler has seen every family before timing.
for (let i = 0; i < 3; i++) for (const [, series, options] of cases) search(series, options);
console.log('search on 120 monthly points'.padEnd(40), 'candidates', ' fitted', '  ms/series', '  CPU ms', '  µs/candidate');
for (const [label, series, options] of cases) {
  const m = measure(series, options);
  console.log(
    label.padEnd(40),
    String(m.candidates).padStart(10),
    String(m.fitted).padStart(7),
    m.ms.toFixed(1).padStart(11),
    m.cpu.toFixed(1).padStart(9),
    ((m.ms * 1000) / m.candidates).toFixed(0).padStart(14),
  );
}
console.log(`target: default search under 25 ms per series with up to two inputs (load average ${loadavg()[0].toFixed(1)} at the end)`);
