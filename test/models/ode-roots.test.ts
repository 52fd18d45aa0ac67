import { describe, expect, it } from 'vitest';
import { equilibria, polySlope, polyValue, realRoots } from '../../src/models/ode-roots.js';

describe('realRoots(c0, c1, c2, c3)', () => {
  it('linear: 6 − 2x has the root 3', () => {
    expect(realRoots([6, -2])).toEqual([3]);
  });

  it('quadratic from a known factorisation (x − 2)(x + 5) = x² + 3x − 10', () => {
    const r = realRoots([-10, 3, 1]);
    expect(r[0]).toBeCloseTo(-5, 12);
    expect(r[1]).toBeCloseTo(2, 12);
  });

  it('quadratic with widely separated roots keeps the small one accurate (x − 1e8)(x − 1e-8)', () => {
    // expanded: x² − (1e8 + 1e-8)x + 1
    const r = realRoots([1, -(1e8 + 1e-8), 1]);
    expect(r[0] / 1e-8).toBeCloseTo(1, 10);
    expect(r[1] / 1e8).toBeCloseTo(1, 10);
  });

  it('quadratic without real roots: x² + 1', () => {
    expect(realRoots([1, 0, 1])).toEqual([]);
  });

  it('cubic from a known factorisation (x − 1)(x − 2)(x + 3) = x³ − 7x + 6', () => {
    const r = realRoots([6, -7, 0, 1]);
    expect(r).toHaveLength(3);
    [-3, 1, 2].forEach((v, i) => expect(r[i]).toBeCloseTo(v, 10));
  });

  it('cubic with one real root: (x − 4)(x² + 1) = x³ − 4x² + x − 4', () => {
    const r = realRoots([-4, 1, -4, 1]);
    expect(r).toHaveLength(1);
    expect(r[0]).toBeCloseTo(4, 10);
  });

  it('drops zero leading coefficients: 0·x³ + 0·x² + 2x − 4 → 2', () => {
    expect(realRoots([-4, 2, 0, 0])).toEqual([2]);
  });

  it('every root is a zero of the polynomial (invariant, random-looking coefficients)', () => {
    const c = [0.3, -1.7, 0.2, 0.9];
    for (const x of realRoots(c)) expect(Math.abs(polyValue(c, x))).toBeLessThan(1e-12);
  });
});

describe('equilibria(coefficients)', () => {
  it('logistic r·x − (r/K)·x² with r = 0.5, K = 100: 0 unstable, 100 stable (slope −r; Strogatz 1994, §2.3)', () => {
    const eq = equilibria([0, 0.5, -0.005]);
    expect(eq.map((e) => e.value)).toEqual([0, 100]);
    expect(eq[0].stable).toBe(false);
    expect(eq[1].stable).toBe(true);
    expect(eq[1].slope).toBeCloseTo(-0.5, 12);
  });

  it('polySlope is the derivative: d/dx (1 + 2x + 3x² + 4x³) at x = 2 is 2 + 12 + 48 = 62', () => {
    expect(polySlope([1, 2, 3, 4], 2)).toBe(62);
  });
});
