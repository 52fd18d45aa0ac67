/**
 * End-to-end `certa forecast` on the demo data: the library call (load → search → holdout and
 * rolling evaluation → refit → intervals → tables → charts) timed in-process, and the CLI wall
 * time as a child process (Node start-up included), with and without charts.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadSeries } from '../src/data/load.js';
import { forecastSeries } from '../src/forecast/pipeline.js';
import { forecastCharts, forecastFiles } from '../src/report/forecast-report.js';

const demo = 'datasets/demo/vallmark-heatpumps.csv';
const reps = 3;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

const lib: number[] = [];
const libCharts: number[] = [];
let candidates = 0;
for (let r = 0; r < reps; r++) {
  const t0 = performance.now();
  const { series } = await loadSeries(demo, { inputs: ['subsidy', 'frost_index'] });
  const run = forecastSeries(series[0]);
  forecastFiles(run);
  const t1 = performance.now();
  forecastCharts(run);
  const t2 = performance.now();
  lib.push(t1 - t0);
  libCharts.push(t2 - t0);
  candidates = run.search.fitted + run.search.failed;
}

const out = mkdtempSync(join(tmpdir(), 'certa-bench-'));
function cli(extra: string[]): number {
  const times: number[] = [];
  for (let r = 0; r < reps; r++) {
    const t0 = performance.now();
    const p = spawnSync(process.execPath, ['bin/certa.js', 'forecast', demo, '--inputs', 'subsidy,frost_index', '--out', out, ...extra], { encoding: 'utf8' });
    if (p.status !== 0) throw new Error(p.stderr);
    times.push(performance.now() - t0);
  }
  return median(times);
}
const cliCharts = cli([]);
const cliNoCharts = cli(['--no-charts']);

console.log(`demo: 120 monthly points, 2 inputs, ${candidates} candidates searched (load average ${loadavg()[0].toFixed(1)})`);
console.log(`library, no charts     ${median(lib).toFixed(0).padStart(6)} ms (median of ${reps})`);
console.log(`library, with charts   ${median(libCharts).toFixed(0).padStart(6)} ms`);
console.log(`CLI, --no-charts       ${cliNoCharts.toFixed(0).padStart(6)} ms (wall, Node start-up included)`);
console.log(`CLI, with charts       ${cliCharts.toFixed(0).padStart(6)} ms   target < 2000 ms`);
