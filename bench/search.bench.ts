/**
 * Structure-search throughput: a default search on a 120-point monthly series with one input
 * (seeded ARX data with a yearly pattern), reported as candidates fitted and milliseconds per
 * series (best of 25 runs after warm-up: on shared, busy cores a handful of runs rarely contains an
 * undisturbed one), for every registered family and per family alone.
 * Target on the 2-core reference machine: under 25 ms per series on one core.
 * Run: `npm run bench -- search` (or `npx tsx bench/search.bench.ts`).
 */
import { loadavg } from 'node:os';
import type { Series } from '../src/data/series.js';
import { createRng } from '../src/linalg/random.js';
import { familyNames } from '../src/models/registry.js';
import { search, type SearchOptions } from '../src/select/search.js';

function benchSeries(): Series {
  const n = 120;
  const burn = 50;
  const rng = createRng(120);
  const u = Float64Array.from({ length: n + burn }, () => rng.normal());
  const y = new Float64Array(n + burn);
  for (let t = 0; t < n + burn; t++) {
    const prev = t > 0 ? y[t - 1] : 40;
    const lagged = t >= 1 ? u[t - 1] : 0;
    y[t] = 20 + 0.5 * prev + 1.5 * lagged + 3 * Math.sin((2 * Math.PI * t) / 12) + 0.5 * rng.normal();
  }
  return {
    name: 'bench',
    frequency: 'monthly',
    season: 12,
    time: Float64Array.from({ length: n }, (_, t) => Date.UTC(2010, t, 1)),
    values: y.slice(burn),
    inputs: [{ name: 'price', values: u.slice(burn) }],
  };
}

/** Timed runs per case; the best one is reported. */
const ROUNDS = 25;

function measure(series: Series, options: SearchOptions): { ms: number; candidates: number; fitted: number } {
  let r = search(series, options);
  let best = Infinity;
  for (let round = 0; round < ROUNDS; round++) {
    const t0 = process.hrtime.bigint();
    r = search(series, options);
    best = Math.min(best, Number(process.hrtime.bigint() - t0) / 1e6);
  }
  return { ms: best, candidates: r.ranking.length, fitted: r.fitted };
}

const series = benchSeries();
const cases: [string, SearchOptions][] = [['default (all families)', {}], ...familyNames().map((f): [string, SearchOptions] => [`  ${f} only`, { families: [f] }])];
// Warm-up of every case first, so the optimising compiler has seen every family before timing.
for (let i = 0; i < 3; i++) for (const [, options] of cases) search(series, options);
console.log('search on 120 monthly points, 1 input'.padEnd(40), 'candidates', ' fitted', '  ms/series', '  µs/candidate');
for (const [label, options] of cases) {
  const m = measure(series, options);
  console.log(label.padEnd(40), String(m.candidates).padStart(10), String(m.fitted).padStart(7), m.ms.toFixed(1).padStart(11), ((m.ms * 1000) / m.candidates).toFixed(0).padStart(14));
}
console.log(`target: default search under 25 ms per series (load average ${loadavg()[0].toFixed(1)} at the end)`);
