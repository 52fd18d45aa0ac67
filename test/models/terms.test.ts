import { describe, expect, it } from 'vitest';
import { deterministicFiller, deterministicNames, maxHarmonics } from '../../src/models/terms.js';
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
