/**
 * Online-update throughput.
 *
 * 1. Library: `update(body, oneRow, …)` on an in-memory body (no file, no lock), for an ARX
 *    model (AR 1, one input, trend, one harmonic pair; 240-row window; 100 log entries) fitted on
 *    240 seeded points. Each call includes: checking the row, taking over the structure and
 *    learner the previous update left beside its body (after checking them against the body),
 *    one RLS step, one drift step, the fingerprint hash, extending the window and the log, and
 *    building the new body. The case "body read afresh" passes a shallow copy of the body, so
 *    nothing is carried over and structure and learner are rebuilt from the body's spec and
 *    arrays (as after reading a model file). Measured without the forecast (`skipForecast`),
 *    with the forecast (12 steps; calibrated bands, the default, and the asserted equation's analytic ones), and with serialization of the new body
 *    (`serializeModel`: validation, canonical JSON, SHA-256 checksum, pretty text) as the CLI
 *    writes it. Each update continues from the previous one's body (a chain of single-row
 *    updates), timed over 2 000 updates after 200 of warm-up, best of 5 rounds.
 *    The same, for the series as the default `certa forecast` saves it (its asserted structure
 *    and the members of its combined point forecast), without and with the combined forecast.
 * 2. CLI: wall time of one `node bin/certa.js update model.json rows.csv --no-charts` (a child
 *    process: Node start-up, module loading, lock, read, update, write), median of 9 runs.
 *
 * Target: ≥ 10 000 library updates per second without charts on the 2-core reference machine.
 * Run: `npm run bench -- update` (builds first; or `npx tsx bench/update.bench.ts` after
 * `npm run build`).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync, copyFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { update, type UpdateOptions } from '../src/forecast/update.js';
import { serializeModel, type ModelBody } from '../src/store/model-file.js';
import { formatTime } from '../src/data/calendar.js';
import { bodyOn, rowsOf, simulateArx } from '../test/forecast/update-fixtures.js';
import { sliceSeries } from '../src/data/series.js';
import { forecastSeries } from '../src/forecast/pipeline.js';
import { replacesOwn } from '../src/forecast/combine.js';
import { modelBody, storedCombination } from '../src/store/asserted.js';

const FIT = 240;
const sim = simulateArx(FIT + 2200 + 20, 42);
const start: ModelBody = (() => {
  let b = bodyOn(sim.series, FIT);
  for (let k = FIT; k < FIT + 100; k++) b = update(b, rowsOf(sim.series, k, k + 1), { now: '2024-01-01T00:00:00.000Z', skipForecast: true }).body;
  return b;
})();
const firstRow = FIT + 100;
const rows = Array.from({ length: 2200 }, (_, k) => rowsOf(sim.series, firstRow + k, firstRow + k + 1));

/**
 * The same series as `certa forecast` saves it: the default search on the first FIT points, the
 * asserted structure and the members of the combined point forecast, then 100 single-row
 * updates.
 */
const startCombined: ModelBody = (() => {
  const head = sliceSeries(sim.series, 0, FIT);
  const run = forecastSeries(head, { holdout: 0, horizon: 12 });
  const a = run.asserted;
  const c = run.forecast.combination;
  let b = modelBody({ structure: a.structure, learner: a.learner, se: a.estimate.se }, head, {
    criterion: run.search.criterion,
    criterionValue: run.search.winner.result.score,
    now: '2024-01-01T00:00:00.000Z',
    combination: c && replacesOwn(c, a.structure.key) ? storedCombination(c.members) : undefined,
  });
  for (let k = FIT; k < FIT + 100; k++) b = update(b, rowsOf(sim.series, k, k + 1), { now: '2024-01-01T00:00:00.000Z', skipForecast: true }).body;
  return b;
})();

function perSecond(options: Omit<UpdateOptions, 'now'>, serialize: boolean, afresh = false, from: ModelBody = start): { rate: number; us: number } {
  let best = Infinity;
  for (let round = 0; round < 5; round++) {
    let body = from;
    for (let k = 0; k < 200; k++) body = update(afresh ? { ...body } : body, rows[k], { now: '2024-01-01T00:00:00.000Z', ...options }).body;
    const t0 = process.hrtime.bigint();
    for (let k = 200; k < 2200; k++) {
      body = update(afresh ? { ...body } : body, rows[k], { now: '2024-01-01T00:00:00.000Z', ...options }).body;
      if (serialize) serializeModel(body);
    }
    best = Math.min(best, Number(process.hrtime.bigint() - t0) / 1e9);
  }
  return { rate: 2000 / best, us: (best / 2000) * 1e6 };
}

console.log('library update, one row, ARX (p = 6), window 240'.padEnd(56), 'updates/s', '   µs/update');
for (const [label, options, serialize, afresh] of [
  ['update, no forecast', { skipForecast: true }, false],
  ['update, no forecast, body read afresh', { skipForecast: true }, false, true],
  ['update + forecast (12 steps, calibrated bands)', {}, false],
  ['update + forecast (12 steps, analytic bands)', { intervals: { method: 'analytic' } }, false],
  ['update, no forecast + serializeModel', { skipForecast: true }, true],
  ['update + forecast + serializeModel', {}, true],
] as [string, Omit<UpdateOptions, 'now'>, boolean, boolean?][]) {
  const m = perSecond(options, serialize, afresh);
  console.log(`  ${label}`.padEnd(56), m.rate.toFixed(0).padStart(9), m.us.toFixed(1).padStart(12));
}
const members = startCombined.combination?.members.length ?? 0;
console.log(`the same series saved by the default forecast (${startCombined.structure.family} asserted, combination of ${members} members)`);
for (const [label, options] of [
  ['update, no forecast', { skipForecast: true }],
  ['update + combined forecast (12 steps, calibrated bands)', {}],
  ['update + combined forecast (12 steps, analytic bands)', { intervals: { method: 'analytic' } }],
] as [string, Omit<UpdateOptions, 'now'>][]) {
  const m = perSecond(options, false, false, startCombined);
  console.log(`  ${label}`.padEnd(56), m.rate.toFixed(0).padStart(9), m.us.toFixed(1).padStart(12));
}

// CLI wall time of one update (the built CLI).
const dir = mkdtempSync(join(tmpdir(), 'certa-update-bench-'));
try {
  const model = join(dir, 'model.json');
  const base = join(dir, 'base.json');
  writeFileSync(base, serializeModel(start));
  const f = sim.series.frequency;
  const k = firstRow;
  writeFileSync(join(dir, 'rows.csv'), `month,sales,price\n${formatTime(sim.series.time[k], f)},${sim.series.values[k]},${sim.series.inputs[0].values[k]}\n`);
  const times: number[] = [];
  for (let i = 0; i < 9; i++) {
    copyFileSync(base, model);
    const t0 = process.hrtime.bigint();
    const r = spawnSync(process.execPath, ['bin/certa.js', 'update', model, join(dir, 'rows.csv'), '--no-charts', '--json'], { encoding: 'utf8', env: { ...process.env, TZ: 'UTC' } });
    times.push(Number(process.hrtime.bigint() - t0) / 1e6);
    if (r.status !== 0) throw new Error(`certa update failed: ${r.stderr}`);
  }
  times.sort((a, b) => a - b);
  const node = spawnSync(process.execPath, ['-e', '0']);
  void node;
  const t0 = process.hrtime.bigint();
  spawnSync(process.execPath, ['-e', '0']);
  const bare = Number(process.hrtime.bigint() - t0) / 1e6;
  console.log(`CLI: certa update (one row, --no-charts), median of 9: ${times[4].toFixed(0)} ms (bare node start: ${bare.toFixed(0)} ms)`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
console.log('target: ≥ 10 000 library updates per second without charts');
