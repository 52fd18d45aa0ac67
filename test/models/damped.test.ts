import { describe, expect, it } from 'vitest';
import type { Series } from '../../src/data/series.js';
import { UsageError } from '../../src/data/errors.js';
import { createRng } from '../../src/linalg/random.js';
import { DampedStructure, dampedFamily } from '../../src/models/damped.js';
import { structureFromSpec } from '../../src/models/registry.js';
import { search } from '../../src/select/search.js';

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
  it('ranks the damped trend first on a long damped-trend series among the damped candidates', () => {
    const s = series(dampedPath(0.7, 200, 11, 0.3));
    const r = search(s, { families: ['damped'], transform: 'none' });
    expect(r.winner.result.key).toBe('damped|phi');
    expect(r.ranking.map((c) => c.key).sort()).toEqual(['damped|phi', 'damped|rw']);
  });

  it('offers only the random walk when maxAr is 0', () => {
    const s = series(dampedPath(0.7, 30, 5));
    const r = search(s, { families: ['damped'], transform: 'none', maxAr: 0 });
    expect(r.ranking.map((c) => c.key)).toEqual(['damped|rw']);
  });
});
