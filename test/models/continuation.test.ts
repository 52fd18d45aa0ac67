/**
 * Continuation on a later window: a structure given observations [from, n) of a series, with
 * `before = {count: from, sum: Σ y_[0, from)}`, must form the same regression rows, one-step
 * predictions and simulations as on the whole series, for the same time stamps. Expected values
 * come from the same structure on the full series (an identity, not a stored number).
 */
import { describe, expect, it } from 'vitest';
import { sliceSeries, type Series } from '../../src/data/series.js';
import { ArxStructure } from '../../src/models/arx.js';
import { odeStructure } from '../../src/models/ode.js';
import type { Structure } from '../../src/models/structure.js';
import { makeSeries, noise } from './arx-fixtures.js';

/** 150 monthly points: level with trend, yearly pattern and an input, all positive. */
function fullSeries(): Series {
  const n = 150;
  const e = noise(n, 0.3, 11);
  const u = noise(n, 1, 12);
  const y = new Float64Array(n);
  for (let t = 0; t < n; t++) y[t] = 20 + 0.05 * t + 2 * Math.sin((2 * Math.PI * t) / 12) + 0.8 * u[t] + e[t];
  return makeSeries(y, { price: u });
}

function compare(structure: Structure, full: Series, from: number, theta: Float64Array, tol: number): void {
  const n = full.values.length;
  const win = sliceSeries(full, from, n);
  expect(win.before).toEqual({ count: from, sum: expect.any(Number) });
  const a = structure.regression(full, from + structure.history, n);
  const b = structure.regression(win, structure.history, n - from);
  expect(b.y.length).toBe(a.y.length);
  expect(Array.from(b.index, (t) => t + from)).toEqual(Array.from(a.index));
  for (let r = 0; r < a.y.length; r++) {
    expect(Math.abs(b.y[r] - a.y[r])).toBeLessThanOrEqual(tol * Math.max(1, Math.abs(a.y[r])));
    for (let j = 0; j < a.phi.cols; j++) {
      const x = a.phi.data[r * a.phi.cols + j];
      expect(Math.abs(b.phi.data[r * b.phi.cols + j] - x)).toBeLessThanOrEqual(tol * Math.max(1, Math.abs(x)));
    }
  }
  const pa = structure.oneStep(theta, full, from + structure.history, n);
  const pb = structure.oneStep(theta, win, structure.history, n - from);
  expect(pb.length).toBe(pa.length);
  for (let i = 0; i < pa.length; i++) expect(Math.abs(pb[i] - pa[i])).toBeLessThanOrEqual(tol * Math.max(1, Math.abs(pa[i])));
  const future = [Float64Array.from({ length: 12 }, (_, j) => Math.cos(j))];
  const sa = structure.simulate(theta, full, future, 12);
  const sb = structure.simulate(theta, win, future, 12);
  for (let j = 0; j < 12; j++) expect(Math.abs(sb[j] - sa[j])).toBeLessThanOrEqual(tol * Math.max(1, Math.abs(sa[j])));
}

describe('structures continue on a window with series.before', () => {
  it('ARX with an input, trend and two harmonics: rows, oneStep and simulate on observations 60…149 equal those on the full series', () => {
    const full = fullSeries();
    const s = new ArxStructure({
      family: 'arx',
      ar: 1,
      inputs: [{ name: 'price', lags: 1, delay: 0 }],
      trend: true,
      harmonics: 2,
      season: 12,
      seasonalLag: false,
      differencing: 'none',
      transform: 'none',
    });
    const theta = s.estimate(full, s.history, 150).theta;
    // the trend column at window position 0 is the absolute count 60, not 0
    const row = s.regression(sliceSeries(full, 60, 150), 1, 2);
    expect(row.phi.data[s.terms.indexOf('trend')]).toBe(61);
    compare(s, full, 60, theta, 0);
  });

  it('ARX in first differences with a trend: same rows on a window (a shifted trend would change every row)', () => {
    const full = fullSeries();
    const s = new ArxStructure({ family: 'arx', ar: 2, inputs: [], trend: true, harmonics: 1, season: 12, seasonalLag: false, differencing: 'first', transform: 'log' });
    const theta = s.estimate(full, s.history, 150).theta;
    compare(s, full, 37, theta, 0);
  });

  it('ODE in the level with an input and one harmonic: τ continues from the count before the window', () => {
    const full = fullSeries();
    const s = odeStructure({ powers: [0, 1], inputs: ['price'], harmonics: 1, season: 12 });
    const theta = s.estimate(full, 1, 150).theta;
    compare(s, full, 50, theta, 1e-12);
  });

  it('ODE in the cumulative sum (Bass-type) with a harmonic: the state starts from initialCumulative + before.sum', () => {
    const full = fullSeries();
    const s = odeStructure({ state: 'cumulative', powers: [0, 1, 2], harmonics: 1, season: 12, initialCumulative: 250 });
    const theta = s.estimate(full, 1, 150).theta;
    // summation order differs (X₀ + Σ before, then the window), so agreement to rounding
    compare(s, full, 80, theta, 1e-12);
  });

  it('Bass-type diffusion: the derived peak date is the same from a later window as from the whole series', () => {
    // Closed-form Bass adoption (Bass 1969), p = 0.03, q = 0.38, m = 10,000, noise-free, 60 months.
    const p = 0.03;
    const q = 0.38;
    const F = (t: number) => (1 - Math.exp(-(p + q) * t)) / (1 + (q / p) * Math.exp(-(p + q) * t));
    const y = Float64Array.from({ length: 60 }, (_, t) => 10_000 * (F(t + 1) - F(t)));
    const full = makeSeries(y, {});
    const s = odeStructure({ state: 'cumulative', powers: [0, 1, 2] });
    const theta = s.estimate(full, 1, 60).theta;
    const peak = (series: Series) => s.derived(theta, series).find((d) => d.name === 'peak date')?.value;
    expect(peak(full)).toBeDefined();
    expect(peak(sliceSeries(full, 20, 60))).toBe(peak(full));
  });
});

