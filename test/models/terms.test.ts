import { describe, expect, it } from 'vitest';
import { deterministicCombination, deterministicFiller, deterministicNames, maxHarmonics } from '../../src/models/terms.js';
import { forward, inverse, isStrictlyPositive, logJacobian } from '../../src/models/transforms.js';

describe('deterministic terms', () => {
  it('writes intercept, trend and Fourier pairs sin/cos(2πkt/s) in name order', () => {
    const d = { intercept: true, trend: true, harmonics: 2, season: 12 };
    expect(deterministicNames(d)).toEqual(['const', 'trend', 'sin(2π·1·t/12)', 'cos(2π·1·t/12)', 'sin(2π·2·t/12)', 'cos(2π·2·t/12)']);
    const out = new Float64Array(6);
    expect(deterministicFiller(d)(27, out, 0)).toBe(6);
    // t = 27: 27 mod 12 = 3, sin(π/2) = 1, cos(π/2) = 0, sin(π) = 0, cos(π) = −1 (exact angles).
    const hand = [1, 27, 1, 0, 0, -1];
    hand.forEach((v, j) => expect(out[j]).toBeCloseTo(v, 12));
    expect(maxHarmonics(12)).toBe(6);
    expect(maxHarmonics(7)).toBe(3);
  });
});

describe('deterministicCombination', () => {
  // Identity checked: the combination at t is the filled row at t times θ, summed in column
  // order, to the last bit, for every phase and for negative times; and 27 mod 12 = 3 by hand.
  it('equals θ times the filled row exactly, with and without a trend, offset into θ', () => {
    const theta = Float64Array.from([0.7, -0.31, 1.9, 0.023, -4.4, 0.5, 0.125, -2.75]);
    const cases = [
      { intercept: true, trend: false, harmonics: 3, season: 12 },
      { intercept: false, trend: false, harmonics: 2, season: 7 },
      { intercept: true, trend: true, harmonics: 1, season: 4 },
      { intercept: true, trend: false, harmonics: 0, season: null },
      { intercept: false, trend: false, harmonics: 2, season: 6.5 },
    ];
    for (const d of cases) {
      const cols = deterministicNames(d).length;
      const fill = deterministicFiller(d);
      const row = new Float64Array(cols);
      for (const offset of [0, 2]) {
        const combined = deterministicCombination(d, theta, offset);
        for (let t = -30; t < 60; t++) {
          fill(t, row, 0);
          let sum = 0;
          for (let j = 0; j < cols; j++) sum += theta[offset + j] * row[j];
          expect(combined(t)).toBe(sum);
        }
      }
    }
    const seasonal = deterministicCombination({ intercept: true, trend: false, harmonics: 2, season: 12 }, Float64Array.from([1, 2, 3, 4, 5]));
    // t = 27: row [1, sin(π/2), cos(π/2), sin(π), cos(π)] = [1, 1, 0, 0, −1]: 1 + 2 − 5 = −2.
    expect(seasonal(27)).toBeCloseTo(-2, 12);
  });

  it('is zero without any deterministic column', () => {
    expect(deterministicCombination({ intercept: false, trend: false, harmonics: 0, season: null }, new Float64Array(0))(5)).toBe(0);
  });
});

describe('transforms', () => {
  it('maps ln and back, and gives the log-Jacobian −Σ ln y', () => {
    const y = Float64Array.of(1, Math.E, Math.E ** 2);
    expect(Array.from(forward('log', y))).toEqual([0, 1, 2].map((v) => expect.closeTo(v, 14)));
    expect(inverse('log', 2)).toBeCloseTo(Math.E ** 2, 12);
    expect(logJacobian('log', y, 1, 3)).toBeCloseTo(-3, 14);
    expect(logJacobian('none', y, 0, 3)).toBe(0);
    expect(isStrictlyPositive(Float64Array.of(1, 0))).toBe(false);
    expect(isStrictlyPositive(Float64Array.of(1, 2))).toBe(true);
  });
});
