import { describe, expect, it } from 'vitest';
import { createRng } from '../../src/linalg/random.js';
import { ArxStructure, validateArxSpec } from '../../src/models/arx.js';
import { forecastWithIntervals, quantileSorted } from '../../src/forecast/intervals.js';
import { normalCdf, normalQuantile } from '../../src/forecast/normal.js';
import type { Series } from '../../src/data/series.js';

function ar1Series(seed: number, n: number, phi: number, c: number): Float64Array {
  const rng = createRng(seed);
  const y = new Float64Array(n);
  let prev = c / (1 - phi);
  for (let burn = 0; burn < 50; burn++) prev = c + phi * prev + rng.normal();
  for (let t = 0; t < n; t++) {
    prev = c + phi * prev + rng.normal();
    y[t] = prev;
  }
  return y;
}

function asSeries(values: Float64Array): Series {
  return { name: 'sim', frequency: 'index', season: null, time: Float64Array.from(values, (_, i) => i), values, inputs: [] };
}

const ar1 = new ArxStructure(
  validateArxSpec({ family: 'arx', ar: 1, inputs: [], trend: false, harmonics: 0, season: null, seasonalLag: false, differencing: 'none', transform: 'none' }),
);

describe('normalQuantile / normalCdf', () => {
  it('matches standard normal table values', () => {
    // Standard normal quantiles, e.g. Abramowitz & Stegun (1964) Table 26.5 (values from memory to 10 digits).
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963985, 9);
    expect(normalQuantile(0.9)).toBeCloseTo(1.2815515655, 9);
    expect(normalQuantile(0.995)).toBeCloseTo(2.5758293035, 9);
    expect(normalQuantile(0.025)).toBeCloseTo(-1.959963985, 9);
    // Analytic identity: Φ(Φ⁻¹(p)) = p across the range.
    for (const p of [1e-12, 1e-6, 0.01, 0.3, 0.5, 0.77, 0.999999]) expect(normalCdf(normalQuantile(p)) / p).toBeCloseTo(1, 10);
  });
});

describe('quantileSorted', () => {
  it('follows Hyndman & Fan definition 7 (linear interpolation at (n − 1)p)', () => {
    // Hand computation: data 1..5, p = 0.1 → position 0.4 → 1 + 0.4·(2 − 1) = 1.4.
    expect(quantileSorted([1, 2, 3, 4, 5], 0.1)).toBeCloseTo(1.4, 12);
    expect(quantileSorted([1, 2, 3, 4, 5], 0.5)).toBe(3);
    expect(quantileSorted([10], 0.9)).toBe(10);
  });
});

describe('forecastWithIntervals', () => {
  it('analytic AR(1) variance equals σ²(1 + φ² + … + φ^{2(h−1)})', () => {
    // Analytic identity (Box & Jenkins 1970, §5.2): ψ_j = φ^j for an AR(1).
    const y = ar1Series(7, 200, 0.7, 1);
    const s = asSeries(y);
    const est = ar1.estimate(s, 1, 200);
    const f = forecastWithIntervals(ar1, est, s, [], 6, [], { levels: [95] });
    expect(f.method).toBe('analytic');
    const phi = est.theta[1];
    let acc = 0;
    for (let j = 0; j < 6; j++) {
      acc += phi ** (2 * j);
      expect(f.sd![j]).toBeCloseTo(Math.sqrt(est.sigma2 * acc), 10);
    }
  });

  it('95 % one-step and 6-step intervals of a simulated AR(1) cover 92–98 % over 300 seeds', () => {
    // Simulated truth: y_t = 1 + 0.7·y_{t−1} + ε_t, ε ~ N(0, 1), 200 points fitted, next 6 kept.
    let in1 = 0;
    let in6 = 0;
    let boot1 = 0;
    let boot6 = 0;
    const seeds = 300;
    for (let seed = 1; seed <= seeds; seed++) {
      const all = ar1Series(1000 + seed, 206, 0.7, 1);
      const s = asSeries(all.slice(0, 200));
      const est = ar1.estimate(s, 1, 200);
      const f = forecastWithIntervals(ar1, est, s, [], 6, [], { levels: [95] });
      const b = f.bands[0];
      if (all[200] >= b.lower[0] && all[200] <= b.upper[0]) in1++;
      if (all[205] >= b.lower[5] && all[205] <= b.upper[5]) in6++;
      if (seed <= 100) {
        // The residual bootstrap on the same problem (fewer seeds: it simulates 1000 paths each).
        const resid = ar1.oneStep(est.theta, s, 1, 200).map((p, i) => all[1 + i] - p);
        const g = forecastWithIntervals(ar1, est, s, [], 6, resid, { levels: [95], method: 'bootstrap', seed, draws: 1000 });
        if (all[200] >= g.bands[0].lower[0] && all[200] <= g.bands[0].upper[0]) boot1++;
        if (all[205] >= g.bands[0].lower[5] && all[205] <= g.bands[0].upper[5]) boot6++;
      }
    }
    expect(in1 / seeds).toBeGreaterThanOrEqual(0.92);
    expect(in1 / seeds).toBeLessThanOrEqual(0.98);
    expect(in6 / seeds).toBeGreaterThanOrEqual(0.92);
    expect(in6 / seeds).toBeLessThanOrEqual(0.98);
    // Looser band for 100 seeds: binomial sd ≈ 2.2 points around 95 %.
    expect(boot1 / 100).toBeGreaterThanOrEqual(0.88);
    expect(boot6 / 100).toBeGreaterThanOrEqual(0.88);
  });

  it('bootstrap bands are reproducible for a seed and nest by level', () => {
    const y = ar1Series(3, 120, 0.5, 0);
    const s = asSeries(y);
    const est = ar1.estimate(s, 1, 120);
    const resid = ar1.oneStep(est.theta, s, 1, 120).map((p, i) => y[1 + i] - p);
    const a = forecastWithIntervals(ar1, est, s, [], 4, resid, { levels: [80, 95], method: 'bootstrap', seed: 9 });
    const b = forecastWithIntervals(ar1, est, s, [], 4, resid, { levels: [80, 95], method: 'bootstrap', seed: 9 });
    expect(Array.from(a.bands[1].upper)).toEqual(Array.from(b.bands[1].upper));
    for (let j = 0; j < 4; j++) {
      expect(a.bands[1].lower[j]).toBeLessThanOrEqual(a.bands[0].lower[j]);
      expect(a.bands[1].upper[j]).toBeGreaterThanOrEqual(a.bands[0].upper[j]);
    }
    const c = forecastWithIntervals(ar1, est, s, [], 4, resid, { levels: [95], method: 'bootstrap', seed: 9, parameterUncertainty: true });
    // Drawing θ as well widens the 4-step band.
    expect(c.bands[0].upper[3] - c.bands[0].lower[3]).toBeGreaterThan(a.bands[1].upper[3] - a.bands[1].lower[3]);
  });
});
