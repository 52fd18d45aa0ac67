import { describe, expect, it } from 'vitest';
import { rk4, rk4Polynomial } from '../../src/models/rk4.js';

describe('rk4(f, τ0, x0, span, substeps)', () => {
  it('integrates dx/dτ = r·x to e^{rτ} (analytic solution of the linear ODE)', () => {
    for (const r of [0.5, -0.8, 0.05]) {
      const x = rk4((_t, v) => r * v, 0, 1, 3, 300);
      expect(Math.abs(x - Math.exp(3 * r)) / Math.exp(3 * r)).toBeLessThan(1e-10);
    }
  });

  it('has global error of order 4: halving the step divides the error by about 16 (Kutta 1901)', () => {
    const exact = Math.exp(2);
    const e1 = Math.abs(rk4((_t, v) => v, 0, 1, 2, 10) - exact);
    const e2 = Math.abs(rk4((_t, v) => v, 0, 1, 2, 20) - exact);
    expect(e1 / e2).toBeGreaterThan(14);
    expect(e1 / e2).toBeLessThan(18);
  });

  it('follows time-dependent right-hand sides: dx/dτ = cos τ gives sin τ (analytic)', () => {
    const x = rk4((t) => Math.cos(t), 0, 0, Math.PI / 2, 64);
    expect(x).toBeCloseTo(1, 8);
  });

  it('one step of size h equals the textbook RK4 formula written out by hand for dx/dτ = τ + x', () => {
    // k1 = 0 + 1 = 1; k2 = 0.05 + 1.05 = 1.1; k3 = 0.05 + 1.055 = 1.105; k4 = 0.1 + 1.1105 = 1.2105
    // x1 = 1 + 0.1·(1 + 2.2 + 2.21 + 1.2105)/6 = 1.11034166…
    expect(rk4((t, v) => t + v, 0, 1, 0.1, 1)).toBeCloseTo(1 + (0.1 * (1 + 2.2 + 2.21 + 1.2105)) / 6, 14);
  });

  it('returns a non-finite state as soon as the trajectory blows up (dx/dτ = x², x0 = 1 explodes at τ = 1)', () => {
    const x = rk4((_t, v) => v * v * v * v, 0, 10, 5, 5);
    expect(Number.isFinite(x)).toBe(false);
  });

  it('refuses a non-integer number of substeps', () => {
    expect(() => rk4((_t, v) => v, 0, 1, 1, 0)).toThrow(RangeError);
    expect(() => rk4((_t, v) => v, 0, 1, 1, 1.5)).toThrow(RangeError);
  });
});

describe('rk4Polynomial(c0, c1, c2, c3, forcing, x0, span, substeps)', () => {
  it('integrates dx/dτ = 0.1·x with zero forcing to e^{0.1} within 1e-11 (the doc example; local error (λh)⁵/120 per step)', () => {
    expect(Math.abs(rk4Polynomial(0, 0.1, 0, 0, new Float64Array(21), 1, 1, 10) - Math.exp(0.1))).toBeLessThan(1e-11);
  });

  it('takes the same steps as rk4 with the same right-hand side written as a function', () => {
    // f(τ, x) = 0.3 − 0.2x + 0.05x² − 0.01x³ + sin(τ), the forcing sampled at the half-step nodes.
    const [c0, c1, c2, c3] = [0.3, -0.2, 0.05, -0.01];
    for (const [tau0, x0, span, m] of [[0, 1, 1, 8], [2.5, -0.7, 3, 5], [10, 2, 0.5, 1]]) {
      const h = span / m;
      const forcing = Float64Array.from({ length: 2 * m + 1 }, (_, j) => Math.sin(tau0 + (j * h) / 2));
      const viaFunction = rk4((t, x) => c0 + x * (c1 + x * (c2 + x * c3)) + Math.sin(t), tau0, x0, span, m);
      expect(Math.abs(rk4Polynomial(c0, c1, c2, c3, forcing, x0, span, m) - viaFunction)).toBeLessThan(1e-13);
    }
  });

  it('returns a non-finite state once the cubic blows up, and refuses too few forcing nodes', () => {
    expect(Number.isFinite(rk4Polynomial(0, 0, 0, 1, new Float64Array(11), 10, 5, 5))).toBe(false);
    expect(() => rk4Polynomial(0, 1, 0, 0, new Float64Array(4), 1, 1, 2)).toThrow(RangeError);
  });
});
