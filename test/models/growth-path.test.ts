import { describe, expect, it } from 'vitest';
import { PathStructure, pathCandidates, validatePathSpec } from '../../src/models/growth-path.js';
import { structureFromSpec } from '../../src/models/registry.js';
import { lstsq } from '../../src/linalg/lstsq.js';
import { Learner } from '../../src/forecast/online.js';
import { UsageError } from '../../src/data/errors.js';
import type { CandidateBounds } from '../../src/models/registry.js';
import { makeSeries, noise } from './arx-fixtures.js';

/** Truth: y_t = K/(1 + e^{−r(t − m)})·(1 + a·sin(2πt/12) + c·cos(2πt/12)) + b·u_t (Verhulst 1838 closed form). */
const K = 500;
const R = 0.1;
const MID = 45;
const A = 0.15;
const C = -0.05;
const B = 30;

function truthPath(t: number, u: number): number {
  const w = (2 * Math.PI * t) / 12;
  return (K / (1 + Math.exp(-R * (t - MID)))) * (1 + A * Math.sin(w) + C * Math.cos(w)) + B * u;
}

const n = 100;
const step = Float64Array.from({ length: n + 12 }, (_, t) => (t >= 60 ? 1 : 0));
const e = noise(n, 4, 5);

function series(sd: number) {
  const y = Array.from({ length: n }, (_, t) => truthPath(t, step[t]) + (sd > 0 ? (e[t] * sd) / 4 : 0));
  return makeSeries(y, { subsidy: step.slice(0, n) });
}

const structure = () => new PathStructure({ family: 'path', law: 'logistic', inputs: ['subsidy'], harmonics: 1, season: 12, dt: 1, periodsPerYear: 12 });

describe('PathStructure: the logistic growth path with a level input and a seasonal factor', () => {
  it('names θ as the equation does and writes the fitted equation', () => {
    const s = structure();
    expect(s.terms).toEqual(['K', 'r', 't_mid', 'sin(2π·1·t/12)', 'cos(2π·1·t/12)', 'subsidy']);
    expect(s.key).toBe('path:logistic:lvl(subsidy):h1');
    expect(s.label).toBe('logistic growth path, level effect of subsidy, 1 seasonal harmonic');
    expect(s.describe(Float64Array.of(K, R, MID, A, C, B))).toBe('y[t] = 500/(1 + exp(−0.1·(t − 45)))·(1 + 0.15·sin(2π·1·t/12) − 0.05·cos(2π·1·t/12)) + 30·subsidy[t] + e[t]');
  });

  it('recovers every coefficient of a noise-free path within 1e-6 (the model is exact)', () => {
    const s = structure();
    const est = s.estimate(series(0), 0, n);
    const truth = [K, R, MID, A, C, B];
    truth.forEach((v, j) => expect(Math.abs(est.theta[j] / v - 1)).toBeLessThan(1e-6));
  });

  it('with noise of sd 4 recovers K, r and the midpoint within 5 % and the subsidy gain within 10 %, and its one-step predictions are the path itself', () => {
    const s = structure();
    const data = series(4);
    const est = s.estimate(data, 0, n);
    expect(Math.abs(est.theta[0] / K - 1)).toBeLessThan(0.05);
    expect(Math.abs(est.theta[1] / R - 1)).toBeLessThan(0.05);
    expect(Math.abs(est.theta[2] / MID - 1)).toBeLessThan(0.05);
    expect(Math.abs(est.theta[5] / B - 1)).toBeLessThan(0.1);
    const pred = s.oneStep(est.theta, data, 10, n);
    for (let t = 10; t < n; t++) expect(pred[t - 10]).toBeCloseTo((est.oneStep as Float64Array)[t], 9);
    const d = s.derived(est.theta, data);
    expect(d.find((x) => x.name === 'gain subsidy')?.value).toBe(est.theta[5]);
    expect(d.find((x) => x.name === 'delay subsidy')?.value).toBe(0);
    expect(d.find((x) => x.name === 'midpoint')?.value).toBe('2003-10'); // t = 45 from 2000-01
  });

  it('Gauss–Newton rows: Φ is the Jacobian (central differences, 1e-6 relative) and least squares at the estimate returns it', () => {
    const s = structure();
    const data = series(4);
    const est = s.estimate(data, 0, n);
    const reg = s.regression(data, 0, n, est.theta);
    const p = s.terms.length;
    for (let j = 0; j < p; j++) {
      const h = 1e-6 * Math.max(1, Math.abs(est.theta[j]));
      const up = est.theta.slice();
      const down = est.theta.slice();
      up[j] += h;
      down[j] -= h;
      const a = s.oneStep(up, data, 0, n);
      const b = s.oneStep(down, data, 0, n);
      for (const t of [5, 50, 95]) {
        const fd = (a[t] - b[t]) / (2 * h);
        expect(Math.abs(reg.phi.data[t * p + j] - fd)).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(fd)));
      }
    }
    const again = lstsq(reg.phi, reg.y, s.terms);
    again.theta.forEach((v, j) => expect(Math.abs(v - est.theta[j])).toBeLessThanOrEqual(1e-7 * Math.max(1, Math.abs(est.theta[j]))));
  });

  it('simulate continues the path with the future inputs and adds shocks without carrying them on', () => {
    const s = structure();
    const theta = Float64Array.of(K, R, MID, A, C, B);
    const data = series(0);
    const future = [Float64Array.of(1, 0, 1)];
    const sim = s.simulate(theta, data, future, 3);
    [1, 0, 1].forEach((u, j) => expect(sim[j]).toBeCloseTo(truthPath(n + j, u), 9));
    const shocked = s.simulate(theta, data, future, 3, Float64Array.of(5, 0, 0));
    expect(shocked[0] - sim[0]).toBeCloseTo(5, 9);
    expect(shocked[1]).toBeCloseTo(sim[1], 9);
  });

  it('online learning starts at the batch fit and learns new rows by recursive Gauss–Newton steps', () => {
    const s = structure();
    const data = series(4);
    const head = { ...data, values: data.values.slice(0, 80), time: data.time.slice(0, 80), inputs: [{ name: 'subsidy', values: data.inputs[0].values.slice(0, 80) }] };
    const batch = s.estimate(head, 0, 80);
    const learner = Learner.start(s, batch.active, head, 0, 80);
    learner.theta.forEach((v, j) => expect(Math.abs(v - batch.theta[j])).toBeLessThanOrEqual(1e-7 * Math.max(1, Math.abs(batch.theta[j]))));
    const steps = learner.learn(data);
    expect(steps.map((x) => x.t)).toEqual(Array.from({ length: 20 }, (_, i) => 80 + i));
    const refit = s.estimate(data, 0, n);
    expect(Math.abs(learner.theta[5] / refit.theta[5] - 1)).toBeLessThan(0.05);
    expect(Math.abs(learner.theta[0] / refit.theta[0] - 1)).toBeLessThan(0.01);
  });

  it('rebuilds from its spec through the registry; a bad spec is a UsageError naming the field', () => {
    const s = structure();
    expect(structureFromSpec(JSON.parse(JSON.stringify(s.spec))).key).toBe(s.key);
    expect(() => validatePathSpec({ ...s.spec, law: 'gompertz' })).toThrow(UsageError);
    expect(() => validatePathSpec({ ...s.spec, law: 'gompertz' })).toThrow(/"law"/);
    expect(() => validatePathSpec({ ...s.spec, harmonics: 7 })).toThrow(/"harmonics"/);
  });
});

describe('pathCandidates(series, bounds)', () => {
  const bounds: CandidateBounds = {
    maxAr: 1, maxInputLags: 2, maxDelay: 2, inputs: ['subsidy'], harmonics: [0, 1, 2], season: 12,
    transforms: ['none', 'log'], trend: [false, true], seasonalLag: [false], differencing: ['none'],
  };

  it('offers the path with the inputs on the level for each number of harmonics, only when the search may use inputs', () => {
    const data = series(4);
    expect(pathCandidates(data, bounds).map((s) => s.key)).toEqual(['path:logistic:lvl(subsidy)', 'path:logistic:lvl(subsidy):h1', 'path:logistic:lvl(subsidy):h2']);
    expect(pathCandidates(data, { ...bounds, inputs: [] })).toEqual([]);
    expect(pathCandidates(data, { ...bounds, maxInputLags: 0 })).toEqual([]);
    expect(pathCandidates(data, { ...bounds, transforms: ['log'] })).toEqual([]);
  });
});
