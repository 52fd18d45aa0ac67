import { describe, expect, it } from 'vitest';
import type { DesignMatrix } from '../../src/linalg/matrix.js';
import { createRng } from '../../src/linalg/random.js';
import { defaultThresholds, sparseRegression } from '../../src/linalg/sparse.js';
import { UsageError } from '../../src/data/errors.js';

// Lorenz system with σ = 10, ρ = 28, β = 8/3 (the example of Brunton, Proctor & Kutz 2016):
//   ẋ = σ(y − x),  ẏ = x(ρ − z) − y,  ż = xy − βz.
const SIGMA = 10;
const RHO = 28;
const BETA = 8 / 3;
function lorenz(s: number[]): number[] {
  const [x, y, z] = s;
  return [SIGMA * (y - x), x * (RHO - z) - y, x * y - BETA * z];
}

/** Classical fourth-order Runge–Kutta samples, step dt, from (−8, 8, 27). */
function simulate(steps: number, dt: number): number[][] {
  let s = [-8, 8, 27];
  const out: number[][] = [s];
  for (let k = 0; k < steps; k++) {
    const k1 = lorenz(s);
    const k2 = lorenz(s.map((v, i) => v + 0.5 * dt * k1[i]));
    const k3 = lorenz(s.map((v, i) => v + 0.5 * dt * k2[i]));
    const k4 = lorenz(s.map((v, i) => v + dt * k3[i]));
    s = s.map((v, i) => v + (dt / 6) * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]));
    out.push(s);
  }
  return out;
}

/** Monomials of degree ≤ `degree` in x, y, z, graded order: 1, x, y, z, x², xy, … */
function library(states: number[][], degree: number): { phi: DesignMatrix; names: string[] } {
  const exps: number[][] = [];
  for (let d = 0; d <= degree; d++) for (let a = d; a >= 0; a--) for (let b = d - a; b >= 0; b--) exps.push([a, b, d - a - b]);
  const names = exps.map((e) => {
    const parts = ['x', 'y', 'z'].flatMap((v, i) => (e[i] === 0 ? [] : [e[i] === 1 ? v : `${v}^${e[i]}`]));
    return parts.length === 0 ? '1' : parts.join('*');
  });
  const n = states.length;
  const p = exps.length;
  const data = new Float64Array(n * p);
  states.forEach((s, i) => exps.forEach((e, j) => (data[i * p + j] = s[0] ** e[0] * s[1] ** e[1] * s[2] ** e[2])));
  return { phi: { rows: n, cols: p, data }, names };
}

describe('sparseRegression on the Lorenz system', () => {
  const states = simulate(5000, 0.005);
  const derivs = states.map(lorenz);
  for (const degree of [2, 3]) {
    it(`recovers σ, ρ, β within 1 % and zeros every absent term exactly (degree ≤ ${degree})`, () => {
      // Truth: the equations above, expanded: ẋ = −10x + 10y; ẏ = 28x − y − xz; ż = xy − (8/3)z.
      const truth: Record<string, number>[] = [
        { x: -SIGMA, y: SIGMA },
        { x: RHO, y: -1, 'x*z': -1 },
        { 'x*y': 1, z: -BETA },
      ];
      const { phi, names } = library(states, degree);
      for (let c = 0; c < 3; c++) {
        const target = Float64Array.from(derivs, (d) => d[c]);
        const r = sparseRegression(phi, target, names);
        names.forEach((name, j) => {
          const want = truth[c][name];
          if (want === undefined) expect(r.theta[j], `${name} in equation ${c}`).toBe(0);
          else expect(Math.abs(r.theta[j] - want) / Math.abs(want), `${name} in equation ${c}`).toBeLessThan(0.01);
        });
        expect([...r.activeNames].sort()).toEqual(Object.keys(truth[c]).sort());
        expect(r.fit.names).toEqual(r.activeNames);
      }
    });
  }

  it('keeps a named term however small, and gives the same answer when a column is rescaled', () => {
    const { phi, names } = library(states, 2);
    const target = Float64Array.from(derivs, (d) => d[0]);
    const r = sparseRegression(phi, target, names, { keep: ['1'] });
    expect(r.active[names.indexOf('1')]).toBe(true);
    expect(Math.abs(r.theta[names.indexOf('x')] + SIGMA)).toBeLessThan(1e-6);
    // Relative thresholds: multiplying column "y" by 1000 divides its coefficient by 1000
    // and leaves the selection unchanged.
    const scaled = { ...phi, data: phi.data.slice() };
    const jy = names.indexOf('y');
    for (let i = 0; i < phi.rows; i++) scaled.data[i * phi.cols + jy] *= 1000;
    const s = sparseRegression(scaled, target, names);
    expect(s.activeNames).toEqual(['x', 'y']);
    expect(s.theta[jy] * 1000).toBeCloseTo(SIGMA, 6);
  });
});

describe('sparseRegression with noise', () => {
  it('drops pure-noise regressors and keeps the true ones (y = 2 + 3·x1 − 0.5·x3 + e, 8 candidates)', () => {
    const rng = createRng(11);
    const n = 300;
    const p = 8;
    const data = new Float64Array(n * p);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      data[i * p] = 1;
      for (let j = 1; j < p; j++) data[i * p + j] = rng.normal();
      y[i] = 2 + 3 * data[i * p + 1] - 0.5 * data[i * p + 3] + 0.1 * rng.normal();
    }
    const names = ['1', 'x1', 'x2', 'x3', 'x4', 'x5', 'x6', 'x7'];
    const r = sparseRegression({ rows: n, cols: p, data }, y, names, { criterion: 'bic' });
    expect(r.activeNames).toEqual(['1', 'x1', 'x3']);
    expect(r.path.length).toBe(defaultThresholds().length);
    expect(r.path.map((c) => c.threshold)).toEqual(defaultThresholds());
  });

  it('rejects an unknown term to keep and a negative threshold', () => {
    const phi = { rows: 3, cols: 1, data: Float64Array.of(1, 2, 3) };
    expect(() => sparseRegression(phi, Float64Array.of(1, 2, 3), ['a'], { keep: ['b'] })).toThrow(UsageError);
    expect(() => sparseRegression(phi, Float64Array.of(1, 2, 3), ['a'], { thresholds: [-1] })).toThrow(UsageError);
  });
});
