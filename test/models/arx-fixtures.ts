/**
 * Series builders and seeded simulators shared by the ARX and search tests.
 */
import type { Series } from '../../src/data/series.js';
import type { Frequency } from '../../src/data/calendar.js';
import { createRng } from '../../src/linalg/random.js';

/** A series with monthly (or other) time stamps starting January 2000. */
export function makeSeries(
  values: ArrayLike<number>,
  inputs: Record<string, ArrayLike<number>> = {},
  options: { frequency?: Frequency; season?: number | null; name?: string } = {},
): Series {
  const frequency = options.frequency ?? 'monthly';
  const n = values.length;
  const time = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    time[i] = frequency === 'yearly' ? Date.UTC(2000 + i, 0, 1) : frequency === 'index' ? i : Date.UTC(2000, i, 1);
  }
  return {
    name: options.name ?? 'sales',
    frequency,
    season: options.season !== undefined ? options.season : frequency === 'monthly' ? 12 : null,
    time,
    values: Float64Array.from(values),
    inputs: Object.entries(inputs).map(([name, v]) => ({ name, values: Float64Array.from(v) })),
  };
}

/** Gaussian white noise of standard deviation sd from a seeded stream. */
export function noise(n: number, sd: number, seed: number): Float64Array {
  const rng = createRng(seed);
  const e = new Float64Array(n);
  for (let i = 0; i < n; i++) e[i] = sd * rng.normal();
  return e;
}

/**
 * y_t = c + Σ a_i y_{t−i} + Σ_l b_l u_{t−d−l} + e_t from y = c/(1−Σa) start values, after
 * `burn` discarded steps; u is given for the kept and burn-in periods (length n + burn).
 */
export function simulateArx(opts: { n: number; c: number; a: number[]; b?: number[]; delay?: number; u?: Float64Array; e: Float64Array; burn?: number }): Float64Array {
  const burn = opts.burn ?? 50;
  const total = opts.n + burn;
  const y = new Float64Array(total);
  const sumA = opts.a.reduce((s, x) => s + x, 0);
  const level = opts.c / (1 - sumA);
  const b = opts.b ?? [];
  const d = opts.delay ?? 0;
  for (let t = 0; t < total; t++) {
    let v = opts.c + opts.e[t];
    for (let i = 0; i < opts.a.length; i++) v += opts.a[i] * (t - i - 1 >= 0 ? y[t - i - 1] : level);
    for (let l = 0; l < b.length; l++) {
      const idx = t - d - l;
      if (idx >= 0 && opts.u) v += b[l] * opts.u[idx];
    }
    y[t] = v;
  }
  return y.slice(burn);
}
