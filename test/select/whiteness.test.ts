import { describe, expect, it } from 'vitest';
import { erf, lgamma } from 'mathjs';
import { chiSquareCdf, defaultLjungBoxLags, ljungBox, logGamma, regularizedGammaP, residualAutocorrelations } from '../../src/select/whiteness.js';
import { noise } from '../models/arx-fixtures.js';

describe('logGamma', () => {
  it('matches CPython 3 math.lgamma values and exact factorials', () => {
    // Reference values printed by CPython's math.lgamma (an independent implementation).
    const ref: [number, number][] = [
      [0.1, 2.2527126517342055], [0.5, 0.5723649429247004], [1, 0], [2.5, 0.2846828704729196],
      [4.5, 2.453736570842443], [10, 12.801827480081467], [33.3, 82.60372358165495], [150, 600.0094705553274],
    ];
    for (const [x, v] of ref) expect(Math.abs(logGamma(x) - v)).toBeLessThan(1e-13 * Math.max(1, Math.abs(v)));
    // mathjs lgamma as a second, looser source.
    expect(logGamma(7.25)).toBeCloseTo(lgamma(7.25), 9);
    expect(logGamma(6)).toBeCloseTo(Math.log(120), 12); // Γ(6) = 5! = 120
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 12); // Γ(½) = √π
  });
});

describe('regularizedGammaP', () => {
  it('equals 1 − e^{−x} for a = 1 (exponential distribution, closed form)', () => {
    for (const x of [0.01, 0.5, 1, 2, 5, 20]) expect(regularizedGammaP(1, x)).toBeCloseTo(1 - Math.exp(-x), 13);
  });
  it('equals erf(√x) for a = ½ (A&S 6.5.17; erf from mathjs)', () => {
    for (const x of [0.05, 0.3, 1, 1.5, 3, 8]) expect(regularizedGammaP(0.5, x)).toBeCloseTo(erf(Math.sqrt(x)), 12);
  });
});

describe('chiSquareCdf', () => {
  it('matches the table quantiles (standard χ² table, A&S Table 26.8; values from memory)', () => {
    expect(chiSquareCdf(18.307, 10)).toBeCloseTo(0.95, 4);
    expect(chiSquareCdf(3.841, 1)).toBeCloseTo(0.95, 4);
    expect(chiSquareCdf(15.086, 5)).toBeCloseTo(0.99, 4);
    expect(chiSquareCdf(43.773, 30)).toBeCloseTo(0.95, 4);
    expect(chiSquareCdf(10.851, 20)).toBeCloseTo(0.05, 4);
  });
  it('equals the Poisson-sum closed form for even dof: 1 − e^{−x/2} Σ_{j<ν/2} (x/2)^j / j!', () => {
    for (const dof of [2, 4, 8, 16]) {
      for (const x of [0.5, 3, 9, 25, 60]) {
        let sum = 0;
        let term = 1;
        for (let j = 0; j < dof / 2; j++) {
          if (j > 0) term *= x / 2 / j;
          sum += term;
        }
        expect(chiSquareCdf(x, dof)).toBeCloseTo(1 - Math.exp(-x / 2) * sum, 12);
      }
    }
  });
  it('is 0 at x ≤ 0 and increases to 1', () => {
    expect(chiSquareCdf(0, 3)).toBe(0);
    expect(chiSquareCdf(-1, 3)).toBe(0);
    expect(chiSquareCdf(500, 3)).toBeCloseTo(1, 14);
  });
});

describe('ljungBox', () => {
  it('computes Q on a hand example: e = (1, −1, 1, −1), m = 2 gives r = (−3/4, 1/2), Q = 7.5', () => {
    // r1 = (−1 −1 −1)/4, r2 = (1 + 1)/4; Q = 4·6·((9/16)/3 + (1/4)/2) = 24·0.3125 = 7.5 (by hand).
    const r = residualAutocorrelations([1, -1, 1, -1], 2);
    expect(r[0]).toBeCloseTo(-0.75, 14);
    expect(r[1]).toBeCloseTo(0.5, 14);
    const lb = ljungBox([1, -1, 1, -1], { lags: 2 });
    expect(lb.q).toBeCloseTo(7.5, 12);
    expect(lb.dof).toBe(2);
    expect(lb.pValue).toBeCloseTo(Math.exp(-7.5 / 2), 12); // χ²₂ tail = e^{−Q/2}
  });
  it('subtracts the fitted dynamic coefficients from the degrees of freedom', () => {
    const lb = ljungBox(noise(100, 1, 3), { lags: 10, fittedDynamic: 2 });
    expect(lb.dof).toBe(8);
  });
  it('passes seeded white noise and fails a strongly autocorrelated series', () => {
    const e = noise(300, 1, 5);
    expect(ljungBox(e, { lags: 10 }).white).toBe(true);
    const ar = new Float64Array(300);
    for (let t = 1; t < 300; t++) ar[t] = 0.8 * ar[t - 1] + e[t];
    const lb = ljungBox(ar, { lags: 10 });
    expect(lb.white).toBe(false);
    expect(lb.pValue).toBeLessThan(1e-6);
  });
  it('uses min(10 or 2s, ⌊n/5⌋) lags by default', () => {
    expect(defaultLjungBoxLags(200, null)).toBe(10);
    expect(defaultLjungBoxLags(200, 12)).toBe(24);
    expect(defaultLjungBoxLags(40, 12)).toBe(8);
    expect(defaultLjungBoxLags(3, null)).toBe(1);
  });
});
