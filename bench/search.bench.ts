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
 *
 * Then `certa search` on a long file of many such series (seeded, each with its own level,
 * pattern and noise; 1,000 unless SEARCH_SERIES says otherwise): the built CLI as a child process,
 * `--quiet`, wall time of the whole command with `--workers 1` and with the default (one worker
 * per core), and the CPU time of each (user plus system, every thread). The two runs write the
 * same bytes, which is checked.
 * Run: `npm run bench -- search` (or `npx tsx bench/search.bench.ts` after `npm run build`).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join, relative } from 'node:path';
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

/** A long-layout file of `count` monthly series of 120 points, invented (seeded: the same bytes each time). */
function manySeriesFile(dir: string, count: number): string {
  const rng = createRng(7_300 + count);
  const lines = ['stall,month,visits'];
  for (let k = 0; k < count; k++) {
    const level = 100 + 400 * rng.uniform();
    const phi = 0.3 + 0.5 * rng.uniform();
    const amplitude = 0.05 + 0.2 * rng.uniform();
    const name = `stall-${String(k + 1).padStart(4, '0')}`;
    let y = level;
    for (let t = 0; t < 120; t++) {
      y = level * (1 - phi) + phi * y + level * amplitude * Math.sin((2 * Math.PI * t) / 12) + 0.03 * level * rng.normal();
      lines.push(`${name},${2012 + Math.floor(t / 12)}-${String((t % 12) + 1).padStart(2, '0')},${y.toFixed(1)}`);
    }
  }
  const file = join(dir, `stalls-${count}.csv`);
  writeFileSync(file, `${lines.join('\n')}\n`);
  return file;
}

/** Every file under `root` with its bytes, to check that the runs wrote the same. */
function treeText(root: string): string {
  const parts: string[] = [];
  const walk = (d: string): void => {
    for (const e of readdirSync(d).sort()) {
      const p = join(d, e);
      if (statSync(p).isDirectory()) walk(p);
      else parts.push(`${relative(root, p)}\n${readFileSync(p, 'base64')}`);
    }
  };
  walk(root);
  return parts.join('\n');
}

/** The built CLI's `search` on the file into `cwd/out`: wall and CPU seconds, exit code, what it wrote. */
function cliSearch(file: string, cwd: string, workers: string[]): { wall: number; cpu: number; code: number | null; files: string } {
  rmSync(join(cwd, 'out'), { recursive: true, force: true });
  const t0 = performance.now();
  const p = spawnSync('/usr/bin/time', ['-f', '%U %S', process.execPath, join(process.cwd(), 'bin/certa.js'), 'search', file, '--id', 'stall', '--out', 'out', '--quiet', ...workers], {
    cwd,
    encoding: 'utf8',
    env: { ...process.env, TZ: 'UTC', SOURCE_DATE_EPOCH: '1700000000' },
  });
  const wall = (performance.now() - t0) / 1000;
  if (p.status !== 0) process.stderr.write(p.stderr.slice(0, 2000));
  const [user, system] = (p.stderr.trim().split('\n').pop() ?? '').split(' ').map(Number);
  return { wall, cpu: user + system, code: p.status, files: treeText(join(cwd, 'out')) };
}

const many = Number(process.env.SEARCH_SERIES ?? 1000);
const work = mkdtempSync(join(tmpdir(), 'certa-search-bench-'));
const manyFile = manySeriesFile(work, many);
console.log(`\ncerta search on ${many} monthly series of 120 points, ${availableParallelism()} cores (load average ${loadavg()[0].toFixed(1)})`);
console.log('workers'.padEnd(20), 'wall (s)', '  CPU (s)', '  ms/series (wall)', '  exit');
const runs: [string, ReturnType<typeof cliSearch>][] = [
  ['1', cliSearch(manyFile, work, ['--workers', '1'])],
  [`default (${availableParallelism()})`, cliSearch(manyFile, work, [])],
];
for (const [label, r] of runs) {
  console.log(label.padEnd(20), r.wall.toFixed(2).padStart(8), r.cpu.toFixed(2).padStart(9), ((1000 * r.wall) / many).toFixed(1).padStart(18), String(r.code).padStart(6));
}
console.log(`speed-up ${(runs[0][1].wall / runs[1][1].wall).toFixed(2)}x; the runs wrote ${runs[0][1].files === runs[1][1].files ? 'the same bytes' : 'DIFFERENT bytes'}`);
rmSync(work, { recursive: true, force: true });
