/**
 * standardisedResiduals against analytic identities: dividing by a given scale, the root mean
 * square as the default scale (so Σu² = n), and the count outside ±2. The share of standard
 * normal draws outside ±2 is checked against 2·(1 − Φ(2)) = 0.0455 (Abramowitz & Stegun 1964,
 * Table 26.1).
 */
import { describe, expect, it } from 'vitest';
import { createRng } from '../../src/linalg/random.js';
import { OUTSIDE_TWO_SIGMA, standardisedResiduals } from '../../src/evaluate/standardised-residuals.js';

describe('standardisedResiduals', () => {
  it('divides by the given scale and counts the values outside ±2', () => {
    const r = standardisedResiduals([2, -6, Number.NaN, 4.2, 0], 2);
    expect(Array.from(r.values.filter(Number.isFinite))).toEqual([1, -3, 2.1, 0]);
    expect(Number.isNaN(r.values[2])).toBe(true);
    expect(r).toMatchObject({ scale: 2, n: 4, outside: 2, largest: 3 });
  });
  it('defaults to the root mean square about zero: the squares of the result add up to n', () => {
    const e = [3, -1, 4, -1, 5, -9, 2, 6];
    const r = standardisedResiduals(e);
    expect(r.scale).toBeCloseTo(Math.sqrt(e.reduce((s, x) => s + x * x, 0) / e.length), 12);
    expect(r.values.reduce((s, u) => s + u * u, 0)).toBeCloseTo(e.length, 10);
  });
  it('falls back to the root mean square when the scale is zero, negative or not finite', () => {
    for (const bad of [0, -1, Number.NaN, Number.POSITIVE_INFINITY]) expect(standardisedResiduals([1, -1], bad).scale).toBe(1);
  });
  it('has nothing to standardise when the residuals are all zero or missing', () => {
    expect(standardisedResiduals([0, 0, 0])).toMatchObject({ n: 0, outside: 0, largest: 0 });
    expect(standardisedResiduals([Number.NaN])).toMatchObject({ n: 0 });
    expect(standardisedResiduals([])).toMatchObject({ n: 0 });
  });
  it('puts about 4.55 % of standard normal draws outside ±2', () => {
    const rng = createRng(7);
    const n = 200_000;
    const r = standardisedResiduals(Float64Array.from({ length: n }, () => rng.normal()), 1);
    // binomial standard error √(p(1 − p)/n) ≈ 0.00047: four of them
    expect(Math.abs(r.outside / n - OUTSIDE_TWO_SIGMA)).toBeLessThan(0.002);
  });
});
