import { describe, expect, it } from 'vitest';
import { autoChangeHarmonics, autoHarmonics, defaultMaxAr, resolveBounds, search } from '../../src/select/search.js';
import { criteria } from '../../src/select/criteria.js';
import { DataError, ModelError, UsageError } from '../../src/data/errors.js';
import type { ArxSpec } from '../../src/models/arx.js';
import { makeSeries, noise, simulateArx } from '../models/arx-fixtures.js';

function specOf(r: ReturnType<typeof search>): ArxSpec {
  return r.winner.structure.spec as ArxSpec;
}

describe('search: recovery of simulated structures (known truth)', () => {
  it('finds input delay 3 in y_t = 2 + 0.5 y_{t−1} + 1.5 u_{t−3} + e_t', () => {
    const n = 200;
    const u = noise(n + 50, 1, 31);
    const y = simulateArx({ n, c: 2, a: [0.5], b: [1.5], delay: 3, u, e: noise(n + 50, 0.5, 32) });
    const r = search(makeSeries(y, { u: u.slice(50) }, { frequency: 'index', season: null }), { families: ['arx'], maxDelay: 5, transform: 'none' });
    const spec = specOf(r);
    expect(spec.inputs.length).toBe(1);
    expect(spec.inputs[0].delay).toBe(3);
    expect(r.winner.derived.find((d) => d.name === 'delay u')?.value).toBe(3);
    // Steady-state gain truth 1.5/(1 − 0.5) = 3.
    expect(r.winner.derived.find((d) => d.name === 'gain u')?.value as number).toBeCloseTo(3, 0);
  });

  it('gives a period-12 seasonal series harmonics', () => {
    const n = 144;
    const e = noise(n + 50, 0.4, 41);
    const ar = simulateArx({ n, c: 0, a: [0.3], e });
    const y = Array.from(ar, (v, t) => 50 + v + 3 * Math.sin((2 * Math.PI * t) / 12) + 1.5 * Math.cos((4 * Math.PI * t) / 12));
    const r = search(makeSeries(y), { families: ['arx'] });
    expect(specOf(r).harmonics).toBeGreaterThanOrEqual(2);
    expect(specOf(r).season).toBe(12);
  });

  it('finds 2 AR lags for y_t = 1 + 1.2 y_{t−1} − 0.5 y_{t−2} + e_t under BIC', () => {
    const n = 300;
    const y = simulateArx({ n, c: 1, a: [1.2, -0.5], e: noise(n + 50, 1, 51) });
    const r = search(makeSeries(y, {}, { frequency: 'index', season: null }), { families: ['arx'], criterion: 'bic', maxAr: 5 });
    expect(specOf(r).ar).toBe(2);
    expect(specOf(r).trend).toBe(false);
    expect(r.criterion).toBe('bic');
    expect(r.winner.result.score).toBe(r.winner.result.bic);
  });
});

describe('search bounds: harmonics and trends by default', () => {
  it("'auto' harmonics are 0 to 2 pairs, and for structures of the change none, one and the full set for seasons up to 12", () => {
    expect(autoHarmonics(12)).toEqual([0, 1, 2]);
    expect(autoHarmonics(2)).toEqual([0, 1]);
    expect(autoChangeHarmonics(12)).toEqual([0, 1, 6]);
    expect(autoChangeHarmonics(4)).toEqual([0, 1, 2]);
    expect(autoChangeHarmonics(7)).toEqual([0, 1, 3]);
    expect(autoChangeHarmonics(2)).toEqual([0, 1]);
    expect(autoChangeHarmonics(52)).toEqual([0, 1, 2]);
    const monthly = makeSeries(Array.from({ length: 48 }, (_, t) => 10 + (t % 12)));
    expect(resolveBounds(monthly).harmonics).toEqual([0, 1, 2]);
    expect(resolveBounds(monthly).changeHarmonics).toEqual([0, 1, 6]);
    expect(resolveBounds(monthly, { harmonics: 3 }).changeHarmonics).toEqual([0, 1, 2, 3]);
    const keys = search(monthly, { families: ['arx', 'damped'] }).ranking.map((r) => r.key);
    expect(keys.some((k) => k.startsWith('damped') && k.includes('K6s12'))).toBe(true);
    expect(keys.some((k) => k.startsWith('arx') && k.includes('K6s12'))).toBe(false);
  });

  it('offers level structures on the log scale a trend only when the trend is asked for', () => {
    const s = makeSeries(Array.from({ length: 60 }, (_, t) => 10 * Math.exp(0.02 * t) * (1 + 0.01 * Math.sin(t))), {}, { frequency: 'index', season: null });
    const keys = (o: Parameters<typeof search>[1]) => search(s, { families: ['arx'], ...o }).ranking.map((r) => r.key);
    const auto = keys({});
    expect(auto.some((k) => k.includes('trend') && !k.endsWith('log'))).toBe(true);
    expect(auto.some((k) => k.includes('trend') && k.endsWith('log'))).toBe(false);
    expect(keys({ trend: 'on' }).filter((k) => k.endsWith('log')).every((k) => k.includes('trend'))).toBe(true);
    expect(keys({ logTrend: 'auto' }).some((k) => k.includes('trend') && k.endsWith('log'))).toBe(true);
    expect(resolveBounds(s).logTrend).toEqual([false]);
    expect(resolveBounds(s, { trend: 'off' }).logTrend).toEqual([false]);
  });
});

describe('search: scoring', () => {
  const n = 120;
  const u = noise(n + 50, 1, 61);
  const y0 = simulateArx({ n, c: 5, a: [0.5], b: [1.5], delay: 1, u, e: noise(n + 50, 0.5, 62) });
  const series = makeSeries(
    Array.from(y0, (v, t) => v + 20 + 3 * Math.sin((2 * Math.PI * t) / 12)),
    { price: u.slice(50) },
  );
  const r = search(series);

  it('scores every fitted candidate, of every family, on the same time indices', () => {
    const fitted = r.ranking.filter((c) => c.status === 'fitted');
    expect(fitted.length).toBe(r.fitted);
    expect(new Set(r.ranking.map((c) => c.family)).size).toBeGreaterThanOrEqual(1);
    for (const c of fitted) {
      expect([c.from, c.to, c.n]).toEqual([r.sample.from, r.sample.to, r.sample.n]);
      const reg = c.structure.regression(series, c.from, c.to);
      expect(reg.index.length).toBe(r.sample.n);
      expect(reg.index[0]).toBe(r.sample.from);
      expect(reg.index[reg.index.length - 1]).toBe(r.sample.to - 1);
    }
    expect(r.sample.from).toBe(Math.max(...r.ranking.map((c) => c.structure.history)));
  });

  it('ranks by the criterion with ties broken by key, Δ from the best, weights summing to 1', () => {
    const fitted = r.ranking.slice(0, r.fitted);
    for (let i = 1; i < fitted.length; i++) {
      const a = fitted[i - 1];
      const b = fitted[i];
      expect(a.score < b.score || (a.score === b.score && a.key < b.key)).toBe(true);
    }
    expect(fitted[0].delta).toBe(0);
    expect(fitted.reduce((s, c) => s + c.weight, 0)).toBeCloseTo(1, 12);
    expect(fitted.map((c) => c.rank)).toEqual(fitted.map((_, i) => i + 1));
    expect(search(series).ranking.map((c) => c.key)).toEqual(r.ranking.map((c) => c.key));
  });

  it('recomputes a log candidate score from its one-step errors with the Jacobian −Σ ln y (criteria.ts formulas)', () => {
    const c = r.ranking.find((x) => x.status === 'fitted' && x.structure.transform === 'log');
    expect(c).toBeDefined();
    if (!c || !c.estimate) return;
    const pred = c.structure.oneStep(c.estimate.theta, series, c.from, c.to);
    let rss = 0;
    let jac = 0;
    for (let t = c.from; t < c.to; t++) {
      rss += (Math.log(series.values[t]) - pred[t - c.from]) ** 2;
      jac -= Math.log(series.values[t]);
    }
    const k = c.structure.terms.length + 1;
    const ref = criteria(rss, c.n, k, { logJacobian: jac });
    expect(c.k).toBe(k);
    expect(c.aicc).toBeCloseTo(ref.aicc, 8);
    expect(c.bic).toBeCloseTo(ref.bic, 8);
  });

  it('returns the winner with its equation, derived quantities and a whiteness check', () => {
    expect(r.winner.equation).toMatch(/^(ln )?y\[t\] = /);
    expect(r.winner.equation).not.toContain('±');
    expect(r.winner.derived.some((d) => d.name === 'stable')).toBe(true);
    expect(r.winner.residuals.length).toBe(r.sample.n);
    expect(r.winner.whiteness.lags).toBeGreaterThan(0);
  });
});

describe('search: candidates that cannot be fitted and bad input', () => {
  it('lists explosive fits as failed with the reason instead of dropping them', () => {
    // y_t = 1.08 y_{t−1} + small noise: an AR fit without differencing is explosive.
    const e = noise(80, 0.01, 71);
    const y = new Float64Array(80);
    y[0] = 1;
    for (let t = 1; t < 80; t++) y[t] = 1.08 * y[t - 1] + e[t];
    const r = search(makeSeries(y, {}, { frequency: 'index', season: null }), { families: ['arx'], transform: 'none', trend: 'off', maxAr: 2 });
    const bad = r.ranking.filter((c) => c.status === 'failed');
    expect(bad.length).toBeGreaterThan(0);
    expect(bad[0].reason).toMatch(/explosive/);
    expect(bad.every((c) => c.rank === null)).toBe(true);
    expect(r.failed + r.fitted).toBe(r.ranking.length);
  });

  it('lists candidates with a constant input as rank-deficient, naming the collinear terms', () => {
    const n = 60;
    const y = simulateArx({ n, c: 1, a: [0.5], e: noise(n + 50, 1, 72) });
    const r = search(makeSeries(y, { flat: new Float64Array(n).fill(3) }, { frequency: 'index', season: null }), { families: ['arx'], transform: 'none' });
    const bad = r.ranking.filter((c) => c.status === 'failed');
    expect(bad.length).toBeGreaterThan(0);
    expect(bad.every((c) => /flat\[t.*\]/.test(c.reason ?? '') && /const/.test(c.reason ?? ''))).toBe(true);
    expect(r.warnings.some((w) => /candidates could not be estimated: \d+ not estimable; first reason: /.test(w))).toBe(true);
    expect(r.setAside.estimation).toBe(bad.length);
  });

  it('refuses a series shorter than the candidates need, naming the length needed', () => {
    const s = makeSeries([1, 3, 2, 5, 4], {}, { frequency: 'index', season: null });
    let err: unknown;
    try {
      search(s, { families: ['arx'], maxAr: 3 });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(ModelError);
    expect((err as ModelError).code).toBe('too-short');
    // largest history 3 (AR lags 1-3) + smallest candidate (1 term) + 3 rows = 7 points.
    expect((err as ModelError).message).toMatch(/has 5 points; the search needs at least 7/);
  });

  it('shrinks the default AR bound on a short series instead of refusing it: max(1, ⌊n/10⌋) lags', () => {
    const s = makeSeries([1, 3, 2, 5, 4], {}, { frequency: 'index', season: null });
    const r = search(s, { families: ['arx'] });
    expect(r.bounds.maxAr).toBe(1);
    expect(r.sample.from).toBe(1);
    expect(defaultMaxAr(14)).toBe(1);
    expect(defaultMaxAr(29)).toBe(2);
    expect(defaultMaxAr(30)).toBe(3);
    expect(defaultMaxAr(500)).toBe(3);
  });

  it('refuses a constant series', () => {
    expect(() => search(makeSeries(new Float64Array(50).fill(4)))).toThrow(/constant/);
    try {
      search(makeSeries(new Float64Array(50).fill(4)));
    } catch (e) {
      expect(e).toBeInstanceOf(ModelError);
      expect((e as ModelError).code).toBe('constant-series');
    }
  });

  it('refuses an input with a missing value, naming the input and the time', () => {
    const u = noise(50, 1, 73);
    u[17] = NaN;
    const s = makeSeries(noise(50, 1, 74), { price: u });
    expect(() => search(s)).toThrow(DataError);
    expect(() => search(s)).toThrow(/input "price" has a missing value at 2001-06/);
  });

  it('refuses an input identical to the target', () => {
    const y = noise(50, 1, 75);
    expect(() => search(makeSeries(y, { copy: y }))).toThrow(UsageError);
    expect(() => search(makeSeries(y, { copy: y }))).toThrow(/identical to the series/);
  });

  it('lists exact fits (an input that restates the target) as failed instead of letting them win', () => {
    const y = simulateArx({ n: 80, c: 1, a: [0.5], e: noise(130, 1, 78) });
    const twice = Array.from(y, (v) => 2 * v + 1);
    const r = search(makeSeries(y, { twice }, { frequency: 'index', season: null }), { families: ['arx'], transform: 'none' });
    const exact = r.ranking.filter((c) => /exact fit/.test(c.reason ?? ''));
    expect(exact.length).toBeGreaterThan(0);
    expect(exact.every((c) => (c.spec as unknown as ArxSpec).inputs.some((i) => i.delay === 0))).toBe(true);
    expect(Number.isFinite(r.winner.result.aicc)).toBe(true);
    expect(specOf(r).inputs.every((i) => i.delay > 0)).toBe(true);
  });

  it('refuses log for a series with values ≤ 0 and unknown inputs or families', () => {
    const s = makeSeries(noise(50, 1, 76));
    expect(() => search(s, { transform: 'log' })).toThrow(/strictly positive/);
    expect(() => search(s, { inputs: ['nope'] })).toThrow(/input "nope"/);
    expect(() => search(s, { families: ['nope'] })).toThrow(/unknown model family/);
  });

  it('warns when the winner leaves autocorrelated residuals (AR(1) data, no AR lags allowed)', () => {
    const y = simulateArx({ n: 150, c: 0, a: [0.8], e: noise(200, 1, 77) });
    const r = search(makeSeries(y, {}, { frequency: 'index', season: null }), { families: ['arx'], maxAr: 0, trend: 'off' });
    expect(r.winner.whiteness.white).toBe(false);
    expect(r.warnings.some((w) => /not white/.test(w))).toBe(true);
  });
});
