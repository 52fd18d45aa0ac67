/**
 * Seeded ARX series and saved-model bodies shared by the update tests and benchmark.
 */
import type { Series } from '../../src/data/series.js';
import { sliceSeries } from '../../src/data/series.js';
import { createRng } from '../../src/linalg/random.js';
import { ArxStructure, type ArxSpec } from '../../src/models/arx.js';
import { Learner } from '../../src/forecast/online.js';
import { modelBody } from '../../src/store/asserted.js';
import type { ModelBody } from '../../src/store/model-file.js';

export const NOW = '2024-01-01T00:00:00.000Z';

export interface Simulated {
  series: Series;
  /** Noise standard deviation. */
  sd: number;
}

/**
 * y_t = 5 + 0.5·y_{t−1} + gain_t·u_t + 0.02·t + 2·sin(2πt/12) + e_t, e ~ N(0, sd²), u ~ N(0, 1),
 * monthly from January 2000; gain_t = gain before `shiftAt` and `gainAfter` from it on.
 */
export function simulateArx(n: number, seed: number, options: { sd?: number; gain?: number; gainAfter?: number; shiftAt?: number; levelShift?: number } = {}): Simulated {
  const sd = options.sd ?? 1;
  const rng = createRng(seed);
  const burn = 30;
  const u = new Float64Array(n);
  const y = new Float64Array(n);
  let prev = 10;
  for (let t = -burn; t < n; t++) {
    const ut = rng.normal();
    const e = sd * rng.normal();
    const after = options.shiftAt !== undefined && t >= options.shiftAt;
    const gain = after ? (options.gainAfter ?? options.gain ?? 2) : (options.gain ?? 2);
    const level = after ? (options.levelShift ?? 0) : 0;
    const yt = 5 + level + 0.5 * prev + gain * ut + 0.02 * t + 2 * Math.sin((2 * Math.PI * t) / 12) + e;
    if (t >= 0) {
      u[t] = ut;
      y[t] = yt;
    }
    prev = yt;
  }
  return {
    sd,
    series: {
      name: 'sales',
      frequency: 'monthly',
      season: 12,
      time: Float64Array.from({ length: n }, (_, t) => Date.UTC(2000, t, 1)),
      values: y,
      inputs: [{ name: 'price', values: u }],
    },
  };
}

/** The true structure of `simulateArx`: AR(1), price at lag 0, trend, one harmonic pair. */
export const TRUE_SPEC: ArxSpec = {
  family: 'arx',
  ar: 1,
  inputs: [{ name: 'price', lags: 1, delay: 0 }],
  trend: true,
  harmonics: 1,
  season: 12,
  seasonalLag: false,
  differencing: 'none',
  transform: 'none',
};

/** A model body of `spec` fitted (batch least squares, then learning state) on the first `n` points. */
export function bodyOn(series: Series, n: number, spec: ArxSpec = TRUE_SPEC, options: { lambda?: number; windowCapacity?: number } = {}): ModelBody {
  const structure = new ArxStructure(spec);
  const head = sliceSeries(series, 0, n);
  const est = structure.estimate(head, structure.history, n);
  const learner = Learner.start(structure, est.active, head, structure.history, n, { lambda: options.lambda ?? 1 });
  return modelBody({ structure, learner, se: est.se }, head, {
    criterion: 'aicc',
    criterionValue: 0,
    now: NOW,
    windowCapacity: options.windowCapacity ?? 240,
    meta: { key: structure.key, label: structure.label, equation: structure.describe(est.theta, est.se), horizon: 12, levels: [80, 95] },
  });
}

/** Rows [from, to) of a series as a stand-alone series (no `before`), as a loaded file gives them. */
export function rowsOf(series: Series, from: number, to: number): Series {
  const s = sliceSeries(series, from, to);
  return { ...s, before: undefined, time: s.time.slice(), values: s.values.slice(), inputs: s.inputs.map((i) => ({ name: i.name, values: i.values.slice() })) };
}
