import { describe, expect, it } from 'vitest';
import type { Series } from '../../src/data/series.js';
import { UsageError } from '../../src/data/errors.js';
import { createRng } from '../../src/linalg/random.js';
import { DampedStructure, dampedFamily } from '../../src/models/damped.js';
import { structureFromSpec } from '../../src/models/registry.js';
import { search } from '../../src/select/search.js';
import { BASELINES } from '../../src/evaluate/baselines.js';

function series(values: ArrayLike<number>): Series {
  return { name: 'y', frequency: 'index', season: null, time: Float64Array.from(values, (_, i) => i), values: Float64Array.from(values), inputs: [] };
}

/** Δz_t = φ·Δz_{t−1} + e_t simulated from z_0 = 100, Δz_0 = 2. */
function dampedPath(phi: number, n: number, seed: number, sd = 0.05): Float64Array {
  const rng = createRng(seed);
  const z = new Float64Array(n);
  z[0] = 100;
  let d = 2;
  for (let t = 1; t < n; t++) {
    d = phi * d + sd * rng.normal();
    z[t] = z[t - 1] + d;
  }
  return z;
}

describe('DampedStructure', () => {
  const damped = new DampedStructure({ family: 'damped', damped: true, transform: 'none' });
  const walk = new DampedStructure({ family: 'damped', damped: false, transform: 'none' });

  it('recovers φ = 0.8 from a simulated damped trend (least squares on the differences)', () => {
    const s = series(dampedPath(0.8, 400, 3, 0.5));
    const e = damped.estimate(s, 2, 400);
    expect(e.theta[0]).toBeGreaterThan(0.8 - 3 * e.se[0]);
    expect(e.theta[0]).toBeLessThan(0.8 + 3 * e.se[0]);
  });

  it('simulates z_n + Δz_n·(φ + … + φ^k): levels off at z_n + Δz_n·φ/(1 − φ)', () => {
    const s = series([10, 12, 16]);
    const f = damped.simulate(Float64Array.of(0.5), s, [], 30);
    expect(f[0]).toBeCloseTo(18, 12);
    expect(f[1]).toBeCloseTo(19, 12);
    expect(f[29]).toBeCloseTo(16 + 4 * (0.5 / 0.5), 6);
  });

  it('as a random walk has no coefficients and forecasts the last value', () => {
    const s = series([3, 5, 4, 7]);
    expect(walk.terms).toEqual([]);
    const e = walk.estimate(s, 1, 4);
    expect(e.sigma2).toBeCloseTo((4 + 1 + 9) / 3, 12);
    expect(Array.from(walk.simulate(e.theta, s, [], 3))).toEqual([7, 7, 7]);
    expect(Array.from(walk.oneStep(e.theta, s, 1, 4))).toEqual([3, 5, 4]);
  });

  it('on the log scale forecasts a damped growth rate', () => {
    const s = series([100, 110, 121]);
    const logDamped = new DampedStructure({ family: 'damped', damped: true, transform: 'log' });
    const f = logDamped.simulate(Float64Array.of(1 - 1e-12), s, [], 1);
    expect(f[0]).toBeCloseTo(133.1, 6);
  });

  it('round-trips its spec through the registry and refuses a bad one', () => {
    expect(structureFromSpec(damped.spec).key).toBe('damped|phi');
    expect(() => new DampedStructure({ family: 'damped', damped: 'yes', transform: 'none' })).toThrow(UsageError);
  });

  it('is reported unstable for |φ| ≥ 1', () => {
    expect(dampedFamily.stable?.(damped, Float64Array.of(0.99))).toBe(true);
    expect(dampedFamily.stable?.(damped, Float64Array.of(1.01))).toBe(false);
    expect(dampedFamily.stable?.(walk, new Float64Array(0))).toBe(true);
  });
});

describe('search with the damped family', () => {
  it('ranks the damped trend first on a long damped-trend series among the change structures without drift', () => {
    const s = series(dampedPath(0.7, 200, 11, 0.3));
    const r = search(s, { families: ['damped'], transform: 'none', trend: 'off', maxAr: 1 });
    expect(r.winner.result.key).toBe('damped|phi');
    expect(r.ranking.map((c) => c.key).sort()).toEqual(['damped|phi', 'damped|rw']);
  });

  it('offers the random walk with and without drift when maxAr is 0', () => {
    const s = series(dampedPath(0.7, 30, 5));
    const r = search(s, { families: ['damped'], transform: 'none', maxAr: 0 });
    expect(r.ranking.map((c) => c.key).sort()).toEqual(['damped|rw', 'damped|rw|drift']);
  });

  it('on a seasonal series offers each harmonic count with and without drift and damping', () => {
    const values = Array.from({ length: 40 }, (_, t) => 50 + t + [3, -1, -4, 2][t % 4]);
    const s: Series = { ...series(values), frequency: 'quarterly', season: 4 };
    const r = search(s, { families: ['damped'], transform: 'none', maxAr: 1 });
    expect(r.ranking.length).toBe(3 * 2 * 2);
    expect(r.ranking.map((c) => c.key)).toContain('damped|phi|drift|K2s4');
  });
});

describe('the change family with drift and harmonics', () => {
  const drift = new DampedStructure({ family: 'damped', damped: false, drift: true, transform: 'none' });

  // Analytic identity: least squares of Δy on a constant is the mean change (y_n − y_1)/(n − 1),
  // so the random walk with drift forecasts y_n + k·(y_n − y_1)/(n − 1), the drift method of
  // Hyndman & Athanasopoulos (2021), §5.2, which baselines.ts implements independently.
  it('as a random walk with drift forecasts the drift method’s straight line', () => {
    const rng = createRng(21);
    const values = Array.from({ length: 25 }, (_, t) => 40 + 1.5 * t + 3 * rng.normal());
    const s = series(values);
    const e = drift.estimate(s, 1, 25);
    expect(e.theta[0]).toBeCloseTo((values[24] - values[0]) / 24, 12);
    const f = drift.simulate(e.theta, s, [], 5);
    const want = BASELINES['average-change'](s.values, 5, null);
    for (let k = 0; k < 5; k++) expect(f[k]).toBeCloseTo(want[k], 10);
    expect(drift.describe(e.theta)).toMatch(/^Δy\[t\] = [0-9.]+ \+ e\[t\]$/);
    expect(drift.derived(e.theta, s).find((d) => d.name === 'long-run change')?.value).toBeCloseTo(e.theta[0], 12);
  });

  // Analytic identity: for y_t = a + b·t + S(t mod 4) the change Δy_t = b + ΔS is periodic, and
  // two harmonic pairs span every period-4 pattern (terms.ts), so the fit is exact and the
  // forecast continues the series without error.
  it('with a full set of harmonics continues a trend plus a quarterly pattern exactly', () => {
    const pattern = [3, -1, -4, 2];
    const y = (t: number) => 50 + 0.8 * t + pattern[t % 4];
    const s: Series = { ...series(Array.from({ length: 20 }, (_, t) => y(t))), frequency: 'quarterly', season: 4 };
    const st = new DampedStructure({ family: 'damped', damped: false, drift: true, harmonics: 2, season: 4, transform: 'none' });
    const e = st.estimate(s, 1, 20);
    expect(e.sigma2).toBeLessThan(1e-20);
    const f = st.simulate(e.theta, s, [], 9);
    for (let k = 0; k < 9; k++) expect(f[k]).toBeCloseTo(y(20 + k), 9);
    // A later window that knows how many points came before continues the same pattern.
    const window: Series = { ...s, time: s.time.subarray(7), values: s.values.subarray(7), before: { count: 7, sum: 0 } };
    const g = st.simulate(e.theta, window, [], 9);
    for (let k = 0; k < 9; k++) expect(g[k]).toBeCloseTo(f[k], 9);
  });

  it('with damping and drift relaxes the change to c/(1 − φ)', () => {
    const st = new DampedStructure({ family: 'damped', damped: true, drift: true, transform: 'none' });
    const s = series([0, 10, 20]);
    const f = st.simulate(Float64Array.of(0.5, 1), s, [], 60);
    expect(f[0]).toBeCloseTo(20 + 0.5 * 10 + 1, 12);
    expect(f[59] - f[58]).toBeCloseTo(1 / (1 - 0.5), 9);
    expect(st.derived(Float64Array.of(0.5, 1), s).find((d) => d.name === 'long-run change')?.value).toBeCloseTo(2, 12);
  });

  it('keeps the keys of structures without drift or harmonics, and refuses harmonics it cannot form', () => {
    expect(new DampedStructure({ family: 'damped', damped: true, transform: 'log' }).key).toBe('damped|phi|log');
    const full = new DampedStructure({ family: 'damped', damped: true, drift: true, harmonics: 1, season: 12, transform: 'log' });
    expect(full.key).toBe('damped|phi|drift|K1s12|log');
    expect(structureFromSpec(full.spec).key).toBe(full.key);
    expect(() => new DampedStructure({ family: 'damped', damped: false, harmonics: 1, transform: 'none' })).toThrow(/season/);
    expect(() => new DampedStructure({ family: 'damped', damped: false, harmonics: 3, season: 4, transform: 'none' })).toThrow(/harmonics/);
    expect(() => new DampedStructure({ family: 'damped', damped: false, drift: 'yes', transform: 'none' })).toThrow(UsageError);
  });
});

describe('the change family with several lags of the change', () => {
  const two = new DampedStructure({ family: 'damped', damped: true, lags: 2, transform: 'none' });

  // Simulated ARIMA(2,1,0): Δz_t = 0.5·Δz_{t−1} + 0.3·Δz_{t−2} + e_t, coefficients known.
  it('recovers the two AR coefficients of a simulated change within three standard errors', () => {
    const rng = createRng(17);
    const z = new Float64Array(600);
    let d1 = 0;
    let d2 = 0;
    for (let t = 1; t < z.length; t++) {
      const d = 0.5 * d1 + 0.3 * d2 + rng.normal();
      z[t] = z[t - 1] + d;
      d2 = d1;
      d1 = d;
    }
    const e = two.estimate(series(z), 3, z.length);
    expect(Math.abs(e.theta[0] - 0.5)).toBeLessThan(3 * e.se[0]);
    expect(Math.abs(e.theta[1] - 0.3)).toBeLessThan(3 * e.se[1]);
  });

  it('simulates the recursion on the last two changes and names its terms by lag', () => {
    const s = series([0, 1, 3]);
    // Δ = 2, then 1: next changes 0.5·2 + 0.25·1 = 1.25, then 0.5·1.25 + 0.25·2 = 1.125.
    const f = two.simulate(Float64Array.of(0.5, 0.25), s, [], 2);
    expect(f[0]).toBeCloseTo(4.25, 12);
    expect(f[1]).toBeCloseTo(5.375, 12);
    expect(two.terms).toEqual(['Δy[t-1]', 'Δy[t-2]']);
    expect(two.key).toBe('damped|phi2');
    expect(structureFromSpec(two.spec).key).toBe('damped|phi2');
  });

  // Stability from the characteristic roots: x² − 0.5x − 0.3 has roots ≈ 0.85 and −0.35 (inside);
  // x² − 0.7x − 0.4 has a root ≈ 1.08 (outside).
  it('is stable exactly when the roots of the change recursion lie inside the unit circle', () => {
    expect(dampedFamily.stable?.(two, Float64Array.of(0.5, 0.3))).toBe(true);
    expect(dampedFamily.stable?.(two, Float64Array.of(0.7, 0.4))).toBe(false);
    expect(two.derived(Float64Array.of(0.5, 0.3), series([0, 1, 2])).find((d) => d.name === 'spectral radius')?.value).toBeCloseTo(
      (0.5 + Math.sqrt(0.25 + 1.2)) / 2,
      9,
    );
  });

  it('offers 1 … maxAr lags and refuses lags on a random walk', () => {
    const s = series(dampedPath(0.5, 60, 9));
    const keys = search(s, { families: ['damped'], transform: 'none', trend: 'off', maxAr: 3 }).ranking.map((c) => c.key);
    expect(keys.sort()).toEqual(['damped|phi', 'damped|phi2', 'damped|phi3', 'damped|rw']);
    expect(() => new DampedStructure({ family: 'damped', damped: false, lags: 2, transform: 'none' })).toThrow(UsageError);
  });
});
