/**
 * The generalized Bass model recovered from noisy per-period sales with a price input.
 *
 * Truth: Bass, Krishnan & Jain ("Why the Bass model fits without decision variables",
 * Marketing Science 13(3), 1994, 203–223): the hazard of adoption is scaled by the mapping
 * function x(t), f(t)/(1 − F(t)) = (p + q·F(t))·x(t), with the closed form
 *   F(t) = (1 − e^{−(p+q)·X(t)}) / (1 + (q/p)·e^{−(p+q)·X(t)}),   X(t) = ∫₀ᵗ x(s) ds,
 * here with x(t) = 1 + β·price(t), p = 0.03, q = 0.38, m = 10 000 (the Bass test's values),
 * β = −1.5 and price(t) = 0.3·sin(2πt/24): the price 30 % above or below its reference over a
 * two-year cycle, a 10 % cut speeding adoption up by 15 %. The price moves linearly within a
 * period (the model's own assumption between observations, ode.ts), so X grows by
 * 1 + β·(price_{t−1} + price_t)/2 over period t. Sales_t = m·(F(X_t) − F(X_{t−1}))·(1 + 0.05·ε_t),
 * ε_t standard normal from the project's seeded generator, 60 months, seeds 1…50.
 */
import { describe, expect, it } from 'vitest';
import type { Series } from '../../src/data/series.js';
import { createRng } from '../../src/linalg/random.js';
import { odeStructure } from '../../src/models/ode.js';
import { Learner } from '../../src/forecast/online.js';
import { search } from '../../src/select/search.js';

const P = 0.03;
const Q = 0.38;
const M = 10_000;
const BETA = -1.5;
const N = 60;

function share(X: number): number {
  const e = Math.exp(-(P + Q) * X);
  return (1 - e) / (1 + (Q / P) * e);
}

function salesSeries(seed: number, noise = 0.05): Series {
  const rng = createRng(seed);
  const price = Float64Array.from({ length: N }, (_, t) => 0.3 * Math.sin((2 * Math.PI * t) / 24));
  const values = new Float64Array(N);
  let X = 0;
  for (let t = 0; t < N; t++) {
    const next = X + 1 + BETA * (t > 0 ? (price[t - 1] + price[t]) / 2 : price[0]);
    values[t] = M * (share(next) - share(X)) * (1 + noise * rng.normal());
    X = next;
  }
  return {
    name: `gbm_${seed}`,
    frequency: 'monthly',
    season: 12,
    time: Float64Array.from({ length: N }, (_, i) => Date.UTC(2010, i, 1)),
    values,
    inputs: [{ name: 'price', values: price }],
  };
}

const gbm = () => odeStructure({ state: 'cumulative', powers: [0, 1, 2], rateInputs: ['price'], periodsPerYear: 12 });

function read(series: Series): { p: number; q: number; m: number; beta: number } {
  const s = gbm();
  const d = s.derived(s.estimate(series, 1, N).theta, series);
  const get = (name: string) => d.find((x) => x.name === name)?.value as number;
  return { p: get('innovation p'), q: get('imitation q'), m: get('market size m'), beta: get('rate effect price') };
}

describe('generalized Bass model p = 0.03, q = 0.38, m = 10 000, price effect β = −1.5 (Bass, Krishnan & Jain 1994 closed form)', () => {
  it('recovers p, q, m and the price effect within 15 % in at least 45 of 50 seeds (5 % noise)', () => {
    let hits = 0;
    for (let seed = 1; seed <= 50; seed++) {
      const { p, q, m, beta } = read(salesSeries(seed));
      if ([p / P, q / Q, m / M, beta / BETA].every((r) => Math.abs(r - 1) < 0.15)) hits++;
    }
    expect(hits).toBeGreaterThanOrEqual(45);
  });

  it('without noise recovers p, q, m and β within 1 % (the trapezoid rule is the only approximation)', () => {
    const { p, q, m, beta } = read(salesSeries(1, 0));
    expect(Math.abs(p / P - 1)).toBeLessThan(0.01);
    expect(Math.abs(q / Q - 1)).toBeLessThan(0.01);
    expect(Math.abs(m / M - 1)).toBeLessThan(0.01);
    expect(Math.abs(beta / BETA - 1)).toBeLessThan(0.01);
  });

  it('writes the law scaled by the price and names the effect', () => {
    const series = salesSeries(1, 0);
    const s = gbm();
    const e = s.estimate(series, 1, N);
    expect(s.terms).toEqual(['1', 'X', 'X^2', 'β(price)']);
    expect(s.describe(e.theta)).toMatch(/^dX\/dt = \(1 − 1\.\d+·price\)·\(\d+ \+ 0\.3\d+·X − 3\.\d+e-5·X²\)/);
    expect(s.label).toBe('ODE in cumulative sum, quadratic (Bass-type diffusion), price scaling the rate');
  });

  it('online learning starts exactly at the batch fit (the Gauss–Newton rows at the estimate return it) and learns the rest of the series close to a refit', () => {
    const series = salesSeries(3);
    const s = gbm();
    const head = { ...series, values: series.values.slice(0, 40), time: series.time.slice(0, 40), inputs: [{ name: 'price', values: series.inputs[0].values.slice(0, 40) }] };
    const batch = s.estimate(head, 1, 40);
    const learner = Learner.start(s, batch.active, head, 1, 40);
    learner.theta.forEach((v, j) => expect(Math.abs(v - batch.theta[j])).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(batch.theta[j]))));
    learner.learn(series);
    const refit = s.estimate(series, 1, N);
    const d = (th: Float64Array) => s.derived(th, series);
    const get = (list: ReturnType<typeof d>, name: string) => list.find((x) => x.name === name)?.value as number;
    for (const name of ['market size m', 'innovation p', 'imitation q', 'rate effect price']) {
      expect(Math.abs(get(d(learner.theta), name) / get(d(refit.theta), name) - 1)).toBeLessThan(0.05);
    }
  });

  it('the default search offers the diffusion with the price scaling the rate, fitted', () => {
    const r = search(salesSeries(2));
    expect(r.ranking.find((c) => c.key === 'ode:cumulative:deg2+c:rate(price)')?.status).toBe('fitted');
  });
});
