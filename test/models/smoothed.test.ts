import { describe, expect, it } from 'vitest';
import type { Series } from '../../src/data/series.js';
import { UsageError } from '../../src/data/errors.js';
import { createRng } from '../../src/linalg/random.js';
import { SMOOTHING_WEIGHTS, SmoothedStructure, smoothedCandidates } from '../../src/models/smoothed.js';
import { structureFromSpec } from '../../src/models/registry.js';
import { search, resolveBounds } from '../../src/select/search.js';
import { Learner } from '../../src/forecast/online.js';

function series(values: ArrayLike<number>, season: number | null = null): Series {
  return {
    name: 'y',
    frequency: season === 12 ? 'monthly' : 'index',
    season,
    time: Float64Array.from(values, (_, i) => i),
    values: Float64Array.from(values),
    inputs: [],
  };
}

/**
 * Simple exponential smoothing written the textbook way (Hyndman & Athanasopoulos, "Forecasting:
 * principles and practice", 3rd ed., 2021, §8.1, component form): ℓ_0 = y_0,
 * ℓ_t = α·y_t + (1 − α)·ℓ_{t−1}, one-step forecast ŷ_{t|t−1} = ℓ_{t−1}.
 */
function textbookSes(y: ArrayLike<number>, alpha: number): { oneStep: number[]; level: number } {
  let level = y[0];
  const oneStep: number[] = [];
  for (let t = 1; t < y.length; t++) {
    oneStep.push(level);
    level = alpha * y[t] + (1 - alpha) * level;
  }
  return { oneStep, level };
}

const rng = createRng(17);
const noisyLevel = Array.from({ length: 60 }, () => 0);
{
  // A random walk observed with noise: the process simple exponential smoothing is optimal for.
  let mu = 50;
  for (let t = 0; t < noisyLevel.length; t++) {
    mu += 0.5 * rng.normal();
    noisyLevel[t] = mu + 2 * rng.normal();
  }
}

describe('SmoothedStructure without drift or harmonics', () => {
  const st = new SmoothedStructure({ family: 'smoothed', alpha: 0.4, transform: 'none' });
  const s = series(noisyLevel);

  it('predicts one step ahead exactly as the textbook recursion ℓ_t = α·y_t + (1 − α)·ℓ_{t−1}', () => {
    const want = textbookSes(noisyLevel, 0.4);
    const got = st.oneStep(new Float64Array(0), s, 1, noisyLevel.length);
    for (let t = 0; t < got.length; t++) expect(got[t]).toBeCloseTo(want.oneStep[t], 10);
    const est = st.estimate(s, 1, noisyLevel.length);
    expect(est.theta.length).toBe(0);
    for (let t = 0; t < got.length; t++) expect(est.oneStep?.[t]).toBeCloseTo(want.oneStep[t], 10);
  });

  it('forecasts the last smoothed level at every step', () => {
    const { level } = textbookSes(noisyLevel, 0.4);
    const f = st.simulate(new Float64Array(0), s, [], 5);
    for (const v of f) expect(v).toBeCloseTo(level, 10);
  });

  // Analytic identity: the level is the exponentially weighted average
  // ℓ_n = Σ_{j<n} α(1 − α)^j y_{n−j} + (1 − α)^n y_0 (Muth 1960; Gardner 1985, §2).
  it('forecasts the exponentially weighted average of the history', () => {
    const y = [3, 8, 1, 6, 4];
    const alpha = 0.6;
    let want = (1 - alpha) ** (y.length - 1) * y[0];
    for (let j = 0; j < y.length - 1; j++) want += alpha * (1 - alpha) ** j * y[y.length - 1 - j];
    const f = new SmoothedStructure({ family: 'smoothed', alpha, transform: 'none' }).simulate(new Float64Array(0), series(y), [], 2);
    expect(f[0]).toBeCloseTo(want, 12);
    expect(f[1]).toBeCloseTo(want, 12);
  });

  it('with shocks moves the level by α times each shock', () => {
    const y = [10, 12, 11];
    const { level } = textbookSes(y, 0.4);
    const f = st.simulate(new Float64Array(0), series(y), [], 3, Float64Array.of(1, 0, -2));
    expect(f[0]).toBeCloseTo(level + 1, 12);
    expect(f[1]).toBeCloseTo(level + 0.4, 12);
    expect(f[2]).toBeCloseTo(level + 0.4 - 2, 12);
  });

  it('forecasts afresh when the history or θ changes between calls (the kept end level is checked)', () => {
    const y = Float64Array.of(10, 12, 11, 13);
    const h = series(y);
    const drift = new SmoothedStructure({ family: 'smoothed', alpha: 0.4, drift: true, transform: 'none' });
    const first = drift.simulate(Float64Array.of(1), h, [], 1)[0];
    expect(drift.simulate(Float64Array.of(1), h, [], 1)[0]).toBe(first);
    expect(drift.simulate(Float64Array.of(2), h, [], 1)[0]).not.toBe(first);
    h.values[3] = 20;
    expect(drift.simulate(Float64Array.of(1), h, [], 1)[0]).not.toBe(first);
    expect(drift.simulate(Float64Array.of(1), series([10, 12, 11, 20]), [], 1)[0]).toBe(drift.simulate(Float64Array.of(1), h, [], 1)[0]);
  });

  it('says what it is: smoothing weight, memory half-life and the equation with its moving-average term', () => {
    const d = st.derived(new Float64Array(0), s);
    expect(d.find((x) => x.name === 'smoothing weight')?.value).toBe(0.4);
    expect(d.find((x) => x.name === 'level memory half-life')?.value).toBeCloseTo(Math.log(0.5) / Math.log(0.6), 12);
    expect(st.describe(new Float64Array(0))).toBe('Δy[t] = e[t] − 0.6·e[t-1]');
    expect(st.label).toBe('smoothed level (α = 0.4)');
  });
});

describe('SmoothedStructure with drift', () => {
  // Simulated ARIMA(0,1,1) with constant: Δy_t = c + e_t − β·e_{t−1}, c = 0.8, β = 0.6, σ = 1.
  const c = 0.8;
  const beta = 0.6;
  const r = createRng(5);
  const y = new Float64Array(2000);
  y[0] = 100;
  let prev = 0;
  for (let t = 1; t < y.length; t++) {
    const e = r.normal();
    y[t] = y[t - 1] + c + e - beta * prev;
    prev = e;
  }
  const s = series(y);
  const st = new SmoothedStructure({ family: 'smoothed', alpha: 1 - beta, drift: true, transform: 'none' });

  it('recovers the drift of a simulated process within three standard errors, and σ² ≈ 1', () => {
    const est = st.estimate(s, 1, y.length);
    expect(Math.abs(est.theta[0] - c)).toBeLessThan(3 * est.se[0]);
    expect(est.sigma2).toBeGreaterThan(0.9);
    expect(est.sigma2).toBeLessThan(1.1);
  });

  it('has one-step errors equal to its regression residuals (the filter is the recursion)', () => {
    const est = st.estimate(s, 1, y.length);
    const pred = st.oneStep(est.theta, s, 1, y.length);
    const reg = st.regression(s, 1, y.length);
    for (let i = 0; i < pred.length; i += 97) {
      const resid = reg.y[i] - reg.phi.data[i] * est.theta[0];
      expect(y[i + 1] - pred[i]).toBeCloseTo(resid, 8);
      expect(est.oneStep?.[i]).toBeCloseTo(pred[i], 8);
    }
  });

  it('forecasts the smoothed level plus k times the drift', () => {
    const theta = Float64Array.of(0.8);
    const f = st.simulate(theta, s, [], 4);
    for (let k = 1; k < 4; k++) expect(f[k] - f[k - 1]).toBeCloseTo(0.8, 10);
  });

  // Invariant: RLS at λ = 1 learning row by row ends where a batch fit on all rows does
  // (online.ts), which needs the rows of a later range to come from the same filter.
  it('learns online to the batch fit on all rows', () => {
    const learner = Learner.start(st, [true], s, 1, 1500);
    learner.learn(s, y.length);
    const batch = st.estimate(s, 1, y.length);
    expect(learner.theta[0]).toBeCloseTo(batch.theta[0], 8);
  });
});

describe('SmoothedStructure with a full set of harmonics', () => {
  // Analytic identity: for y_t = a + b·t + S(t mod 12) the change is b + ΔS, periodic; six pairs
  // span every period-12 pattern (terms.ts), so the fit is exact whatever α, and the forecast
  // continues the series without error.
  it('continues a trend plus a monthly pattern exactly', () => {
    const pattern = [5, 3, -2, -6, -4, 0, 2, 7, 4, -1, -5, -3];
    const f = (t: number) => 200 + 0.7 * t + pattern[t % 12];
    const s = series(Array.from({ length: 60 }, (_, t) => f(t)), 12);
    const st = new SmoothedStructure({ family: 'smoothed', alpha: 0.2, drift: true, harmonics: 6, season: 12, transform: 'none' });
    expect(st.terms.length).toBe(12);
    const est = st.estimate(s, 1, 60);
    expect(est.sigma2).toBeLessThan(1e-18);
    const out = st.simulate(est.theta, s, [], 15);
    for (let k = 0; k < 15; k++) expect(out[k]).toBeCloseTo(f(60 + k), 8);
  });
});

describe('SmoothedStructure on leading parts of one history', () => {
  // Invariant: a history cut at an origin (a view sharing the buffer, as calibration passes it)
  // gives the rows, simulations and learner of a fresh copy of the same values, to the last bit,
  // whatever was asked of the structure before; and advancing a learner without recording its
  // steps ends where learning with them does.
  it('gives the same rows and paths for a view as for a copy, in any order of calls', () => {
    const spec = { family: 'smoothed', alpha: 0.5, drift: true, harmonics: 2, season: 12, transform: 'log' } as const;
    const whole = series(noisyLevel.map((v, t) => v + 10 * Math.sin((2 * Math.PI * t) / 12) + 30), 12);
    const warm = new SmoothedStructure(spec);
    const fresh = new SmoothedStructure(spec);
    warm.regression(whole, 1, 60);
    const theta = warm.estimate(whole, 1, 60).theta;
    for (const o of [59, 31, 45, 20]) {
      const view = { ...whole, values: whole.values.subarray(0, o), time: whole.time.subarray(0, o) };
      const copy = { ...whole, values: whole.values.slice(0, o), time: whole.time.slice(0, o) };
      const a = warm.regression(view, 3, o);
      const b = fresh.regression(copy, 3, o);
      expect(Array.from(a.y)).toEqual(Array.from(b.y));
      expect(Array.from(a.phi.data)).toEqual(Array.from(b.phi.data));
      expect(Array.from(warm.simulate(theta, view, [], 12))).toEqual(Array.from(new SmoothedStructure(spec).simulate(theta, copy, [], 12)));
    }
    const recorded = Learner.start(warm, warm.terms.map(() => true), whole, 1, 20);
    const quiet = Learner.start(fresh, fresh.terms.map(() => true), whole, 1, 20);
    for (const to of [25, 40, 60]) {
      recorded.learn(whole, to);
      quiet.advance(whole, to);
      expect(Array.from(quiet.theta)).toEqual(Array.from(recorded.theta));
      expect(Array.from(quiet.cov)).toEqual(Array.from(recorded.cov));
      expect(quiet.next).toBe(recorded.next);
    }
  });
});

describe('the smoothed-level family', () => {
  it('round-trips its spec through the registry and refuses a bad one', () => {
    const st = new SmoothedStructure({ family: 'smoothed', alpha: 0.6, drift: true, harmonics: 1, season: 12, transform: 'log' });
    expect(st.key).toBe('smoothed|a0.6|drift|K1s12|log');
    expect(structureFromSpec(st.spec).key).toBe(st.key);
    expect(() => new SmoothedStructure({ family: 'smoothed', alpha: 1, transform: 'none' })).toThrow(UsageError);
    expect(() => new SmoothedStructure({ family: 'smoothed', alpha: 0.5, harmonics: 1, transform: 'none' })).toThrow(/season/);
    expect(() => new SmoothedStructure({ family: 'smoothed', alpha: 0.5, harmonics: 7, season: 12, transform: 'none' })).toThrow(/harmonics/);
  });

  it('offers each transform, no or the full harmonics, each drift alternative and smoothing weight', () => {
    const s = series(Array.from({ length: 48 }, (_, t) => 20 + t + (t % 12)), 12);
    const bounds = resolveBounds(s);
    const list = smoothedCandidates(s, bounds);
    expect(list.length).toBe(bounds.transforms.length * 2 * bounds.trend.length * SMOOTHING_WEIGHTS.length);
    expect(new Set(list.map((x) => x.key)).size).toBe(list.length);
    expect(new Set(list.map((x) => (x.spec as { harmonics?: number }).harmonics ?? 0))).toEqual(new Set([0, 6]));
    // Without a season: no harmonics at all.
    expect(smoothedCandidates(series(s.values), resolveBounds(series(s.values))).every((x) => !('harmonics' in x.spec))).toBe(true);
  });

  it('wins the search on a random walk observed with noise, among the change structures', () => {
    const s = series(noisyLevel);
    const r = search(s, { families: ['damped', 'smoothed'], transform: 'none', trend: 'off' });
    expect(r.winner.structure.family).toBe('smoothed');
  });
});
