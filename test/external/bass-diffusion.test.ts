/**
 * Bass diffusion recovered from noisy per-period sales.
 *
 * Truth: the closed-form Bass (1969, Management Science 15(5):215–227) cumulative adoption share
 *   F(t) = (1 − e^{−(p+q)t}) / (1 + (q/p)·e^{−(p+q)t}),
 * with p = 0.03, q = 0.38, m = 10 000, 60 periods; sales_t = m·(F(t) − F(t−1))·(1 + 0.05·ε_t),
 * ε_t standard normal from the project's seeded generator, seeds 1…50. The cumulative-state ODE
 * dX/dt = p·m + (q − p)·X − (q/m)·X² is fitted by the trapezoid integral regression; p, q and m
 * must all be within 15 % of the truth in at least 90 % of the seeds.
 */
import { describe, expect, it } from 'vitest';
import type { Series } from '../../src/data/series.js';
import { createRng } from '../../src/linalg/random.js';
import { odeCandidates, odeStructure } from '../../src/models/ode.js';

const P = 0.03;
const Q = 0.38;
const M = 10_000;
const N = 60;

function bassShare(t: number): number {
  const e = Math.exp(-(P + Q) * t);
  return (1 - e) / (1 + (Q / P) * e);
}

function salesSeries(seed: number): Series {
  const rng = createRng(seed);
  const values = new Float64Array(N);
  for (let t = 1; t <= N; t++) values[t - 1] = M * (bassShare(t) - bassShare(t - 1)) * (1 + 0.05 * rng.normal());
  return {
    name: `bass_${seed}`,
    frequency: 'monthly',
    season: 12,
    time: Float64Array.from({ length: N }, (_, i) => Date.UTC(2010, i, 1)),
    values,
    inputs: [],
  };
}

function read(series: Series): { p: number; q: number; m: number } {
  const s = odeStructure({ state: 'cumulative', powers: [0, 1, 2], periodsPerYear: 12 });
  const e = s.estimate(series, 1, N);
  const d = s.derived(e.theta, series);
  const get = (name: string) => d.find((x) => x.name === name)?.value as number;
  return { p: get('innovation p'), q: get('imitation q'), m: get('market size m') };
}

describe('Bass diffusion p = 0.03, q = 0.38, m = 10 000 with 5 % multiplicative noise (Bass 1969 closed form)', () => {
  it('the search grid offers the cumulative-state quadratic for these non-negative sales', () => {
    const keys = odeCandidates(salesSeries(1), {
      maxAr: 0, maxInputLags: 0, maxDelay: 0, inputs: [], harmonics: [0], season: 12,
      transforms: ['none'], trend: [false], seasonalLag: [false], differencing: ['none'],
    }).map((s) => s.key);
    expect(keys).toContain('ode:cumulative:deg2+c');
  });

  it('recovers p, q and m within 15 % in at least 45 of 50 seeds', () => {
    let hits = 0;
    for (let seed = 1; seed <= 50; seed++) {
      const { p, q, m } = read(salesSeries(seed));
      if (Math.abs(p / P - 1) < 0.15 && Math.abs(q / Q - 1) < 0.15 && Math.abs(m / M - 1) < 0.15) hits++;
    }
    expect(hits).toBeGreaterThanOrEqual(45);
  });

  it('without noise recovers p, q, m within 1 % and the peak t* = ln(q/p)/(p+q) = 6.19 periods', () => {
    const values = Float64Array.from({ length: N }, (_, i) => M * (bassShare(i + 1) - bassShare(i)));
    const series: Series = { ...salesSeries(1), values };
    const s = odeStructure({ state: 'cumulative', powers: [0, 1, 2], periodsPerYear: 12 });
    const d = s.derived(s.estimate(series, 1, N).theta, series);
    const get = (name: string) => d.find((x) => x.name === name)?.value as number;
    expect(Math.abs(get('innovation p') / P - 1)).toBeLessThan(0.01);
    expect(Math.abs(get('imitation q') / Q - 1)).toBeLessThan(0.01);
    expect(Math.abs(get('market size m') / M - 1)).toBeLessThan(0.01);
    expect(Math.abs(get('peak time since launch') / (Math.log(Q / P) / (P + Q)) - 1)).toBeLessThan(0.01);
  });
});
