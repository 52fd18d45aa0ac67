import { describe, expect, it } from 'vitest';
import { arPrewhitener, firstSignificantLag, prewhitenedCrossCorrelation } from '../../src/select/prewhiten.js';
import { createRng } from '../../src/linalg/random.js';

/** x_t = φ x_{t−1} + a_t, a white N(0, 1) from the seeded source. */
function ar1(n: number, phi: number, seed: number): Float64Array {
  const rng = createRng(seed);
  const x = new Float64Array(n);
  for (let t = 0; t < n; t++) x[t] = (t > 0 ? phi * x[t - 1] : 0) + rng.normal();
  return x;
}

/** y_t = b·x_{t−d} (+ noise of sd `sd`), y_t = 0 before the delay. */
function delayed(x: Float64Array, b: number, d: number, sd: number, seed: number): Float64Array {
  const rng = createRng(seed);
  return Float64Array.from(x, (_, t) => (t >= d ? b * x[t - d] : 0) + sd * rng.normal());
}

describe('prewhitenedCrossCorrelation(x, y, maxLag)', () => {
  it('noise-free y_t = 2·x_{t−3} of a white x: r(3) ≈ 1 and v_3 ≈ 2 (β = φ(B)y = 2·α_{t−3} for any prewhitener), other lags inside ±2/√n', () => {
    const x = ar1(400, 0, 1);
    const cc = prewhitenedCrossCorrelation(x, delayed(x, 2, 3, 0, 2), 6);
    expect(cc.r[3]).toBeGreaterThan(0.97);
    expect(Math.abs(cc.weights[3] / 2 - 1)).toBeLessThan(0.03);
    for (let k = 0; k <= 6; k++) if (k !== 3) expect(Math.abs(cc.r[k])).toBeLessThan(cc.bound);
    expect(cc.bound).toBeCloseTo(2 / Math.sqrt(cc.n), 12);
    expect(firstSignificantLag(cc, 5)).toBe(3);
  });

  it('an AR(1) input with φ = 0.8 is whitened (φ̂ within 0.05) and only the true delay 2 stands out, where the raw cross-correlation is significant at every lag', () => {
    const x = ar1(300, 0.8, 3);
    const y = delayed(x, -1.5, 2, 0.5, 4);
    const { phi } = arPrewhitener(x, 0, 6);
    expect(phi.length).toBeGreaterThanOrEqual(1);
    expect(Math.abs(phi[0] - 0.8)).toBeLessThan(0.05);
    const cc = prewhitenedCrossCorrelation(x, y, 6);
    expect(firstSignificantLag(cc, 6)).toBe(2);
    expect(cc.r[2]).toBeLessThan(-0.8);
    for (const k of [0, 1, 4, 5, 6]) expect(Math.abs(cc.r[k])).toBeLessThan(cc.bound);
    // Without prewhitening (order 0) the autocorrelation of x spreads the effect over lags 0…6.
    const raw = prewhitenedCrossCorrelation(x, y, 6, { maxOrder: 0 });
    expect(raw.order).toBe(0);
    for (let k = 0; k <= 6; k++) expect(Math.abs(raw.r[k])).toBeGreaterThan(raw.bound);
  });

  it('skips the NaN head of a differenced array and gives a constant input no significant lag', () => {
    const x = ar1(120, 0.5, 5);
    const y = delayed(x, 1, 1, 0.2, 6);
    const dx = Float64Array.from(x, (v, t) => (t > 0 ? v - x[t - 1] : NaN));
    const dy = Float64Array.from(y, (v, t) => (t > 0 ? v - y[t - 1] : NaN));
    const cc = prewhitenedCrossCorrelation(dx, dy, 3);
    expect(cc.r.every(Number.isFinite)).toBe(true);
    expect(firstSignificantLag(cc, 3)).toBe(1);
    const flat = prewhitenedCrossCorrelation(new Float64Array(120).fill(4), y, 3);
    expect(firstSignificantLag(flat, 3)).toBeNull();
  });
});
