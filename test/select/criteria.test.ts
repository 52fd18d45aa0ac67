import { describe, expect, it } from 'vitest';
import { akaikeWeights, criteria } from '../../src/select/criteria.js';
import { lstsq } from '../../src/linalg/lstsq.js';
import { createRng } from '../../src/linalg/random.js';

describe('criteria(rss, n, k)', () => {
  it('matches hand arithmetic for rss = 2, n = 10, k = 3', () => {
    // By hand: RSS/n = 0.2; 2π·0.2 = 1.2566371; ln 1.2566371 = 0.2284392;
    // log L = −(10/2)(0.2284392 + 1) = −6.142196;
    // AIC = 12.284392 + 2·3 = 18.284392; AICc = 18.284392 + 2·3·4/(10 − 3 − 1) = 22.284392;
    // BIC = 12.284392 + 3·ln 10 (= 6.907755) = 19.192147.
    const c = criteria(2, 10, 3);
    expect(c.logLik).toBeCloseTo(-6.142196, 6);
    expect(c.aic).toBeCloseTo(18.284392, 6);
    expect(c.aicc).toBeCloseTo(22.284392, 6);
    expect(c.bic).toBeCloseTo(19.192147, 6);
  });

  it('adds the log-Jacobian to log L (log transform: −Σ ln y)', () => {
    // y = (e, e²): Σ ln y = 3, so J = −3 and every criterion rises by 6.
    const base = criteria(2, 10, 3);
    const t = criteria(2, 10, 3, { logJacobian: -3 });
    expect(t.logLik).toBeCloseTo(base.logLik - 3, 12);
    expect(t.aic).toBeCloseTo(base.aic + 6, 12);
    expect(t.bic).toBeCloseTo(base.bic + 6, 12);
  });

  it('gives AICc = Infinity when n − k − 1 ≤ 0', () => {
    expect(criteria(1, 5, 4).aicc).toBe(Infinity);
    expect(criteria(1, 5, 5).aicc).toBe(Infinity);
    expect(Number.isFinite(criteria(1, 6, 4).aicc)).toBe(true);
  });

  it('equals the Gaussian log-density of the residuals at σ² = RSS/n', () => {
    // Independent route: Σ_t ln φ(e_t; 0, σ²) with σ² = RSS/n, summed term by term.
    const e = [0.3, -1.2, 0.5, 0.9, -0.4, 0.1];
    const rss = e.reduce((s, v) => s + v * v, 0);
    const s2 = rss / e.length;
    const direct = e.reduce((s, v) => s - 0.5 * Math.log(2 * Math.PI * s2) - (v * v) / (2 * s2), 0);
    expect(criteria(rss, e.length, 2).logLik).toBeCloseTo(direct, 12);
  });

  it('rejects negative rss and non-integer n', () => {
    expect(() => criteria(-1, 10, 2)).toThrow(RangeError);
    expect(() => criteria(1, 2.5, 2)).toThrow(RangeError);
  });

  it('BIC picks the true order of an AR(2) (0.6, −0.3) at n = 200 in ≥ 90 % of 200 seeds', () => {
    // Consistency of BIC (Schwarz 1978): the probability of the true order tends to 1.
    // Orders 0–6 with intercept, all fitted on the same sample t = 7..200 (1-based).
    const n = 200;
    const maxOrder = 6;
    let hits = 0;
    for (let seed = 1; seed <= 200; seed++) {
      const rng = createRng(seed);
      const burn = 100;
      const x = new Float64Array(n + burn);
      for (let t = 2; t < n + burn; t++) x[t] = 0.6 * x[t - 1] - 0.3 * x[t - 2] + rng.normal();
      const series = x.subarray(burn);
      const rows = n - maxOrder;
      const y = series.slice(maxOrder);
      let best = Infinity;
      let bestOrder = -1;
      for (let q = 0; q <= maxOrder; q++) {
        const p = q + 1;
        const data = new Float64Array(rows * p);
        for (let i = 0; i < rows; i++) {
          data[i * p] = 1;
          for (let l = 1; l <= q; l++) data[i * p + l] = series[maxOrder + i - l];
        }
        const names = ['1', ...Array.from({ length: q }, (_, l) => `y[t-${l + 1}]`)];
        const fit = lstsq({ rows, cols: p, data }, y, names);
        const bic = criteria(fit.rss, rows, p + 1).bic;
        if (bic < best) {
          best = bic;
          bestOrder = q;
        }
      }
      if (bestOrder === 2) hits++;
    }
    expect(hits).toBeGreaterThanOrEqual(180);
  });
});

describe('akaikeWeights(values)', () => {
  it('matches the hand example [0, 2, 4]', () => {
    // By hand: exp(0) = 1, exp(−1) = 0.3678794, exp(−2) = 0.1353353, sum 1.5032147;
    // weights 0.6652410, 0.2447285, 0.0900306.
    const w = akaikeWeights([0, 2, 4]);
    expect(w[0]).toBeCloseTo(0.665241, 6);
    expect(w[1]).toBeCloseTo(0.2447285, 6);
    expect(w[2]).toBeCloseTo(0.0900306, 6);
  });

  it('depends only on differences and sums to 1', () => {
    const a = akaikeWeights([103.2, 101.7, 110, 101.7]);
    const b = akaikeWeights([3.2, 1.7, 10, 1.7]);
    expect(a.reduce((s, v) => s + v, 0)).toBeCloseTo(1, 14);
    a.forEach((v, i) => expect(v).toBeCloseTo(b[i], 14));
    expect(a[1]).toBe(a[3]);
  });

  it('gives Infinity and NaN weight 0', () => {
    const w = akaikeWeights([1, Infinity, NaN, 1]);
    expect(w).toEqual([0.5, 0, 0, 0.5]);
    expect(akaikeWeights([Infinity, NaN])).toEqual([0, 0]);
  });

  it('shares the weight among candidates at −Infinity (perfect fits)', () => {
    expect(akaikeWeights([-Infinity, 3, -Infinity])).toEqual([0.5, 0, 0.5]);
  });
});
