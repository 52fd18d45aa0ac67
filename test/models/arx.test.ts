import { describe, expect, it } from 'vitest';
import { ArxStructure, arxCandidates, arxFamily, type ArxSpec } from '../../src/models/arx.js';
import { structureFromSpec } from '../../src/models/registry.js';
import { lstsq } from '../../src/linalg/lstsq.js';
import { row } from '../../src/linalg/matrix.js';
import { makeSeries, noise, simulateArx } from './arx-fixtures.js';

const base: ArxSpec = {
  family: 'arx',
  ar: 0,
  inputs: [],
  trend: false,
  harmonics: 0,
  season: null,
  seasonalLag: false,
  differencing: 'none',
  transform: 'none',
};

describe('ArxStructure.regression', () => {
  it('builds rows equal to hand-built rows: 2 AR lags, price lags 0-1 after delay 1, trend, 1 harmonic pair of period 4', () => {
    const y = [3, 1, 4, 1, 5, 9, 2, 6];
    const u = [10, 20, 30, 40, 50, 60, 70, 80];
    const s = new ArxStructure({ ...base, ar: 2, inputs: [{ name: 'price', lags: 2, delay: 1 }], trend: true, harmonics: 1, season: 4 });
    expect(s.terms).toEqual(['const', 'y[t-1]', 'y[t-2]', 'price[t-1]', 'price[t-2]', 'trend', 'sin(2π·1·t/4)', 'cos(2π·1·t/4)']);
    expect(s.history).toBe(2);
    const reg = s.regression(makeSeries(y, { price: u }), 0, 8);
    expect(Array.from(reg.index)).toEqual([2, 3, 4, 5, 6, 7]);
    expect(Array.from(reg.y)).toEqual([4, 1, 5, 9, 2, 6]);
    // Hand-built row for t = 5: [1, y4, y3, u4, u3, 5, sin(2π·5/4), cos(2π·5/4)] = [1, 5, 1, 50, 40, 5, 1, 0].
    const r5 = Array.from(row(reg.phi, 3));
    const hand5 = [1, 5, 1, 50, 40, 5, 1, 0];
    r5.forEach((v, j) => expect(v).toBeCloseTo(hand5[j], 12));
    // Hand-built row for t = 2: [1, y1, y0, u1, u0, 2, sin(π), cos(π)] = [1, 1, 3, 20, 10, 2, 0, −1].
    const r2 = Array.from(row(reg.phi, 0));
    const hand2 = [1, 1, 3, 20, 10, 2, 0, -1];
    r2.forEach((v, j) => expect(v).toBeCloseTo(hand2[j], 12));
  });

  it('names a delayed input u_{t−d} … u_{t−d−q+1} and counts its history as d + q − 1', () => {
    const s = new ArxStructure({ ...base, ar: 1, inputs: [{ name: 'ads', lags: 3, delay: 2 }] });
    expect(s.terms).toEqual(['const', 'y[t-1]', 'ads[t-2]', 'ads[t-3]', 'ads[t-4]']);
    expect(s.history).toBe(4);
    const lag0 = new ArxStructure({ ...base, inputs: [{ name: 'ads', lags: 1, delay: 0 }] });
    expect(lag0.terms).toEqual(['const', 'ads[t]']);
    expect(lag0.history).toBe(0);
  });

  it('differences ln y and the input once for first differencing (targets ln y_t − ln y_{t−1})', () => {
    const y = [1, 2, 4, 8, 16];
    const u = [1, 4, 9, 16, 25];
    const s = new ArxStructure({ ...base, ar: 1, inputs: [{ name: 'u', lags: 1, delay: 0 }], differencing: 'first', transform: 'log' });
    expect(s.terms).toEqual(['const', 'Δln y[t-1]', 'Δu[t]']);
    expect(s.history).toBe(2);
    const reg = s.regression(makeSeries(y, { u }), 0, 5);
    expect(Array.from(reg.index)).toEqual([2, 3, 4]);
    reg.y.forEach((v) => expect(v).toBeCloseTo(Math.LN2, 12));
    // Row t = 3: [1, ln 4 − ln 2, u3 − u2] = [1, ln 2, 7].
    const r = Array.from(row(reg.phi, 1));
    expect(r[1]).toBeCloseTo(Math.LN2, 12);
    expect(r[2]).toBe(7);
  });

  it('continues trend and harmonics on a later window of the series (series.before.count as time origin)', () => {
    const y = Array.from({ length: 30 }, (_, t) => 10 + Math.sin(t) + 0.1 * t);
    const u = Array.from({ length: 30 }, (_, t) => Math.cos(0.7 * t));
    const s = new ArxStructure({ ...base, ar: 1, inputs: [{ name: 'u', lags: 1, delay: 1 }], trend: true, harmonics: 2, season: 12 });
    const full = s.regression(makeSeries(y, { u }), 0, 30);
    const win = makeSeries(y.slice(10), { u: u.slice(10) });
    win.before = { count: 10, sum: y.slice(0, 10).reduce((a, b) => a + b, 0) };
    const part = s.regression(win, 0, 20);
    // Window row r is full row t = 10 + r, for r ≥ history 1.
    for (let r = 0; r < part.y.length; r++) {
      expect(Array.from(row(part.phi, r))).toEqual(Array.from(row(full.phi, r + 10)));
    }
  });

  it('keeps only the cosine of the k = s/2 harmonic (its sine is zero at integer t)', () => {
    const s = new ArxStructure({ ...base, harmonics: 2, season: 4 });
    expect(s.terms).toEqual(['const', 'sin(2π·1·t/4)', 'cos(2π·1·t/4)', 'cos(2π·2·t/4)']);
  });

  it('rejects invalid specs with a message naming the field', () => {
    expect(() => new ArxStructure({ ...base, harmonics: 7, season: 12 })).toThrow(/harmonics/);
    expect(() => new ArxStructure({ ...base, seasonalLag: true, season: null })).toThrow(/season/);
    expect(() => new ArxStructure({ ...base, ar: -1 })).toThrow(/"ar"/);
  });
});

describe('ArxStructure.derived', () => {
  it('gives gain b/(1−a) and half-life ln 0.5 / ln a for a first-order system (analytic)', () => {
    const s = new ArxStructure({ ...base, ar: 1, inputs: [{ name: 'price', lags: 1, delay: 3 }] });
    const theta = Float64Array.of(1, 0.8, 0.5); // const, y[t-1], price[t-3]
    const d = s.derived(theta, makeSeries(new Float64Array(10)));
    const get = (name: string) => d.find((x) => x.name === name)?.value;
    expect(get('stable')).toBe(true);
    expect(get('gain price') as number).toBeCloseTo(0.5 / (1 - 0.8), 12);
    expect(get('half-life') as number).toBeCloseTo(Math.log(0.5) / Math.log(0.8), 12); // 3.106 periods
    expect(get('delay price')).toBe(3);
  });

  it('sums input lags and AR lags in the gain, and reports instability', () => {
    const s = new ArxStructure({ ...base, ar: 2, inputs: [{ name: 'u', lags: 2, delay: 0 }] });
    const stable = s.derived(Float64Array.of(0, 0.5, 0.2, 1, 0.5), makeSeries(new Float64Array(10)));
    expect(stable.find((x) => x.name === 'gain u')?.value as number).toBeCloseTo(1.5 / 0.3, 12);
    // a = (1.2, −0.1): λ² − 1.2λ + 0.1 has root (1.2 + √1.04)/2 ≈ 1.11 > 1 (quadratic formula).
    const unstable = new ArxStructure({ ...base, ar: 2 });
    expect(unstable.isStable(Float64Array.of(0, 1.2, -0.1))).toBe(false);
    const spectral = unstable.derived(Float64Array.of(0, 1.2, -0.1), makeSeries(new Float64Array(10))).find((x) => x.name === 'spectral radius');
    expect(spectral?.value as number).toBeCloseTo((1.2 + Math.sqrt(1.04)) / 2, 10);
  });

  it('reports the oscillation period 2π/|arg λ| of a complex dominant root', () => {
    // a = (1, −0.5): λ = 0.5 ± 0.5i, |λ| = √0.5, arg = π/4, period 8 (quadratic formula).
    const s = new ArxStructure({ ...base, ar: 2 });
    const d = s.derived(Float64Array.of(0, 1, -0.5), makeSeries(new Float64Array(10)));
    expect(d.find((x) => x.name === 'oscillation period')?.value as number).toBeCloseTo(8, 10);
    expect(d.find((x) => x.name === 'half-life')?.value as number).toBeCloseTo(Math.log(0.5) / Math.log(Math.SQRT1_2), 10);
  });
});

describe('ArxStructure.estimate / oneStep', () => {
  const n = 200;
  const u = noise(n + 50, 1, 7);
  const y = simulateArx({ n, c: 1, a: [0.6], b: [0.8, 0.4], delay: 1, u, e: noise(n + 50, 0.3, 8) });
  const series = makeSeries(y, { u: u.slice(50) });
  const s = new ArxStructure({ ...base, ar: 1, inputs: [{ name: 'u', lags: 2, delay: 1 }] });

  it('oneStep equals the fitted values of the regression for an undifferenced, untransformed ARX', () => {
    const est = s.estimate(series, 5, n);
    const reg = s.regression(series, 5, n);
    const fit = lstsq(reg.phi, reg.y, s.terms);
    const pred = s.oneStep(est.theta, series, 5, n);
    expect(pred.length).toBe(n - 5);
    for (let i = 0; i < pred.length; i++) expect(pred[i]).toBeCloseTo(fit.fitted[i], 10);
  });

  it('recovers the simulated coefficients within 4 standard errors (truth: c 1, a 0.6, b 0.8, 0.4)', () => {
    const est = s.estimate(series, 5, n);
    const truth = [1, 0.6, 0.8, 0.4];
    truth.forEach((v, j) => expect(Math.abs(est.theta[j] - v)).toBeLessThan(4 * est.se[j]));
  });

  it('with first differencing predicts z_t = z_{t−1} + predicted Δz_t', () => {
    const d = new ArxStructure({ ...base, ar: 1, differencing: 'first', transform: 'log' });
    const pos = makeSeries(Array.from({ length: 30 }, (_, t) => Math.exp(0.05 * t + 0.1 * Math.sin(t))));
    const theta = Float64Array.of(0.02, 0.3);
    const pred = d.oneStep(theta, pos, 2, 30);
    const z = Array.from(pos.values, Math.log);
    for (let t = 2; t < 30; t++) expect(pred[t - 2]).toBeCloseTo(z[t - 1] + 0.02 + 0.3 * (z[t - 1] - z[t - 2]), 12);
  });
});

describe('ArxStructure.simulate', () => {
  it('converges to c/(1−a) with zero shocks for a stable AR(1) (c = 2, a = 0.5 → 4)', () => {
    const s = new ArxStructure({ ...base, ar: 1 });
    const out = s.simulate(Float64Array.of(2, 0.5), makeSeries([10, 0]), [], 60);
    expect(out[0]).toBeCloseTo(2, 12);
    expect(out[59]).toBeCloseTo(4, 10);
  });

  it('reproduces the continuation of a process when given its true shocks (log, first differences, input)', () => {
    // Δln y_t = 0.01 + 0.4 Δln y_{t−1} + 0.05 Δu_{t−1} + e_t, generated here step by step.
    const n = 60;
    const e = noise(n, 0.02, 11);
    const u = noise(n, 1, 12);
    const z = new Float64Array(n);
    z[0] = 1;
    z[1] = 1.01;
    for (let t = 2; t < n; t++) z[t] = z[t - 1] + 0.01 + 0.4 * (z[t - 1] - z[t - 2]) + 0.05 * (u[t - 1] - u[t - 2]) + e[t];
    const y = Array.from(z, Math.exp);
    const s = new ArxStructure({ ...base, ar: 1, inputs: [{ name: 'u', lags: 1, delay: 1 }], differencing: 'first', transform: 'log' });
    const theta = Float64Array.of(0.01, 0.4, 0.05);
    const origin = 40;
    const past = makeSeries(y.slice(0, origin), { u: u.slice(0, origin) });
    const out = s.simulate(theta, past, [u.slice(origin)], n - origin, e.slice(origin));
    for (let t = origin; t < n; t++) expect(out[t - origin]).toBeCloseTo(y[t], 10);
  });

  it('follows the seasonal lag and seasonal differencing on a period-4 pattern', () => {
    // Seasonal differencing with only a constant: y_t = y_{t−4} + c (the pattern rises by c each season).
    const s = new ArxStructure({ ...base, differencing: 'seasonal', season: 4 });
    const out = s.simulate(Float64Array.of(1), makeSeries([5, 1, 3, 2, 6, 2, 4, 3], {}, { season: 4 }), [], 8);
    expect(Array.from(out)).toEqual([7, 3, 5, 4, 8, 4, 6, 5]);
  });
});

describe('ArxStructure.describe and spec', () => {
  it('writes the equation with coefficients and ± standard errors', () => {
    const s = new ArxStructure({ ...base, ar: 1, inputs: [{ name: 'price', lags: 1, delay: 2 }] });
    const text = s.describe(Float64Array.of(0.61, 0.33, -0.0021), Float64Array.of(0.05, 0.02, 0.001));
    expect(text).toBe('y[t] = 0.61 (±0.05) + 0.33 (±0.02)·y[t-1] − 0.0021 (±0.001)·price[t-2] + e[t]');
  });

  it('round-trips through JSON and the registry to the same structure', () => {
    const spec: ArxSpec = { ...base, ar: 2, inputs: [{ name: 'price', lags: 2, delay: 1 }], trend: true, harmonics: 2, season: 12, seasonalLag: true, differencing: 'first', transform: 'log' };
    const a = new ArxStructure(spec);
    const b = structureFromSpec(JSON.parse(JSON.stringify(a.spec)));
    expect(b.key).toBe(a.key);
    expect(b.terms).toEqual(a.terms);
    expect(b.history).toBe(a.history);
    expect(b.label).toBe(a.label);
    expect(arxFamily.fromSpec(a.spec).key).toBe(a.key);
  });
});

describe('arxCandidates', () => {
  it('lists a fixed grid with unique keys, without seasonal parts when there is no season', () => {
    const series = makeSeries(new Float64Array(50), { u: new Float64Array(50) }, { season: null });
    const bounds = {
      maxAr: 2, maxInputLags: 2, maxDelay: 1, inputs: ['u'], harmonics: [], season: null,
      transforms: ['none' as const], trend: [false, true], seasonalLag: [false], differencing: ['none' as const],
    };
    const c = arxCandidates(series, bounds);
    // 2 trend × 3 AR orders × (1 without input + 2 lag counts × 2 delays) = 30.
    expect(c.length).toBe(30);
    expect(new Set(c.map((s) => s.key)).size).toBe(30);
    expect(arxCandidates(series, bounds).map((s) => s.key)).toEqual(c.map((s) => s.key));
  });
});
