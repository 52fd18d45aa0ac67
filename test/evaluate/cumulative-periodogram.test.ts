/**
 * cumulativePeriodogram and kolmogorovTail against analytic identities and published values:
 * - Parseval's identity: for odd n and mean-removed e, Σ_{j=1}^{q} I(f_j) = Σ e_t² (the ordinates
 *   at f_j and 1 − f_j are equal and I(0) = 0 after centring);
 * - a sinusoid at a Fourier frequency puts all its power in one ordinate, so C jumps from 0 to 1;
 * - Kolmogorov's tail at the tabulated quantiles: Q(1.36) = 0.049, Q(1.22) = 0.102,
 *   Q(1.63) = 0.0098 (Smirnov 1948, the table reproduced in Massey, "The Kolmogorov-Smirnov test
 *   for goodness of fit", JASA 46 (1951), Table 1: 1.36/√n at 5 %, 1.22/√n at 10 %, 1.63/√n at 1 %).
 */
import { describe, expect, it } from 'vitest';
import { cumulativePeriodogram, kolmogorovTail } from '../../src/evaluate/cumulative-periodogram.js';
import { createRng } from '../../src/linalg/random.js';

describe('cumulativePeriodogram', () => {
  it('satisfies Parseval: the ordinates sum to the sum of squares (odd n)', () => {
    const e = Array.from({ length: 41 }, (_, t) => Math.sin(t * 1.7) + 0.3 * Math.cos(t * 0.4) + (t % 5) / 7);
    const mean = e.reduce((s, x) => s + x, 0) / e.length;
    const ss = e.reduce((s, x) => s + (x - mean) ** 2, 0);
    const cp = cumulativePeriodogram(e);
    expect(cp.ordinate.length).toBe(20);
    expect(cp.ordinate.reduce((s, x) => s + x, 0)).toBeCloseTo(ss, 10);
  });

  it('puts a Fourier-frequency sinusoid in one ordinate: C steps from 0 to 1 there', () => {
    const n = 48;
    const e = Array.from({ length: n }, (_, t) => Math.cos((2 * Math.PI * 6 * t) / n));
    const cp = cumulativePeriodogram(e);
    const q = cp.cumulative.length; // ⌊47/2⌋ = 23
    expect(q).toBe(23);
    for (let j = 1; j < 6; j++) expect(cp.cumulative[j - 1]).toBeCloseTo(0, 10);
    for (let j = 6; j <= q; j++) expect(cp.cumulative[j - 1]).toBeCloseTo(1, 10);
    expect(cp.statistic).toBeCloseTo(1 - 6 / q, 10);
    expect(cp.pValue).toBeLessThan(1e-6);
  });

  it('white noise stays inside the 95 % band in about 95 % of samples', () => {
    const rnd = createRng(7);
    let inside = 0;
    const reps = 400;
    for (let r = 0; r < reps; r++) {
      const e = Array.from({ length: 121 }, () => rnd.normal());
      const cp = cumulativePeriodogram(e);
      if (cp.statistic <= cp.band95) inside++;
    }
    expect(inside / reps).toBeGreaterThan(0.91);
    expect(inside / reps).toBeLessThan(0.99);
  });

  it('drops missing residuals and reports NaN for constant ones', () => {
    expect(cumulativePeriodogram([1, Number.NaN, 2, 3, 1, 2]).n).toBe(5);
    const flat = cumulativePeriodogram([2, 2, 2, 2, 2, 2, 2]);
    expect(Number.isNaN(flat.statistic)).toBe(true);
  });
});

describe('kolmogorovTail', () => {
  it('matches the tabulated Kolmogorov quantiles', () => {
    expect(kolmogorovTail(1.36)).toBeCloseTo(0.0495, 3);
    expect(kolmogorovTail(1.22)).toBeCloseTo(0.1019, 3);
    expect(kolmogorovTail(1.63)).toBeCloseTo(0.0098, 3);
    expect(kolmogorovTail(0)).toBe(1);
  });
});
