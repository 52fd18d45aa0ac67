import { describe, expect, it } from 'vitest';
import { polynomialRoot } from 'mathjs';
import { characteristicRoots, modulus, polynomialRoots, spectralRadius } from '../../src/models/roots.js';

describe('polynomialRoots', () => {
  it('finds the roots of (x − 0.6)(x + 0.1) = x² − 0.5x − 0.06, as mathjs polynomialRoot does', () => {
    const r = polynomialRoots([1, -0.5, -0.06]);
    const ref = (polynomialRoot(-0.06, -0.5, 1) as number[]).slice().sort((a, b) => Math.abs(b) - Math.abs(a));
    expect(r.map((z) => z.re)).toEqual([expect.closeTo(ref[0], 12), expect.closeTo(ref[1], 12)]);
    r.forEach((z) => expect(z.im).toBe(0));
  });
  it('finds complex roots of a cubic (x − 2)(x² + 1) and orders them by modulus', () => {
    const r = polynomialRoots([1, -2, 1, -2]);
    expect(r[0].re).toBeCloseTo(2, 12);
    expect(modulus(r[1])).toBeCloseTo(1, 12);
    expect(Math.abs(r[1].im)).toBeCloseTo(1, 12);
    expect(r[1].re).toBeCloseTo(0, 12);
  });
});

describe('characteristicRoots / spectralRadius', () => {
  it('gives λ = a for a first-order recursion and nothing without AR terms', () => {
    expect(characteristicRoots([0.7])[0].re).toBeCloseTo(0.7, 14);
    expect(characteristicRoots([])).toEqual([]);
    expect(spectralRadius([0, 0])).toBe(0);
  });
  it('gives modulus √0.5 for a = (1, −0.5): λ² − λ + 0.5 = 0, λ = 0.5 ± 0.5i (quadratic formula)', () => {
    expect(spectralRadius([1, -0.5])).toBeCloseTo(Math.SQRT1_2, 12);
  });
  it('gives |λ| = 0.9^{1/12} for a pure seasonal lag y_t = 0.9 y_{t−12}', () => {
    const a = new Float64Array(12);
    a[11] = 0.9;
    expect(spectralRadius(a)).toBeCloseTo(0.9 ** (1 / 12), 10);
  });
});

describe('isStableRecursion', () => {
  it('agrees with the companion-matrix spectral radius on 2000 seeded random recursions of order 1-13', async () => {
    const { createRng } = await import('../../src/linalg/random.js');
    const { isStableRecursion } = await import('../../src/models/roots.js');
    const rng = createRng(2024);
    let stable = 0;
    let checked = 0;
    for (let trial = 0; trial < 2000; trial++) {
      const p = 1 + rng.int(13);
      const a = Array.from({ length: p }, () => (rng.uniform() * 2 - 1) * (1.6 / p));
      const rho = spectralRadius(a);
      if (Math.abs(rho - 1) < 1e-9) continue; // too close to the boundary to call
      checked++;
      expect(isStableRecursion(a)).toBe(rho < 1);
      if (rho < 1) stable++;
    }
    expect(stable).toBeGreaterThan(100);
    expect(checked - stable).toBeGreaterThan(100);
  });
  it('calls the stationarity triangle edges of a second-order recursion (|a2| < 1, a1 + a2 < 1, a2 − a1 < 1)', async () => {
    const { isStableRecursion } = await import('../../src/models/roots.js');
    expect(isStableRecursion([0.5, 0.49])).toBe(true);
    expect(isStableRecursion([0.5, 0.51])).toBe(false);
    expect(isStableRecursion([-0.5, 0.49])).toBe(true);
    expect(isStableRecursion([-0.5, 0.51])).toBe(false);
    expect(isStableRecursion([0, -1])).toBe(false);
    expect(isStableRecursion([1])).toBe(false);
    expect(isStableRecursion([])).toBe(true);
  });
});
