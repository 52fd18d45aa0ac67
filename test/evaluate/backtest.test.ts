import { describe, expect, it } from 'vitest';
import { createRng } from '../../src/linalg/random.js';
import { forecastSeries } from '../../src/forecast/pipeline.js';
import { lstsq } from '../../src/linalg/lstsq.js';
import { Learner } from '../../src/forecast/online.js';
import { ArxStructure, validateArxSpec } from '../../src/models/arx.js';
import type { Series } from '../../src/data/series.js';

/** y_t = 0.5·y_{t−1} + g_t·u_t + ε_t with the gain g doubling (2 → 4) at t = `shiftAt`. */
function gainShift(seed: number, n: number, shiftAt: number): Series {
  const rng = createRng(seed);
  const y = new Float64Array(n);
  const u = new Float64Array(n);
  for (let t = 0; t < n; t++) {
    u[t] = 1 + rng.normal();
    const g = t < shiftAt ? 2 : 4;
    y[t] = (t > 0 ? 0.5 * y[t - 1] : 0) + g * u[t] + 0.3 * rng.normal();
  }
  return { name: 'sim', frequency: 'index', season: null, time: Float64Array.from(y, (_, i) => i), values: y, inputs: [{ name: 'u', values: u }] };
}

describe('rolling-origin evaluation with online learning', () => {
  it('with forgetting 0.9, learning beats frozen parameters after the input gain doubles', () => {
    // Simulated truth with a known break at the start of the holdout (t = 160 of 200).
    const series = gainShift(11, 200, 160);
    const run = forecastSeries(series, { holdout: 40, horizon: 4, forgetting: 0.9, search: { families: ['arx'], trend: 'off', transform: 'none' } });
    const table = run.evaluation!.table;
    const learning = table.find((r) => r.view === 'rolling-one-step' && r.method.startsWith('model, learning'))!;
    const frozen = table.find((r) => r.view === 'rolling-one-step' && r.method === 'model, frozen')!;
    expect(learning.metrics.mae).toBeLessThan(0.7 * frozen.metrics.mae);
    // The structure found uses the input at lag 0, where the gain changed.
    expect(run.asserted.structure.terms).toContain('u[t]');
  });

  it('without a break, λ = 1 learning and frozen parameters agree closely', () => {
    const series = gainShift(12, 200, 10_000);
    const run = forecastSeries(series, { holdout: 40, horizon: 4, search: { families: ['arx'], trend: 'off', transform: 'none' } });
    const t = run.evaluation!.table;
    const a = t.find((r) => r.method.startsWith('model, learning'))!.metrics.mae;
    const b = t.find((r) => r.method === 'model, frozen')!.metrics.mae;
    expect(Math.abs(a - b) / b).toBeLessThan(0.1);
  });
});

describe('Learner', () => {
  it('at λ = 1, learning rows one by one ends at the batch fit on all rows (identity)', () => {
    const series = gainShift(5, 150, 10_000);
    const s = new ArxStructure(
      validateArxSpec({ family: 'arx', ar: 1, inputs: [{ name: 'u', lags: 2, delay: 0 }], trend: false, harmonics: 0, season: null, seasonalLag: false, differencing: 'none', transform: 'none' }),
    );
    const learner = Learner.start(s, s.terms.map(() => true), series, 2, 100);
    const steps = learner.learn(series);
    expect(steps.length).toBe(50);
    const reg = s.regression(series, 2, 150);
    const batch = lstsq(reg.phi, reg.y, s.terms);
    const th = learner.theta;
    for (let j = 0; j < th.length; j++) expect(Math.abs(th[j] - batch.theta[j]) / Math.abs(batch.theta[j])).toBeLessThan(1e-8);
    // Learning again up to the same end is a no-op.
    expect(learner.learn(series).length).toBe(0);
    // A JSON round trip restores the same state.
    const back = Learner.fromJSON(s, JSON.parse(JSON.stringify(learner.toJSON())));
    expect(Array.from(back.theta)).toEqual(Array.from(th));
  });
});
