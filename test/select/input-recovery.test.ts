/**
 * Known truth: simulated ARX systems whose inputs act at distinct delays, recovered by the
 * structure search.
 *
 * Truth (each a difference equation of the ARX form, Ljung 1999, "System Identification",
 * 2nd ed., eq. 4.7), simulated with the project's seeded random source, n = 300 monthly points
 * after 60 burn-in steps, noise e_t ~ N(0, 0.3²), each input an AR(1) process
 * u_t = 0.6·u_{t−1} + 0.8·a_t (a white N(0, 1)), so the inputs are autocorrelated and their
 * delays cannot be read off raw cross-correlations:
 *   two inputs:   y_t = 2 + 0.5·y_{t−1} + 1.5·u1_t + 1.2·u2_{t−2} + 0.8·u2_{t−3} + e_t
 *   three inputs: y_t = 2 + 0.5·y_{t−1} + 1.5·u1_t − 1.2·u2_{t−1} + 1.0·u3_{t−2} + 0.8·u3_{t−3} + e_t
 *   wide delays:  y_t = 2 + 0.5·y_{t−1} + 1.2·u1_{t−1} − 1.0·u2_{t−4} + e_t   (max delay 5)
 * Recovered: the winner uses every input at its true delay and every coefficient of the true
 * equation (constant, AR, input) is within 10 % of its true value.
 *
 * Criterion. The bar (at least 90 % of seeds) is asserted under BIC, the consistent
 * criterion: it picks the true order with probability tending to one (Schwarz 1978), while AIC
 * and AICc keep a superfluous term with positive probability however long the series (Shibata,
 * "Selection of the order of an autoregressive model by Akaike's information criterion",
 * Biometrika 63(1), 1976 — from memory): at n = 300 an extra lag just before the true delay is
 * kept in about one seed of six per input, which moves the delay. Under the default AICc the
 * bar is 80 %; the misses there are exactly such extra lags, the true structure having been
 * scored too (it is checked that the search did not miss a better candidate: the true
 * structure is never better than the winner without having been scored).
 */
import { describe, expect, it } from 'vitest';
import type { Series } from '../../src/data/series.js';
import { createRng } from '../../src/linalg/random.js';
import { ArxStructure, type ArxSpec } from '../../src/models/arx.js';
import { criteria, type Criterion } from '../../src/select/criteria.js';
import { search, type SearchOptions } from '../../src/select/search.js';

interface TrueInput {
  name: string;
  delay: number;
  b: number[];
}

interface System {
  c: number;
  a: number[];
  inputs: TrueInput[];
}

const SEEDS = 50;
const N = 300;
const SIGMA = 0.3;

function simulate(system: System, seed: number): Series {
  const rng = createRng(seed);
  const burn = 60;
  const total = N + burn;
  const u = system.inputs.map(() => {
    const x = new Float64Array(total);
    for (let t = 0; t < total; t++) x[t] = (t > 0 ? 0.6 * x[t - 1] : 0) + 0.8 * rng.normal();
    return x;
  });
  const y = new Float64Array(total);
  for (let t = 0; t < total; t++) {
    let v = system.c + SIGMA * rng.normal();
    system.a.forEach((a, i) => {
      if (t - i - 1 >= 0) v += a * y[t - i - 1];
    });
    system.inputs.forEach((inp, j) =>
      inp.b.forEach((b, l) => {
        const k = t - inp.delay - l;
        if (k >= 0) v += b * u[j][k];
      }),
    );
    y[t] = v;
  }
  return {
    name: 'y',
    frequency: 'monthly',
    season: 12,
    time: Float64Array.from({ length: N }, (_, t) => Date.UTC(2000, t, 1)),
    values: y.slice(burn),
    inputs: system.inputs.map((inp, j) => ({ name: inp.name, values: u[j].slice(burn) })),
  };
}

function trueSpec(system: System): ArxSpec {
  return {
    family: 'arx',
    ar: system.a.length,
    inputs: system.inputs.map((i) => ({ name: i.name, lags: i.b.length, delay: i.delay })),
    trend: false,
    harmonics: 0,
    season: 12,
    seasonalLag: false,
    differencing: 'none',
    transform: 'none',
  };
}

/** Recovered seeds, and seeds where the true structure beat the winner without being scored. */
function recovery(system: System, options: SearchOptions): { recovered: number; missed: number } {
  let recovered = 0;
  let missed = 0;
  const truth = new ArxStructure(trueSpec(system));
  for (let seed = 1; seed <= SEEDS; seed++) {
    const series = simulate(system, seed);
    const r = search(series, { families: ['arx'], ...options });
    const w = r.winner;
    const spec = w.structure.spec as ArxSpec;
    const coef = (term: string) => {
      const i = w.structure.terms.indexOf(term);
      return i < 0 ? 0 : w.estimate.theta[i];
    };
    const close = (term: string, value: number) => Math.abs(coef(term) / value - 1) <= 0.1;
    let ok = spec.transform === 'none' && spec.differencing === 'none' && close('const', system.c);
    system.a.forEach((a, i) => (ok &&= close(`y[t-${i + 1}]`, a)));
    for (const inp of system.inputs) {
      ok &&= spec.inputs.find((i) => i.name === inp.name)?.delay === inp.delay;
      inp.b.forEach((b, l) => {
        const lag = inp.delay + l;
        ok &&= close(lag === 0 ? `${inp.name}[t]` : `${inp.name}[t-${lag}]`, b);
      });
    }
    if (ok) recovered++;
    if (!r.ranking.some((c) => c.key === truth.key)) {
      const est = truth.estimate(series, r.sample.from, r.sample.to);
      let rss = 0;
      for (let t = r.sample.from; t < r.sample.to; t++) rss += (series.values[t] - (est.oneStep as Float64Array)[t - r.sample.from]) ** 2;
      const score = criteria(rss, r.sample.n, truth.terms.length + 1)[r.criterion as Criterion];
      if (score < w.result.score) missed++;
    }
  }
  return { recovered, missed };
}

const TWO: System = { c: 2, a: [0.5], inputs: [{ name: 'u1', delay: 0, b: [1.5] }, { name: 'u2', delay: 2, b: [1.2, 0.8] }] };
const THREE: System = {
  c: 2,
  a: [0.5],
  inputs: [{ name: 'u1', delay: 0, b: [1.5] }, { name: 'u2', delay: 1, b: [-1.2] }, { name: 'u3', delay: 2, b: [1.0, 0.8] }],
};
const WIDE: System = { c: 2, a: [0.5], inputs: [{ name: 'u1', delay: 1, b: [1.2] }, { name: 'u2', delay: 4, b: [-1.0] }] };

describe('search recovers simulated ARX systems with inputs at distinct delays (n = 300, σ = 0.3, 50 seeds)', () => {
  it('two inputs at delays 0 and 2: at least 90 % under BIC, 80 % under the default AICc, no better structure left unscored', () => {
    const bic = recovery(TWO, { criterion: 'bic' });
    const aicc = recovery(TWO, {});
    expect(bic.recovered).toBeGreaterThanOrEqual(45);
    expect(aicc.recovered).toBeGreaterThanOrEqual(40);
    expect(bic.missed + aicc.missed).toBe(0);
  });

  it('three inputs at delays 0, 1 and 2: at least 90 % under BIC, 80 % under the default AICc, no better structure left unscored', () => {
    const bic = recovery(THREE, { criterion: 'bic' });
    const aicc = recovery(THREE, {});
    expect(bic.recovered).toBeGreaterThanOrEqual(45);
    expect(aicc.recovered).toBeGreaterThanOrEqual(40);
    expect(bic.missed + aicc.missed).toBe(0);
  });

  it('two inputs at delays 1 and 4 with max delay 5: at least 90 % under BIC', () => {
    const bic = recovery(WIDE, { criterion: 'bic', maxDelay: 5 });
    expect(bic.recovered).toBeGreaterThanOrEqual(45);
    expect(bic.missed).toBe(0);
  });
});
