import { describe, expect, it } from 'vitest';
import type { Series } from '../../src/data/series.js';
import { ModelError, UsageError } from '../../src/data/errors.js';
import { odeCandidates, odeDynamicMask, odeFamily, odeFromSpec, odeStable, odeStructure, samplingInterval } from '../../src/models/ode.js';
import { structureFromSpec, type CandidateBounds } from '../../src/models/registry.js';
import type { Derived, Structure } from '../../src/models/structure.js';
import { deterministicNames } from '../../src/models/terms.js';

/** A monthly series starting 2000-01 (optionally with inputs). */
function monthly(values: ArrayLike<number>, inputs: Record<string, ArrayLike<number>> = {}): Series {
  const n = values.length;
  return {
    name: 'test',
    frequency: 'monthly',
    season: 12,
    time: Float64Array.from({ length: n }, (_, i) => Date.UTC(2000, i, 1)),
    values: Float64Array.from(values),
    inputs: Object.entries(inputs).map(([name, v]) => ({ name, values: Float64Array.from(v) })),
  };
}

/** An index series 0, 1, 2, ... */
function indexed(values: ArrayLike<number>): Series {
  return { name: 'idx', frequency: 'index', season: null, time: Float64Array.from({ length: values.length }, (_, i) => i), values: Float64Array.from(values), inputs: [] };
}

function value(d: Derived[], name: string): number {
  const item = d.find((x) => x.name === name);
  if (!item) throw new Error(`no derived quantity "${name}" in ${d.map((x) => x.name).join(', ')}`);
  return item.value as number;
}

const bounds = (over: Partial<CandidateBounds> = {}): CandidateBounds => ({
  maxAr: 2,
  maxInputLags: 1,
  maxDelay: 0,
  inputs: [],
  harmonics: [0],
  season: null,
  transforms: ['none'],
  trend: [false],
  seasonalLag: [false],
  differencing: ['none'],
  ...over,
});

describe('odeStructure: terms, key, label', () => {
  it('names terms readably in θ order: powers, inputs, harmonics', () => {
    const s = odeStructure({ powers: [0, 1, 2], inputs: ['price'], harmonics: 1, season: 12 });
    expect(s.terms).toEqual(['1', 'y', 'y^2', 'price', 'sin(2π·1·t/12)', 'cos(2π·1·t/12)']);
    expect(s.key).toBe('ode:level:deg2+c:in(price):h1');
    expect(s.family).toBe('ode');
    expect(s.history).toBe(1);
  });

  it('uses X for the cumulative state and readable labels for the classical shapes', () => {
    const bass = odeStructure({ state: 'cumulative', powers: [0, 1, 2] });
    expect(bass.terms).toEqual(['1', 'X', 'X^2']);
    expect(bass.key).toBe('ode:cumulative:deg2+c');
    expect(bass.label).toBe('ODE in cumulative sum, quadratic (Bass-type diffusion)');
    expect(odeStructure({ powers: [1, 2] }).label).toBe('ODE in level, quadratic (logistic-type)');
    expect(odeStructure({ powers: [1] }).key).toBe('ode:level:deg1');
    expect(odeStructure({ powers: [1], transform: 'log' }).key).toBe('ode:level:deg1:log');
    expect(odeStructure({ powers: [0, 2] }).key).toBe('ode:level:pow02');
  });
});

describe('regression(series, from, to): trapezoid integral rows', () => {
  it('level state, y = 1, 2, 4: rows Δy_t = ½(φ(y_{t−1}) + φ(y_t)) written out by hand', () => {
    const s = odeStructure({ powers: [0, 1, 2] });
    const r = s.regression(indexed([1, 2, 4]), 0, 3);
    expect(Array.from(r.index)).toEqual([1, 2]);
    expect(Array.from(r.y)).toEqual([1, 2]);
    // t = 1: ½·[1+1, 1+2, 1+4] = [1, 1.5, 2.5]; t = 2: ½·[2, 2+4, 4+16] = [1, 3, 10]
    expect(Array.from(r.phi.data)).toEqual([1, 1.5, 2.5, 1, 3, 10]);
  });

  it('cumulative state, y = 1, 2, 4 → X = 1, 3, 7: targets are the per-period values', () => {
    const s = odeStructure({ state: 'cumulative', powers: [0, 1, 2] });
    const r = s.regression(indexed([1, 2, 4]), 1, 3);
    expect(Array.from(r.y)).toEqual([2, 4]);
    // t = 1: ½·[2, 1+3, 1+9] = [1, 2, 5]; t = 2: ½·[2, 3+7, 9+49] = [1, 5, 29]
    expect(Array.from(r.phi.data)).toEqual([1, 2, 5, 1, 5, 29]);
  });

  it('scales rows by the sampling interval read from the time stamps (decennial yearly stamps → dt = 10)', () => {
    const series: Series = {
      name: 'decades',
      frequency: 'yearly',
      season: null,
      time: Float64Array.from([1900, 1910, 1920], (y) => Date.UTC(y, 0, 1)),
      values: Float64Array.from([1, 2, 4]),
      inputs: [],
    };
    expect(samplingInterval(series)).toBe(10);
    const r = odeStructure({ powers: [0, 1, 2] }).regression(series, 0, 3);
    expect(Array.from(r.phi.data)).toEqual([10, 15, 25, 10, 30, 100]);
    // an explicit dt in the spec overrides the stamps
    const r1 = odeStructure({ powers: [0, 1, 2], dt: 1 }).regression(series, 0, 3);
    expect(Array.from(r1.phi.data)).toEqual([1, 1.5, 2.5, 1, 3, 10]);
  });
});

describe('regression: harmonic columns', () => {
  /** Composite Simpson rule with 2000 panels: an independent numerical integral. */
  const simpson = (f: (x: number) => number, a: number, b: number): number => {
    const m = 2000;
    const h = (b - a) / m;
    let sum = f(a) + f(b);
    for (let i = 1; i < m; i++) sum += (i % 2 === 1 ? 4 : 2) * f(a + i * h);
    return (sum * h) / 3;
  };

  it('are the exact integrals of the harmonics over each sampling interval (checked by Simpson quadrature)', () => {
    const s = odeStructure({ powers: [1], harmonics: 6, season: 12 });
    const r = s.regression(monthly(Array.from({ length: 20 }, (_, t) => t + 1)), 1, 20);
    // Discrete-time names (terms.ts) for k < s/2; at k = s/2 the ODE keeps the sine (see ode.ts).
    const names = deterministicNames({ intercept: false, trend: false, harmonics: 5, season: 12 });
    expect(s.terms.slice(1)).toEqual([...names, 'sin(2π·6·t/12)']);
    const fns = s.terms.slice(1).map((name) => {
      const [, kind, k] = /^(sin|cos)\(2π·(\d+)·t\/12\)$/.exec(name) as RegExpExecArray;
      const w = (2 * Math.PI * Number(k)) / 12;
      return (x: number) => (kind === 'sin' ? Math.sin(w * x) : Math.cos(w * x));
    });
    for (let row = 0; row < r.phi.rows; row++) {
      const t = r.index[row];
      fns.forEach((f, c) => expect(r.phi.data[row * 12 + 1 + c]).toBeCloseTo(simpson(f, t - 1, t), 10));
    }
  });

  // Analytic identity: ∫_{t−1}^{t} sin(πτ) dτ = 2·(−1)^{t−1}/π, while ∫ cos(πτ) dτ = 0 at every
  // whole t, so only the sine can carry a quarterly series' alternating half-year pattern.
  it('identify the half-season term of a quarterly series, which alternates ±2/π', () => {
    const values = Array.from({ length: 12 }, (_, t) => 10 + (t % 2) + 0.1 * t);
    const quarterly: Series = { ...monthly(values), frequency: 'quarterly', season: 4, time: Float64Array.from(values, (_, i) => Date.UTC(2000, 3 * i, 1)) };
    const s = odeStructure({ powers: [0, 1], harmonics: 2, season: 4, selection: 'dense' });
    expect(s.terms.slice(2)).toEqual(['sin(2π·1·t/4)', 'cos(2π·1·t/4)', 'sin(2π·2·t/4)']);
    const r = s.regression(quarterly, 1, 12);
    for (let row = 0; row < r.phi.rows; row++) {
      const t = r.index[row];
      expect(r.phi.data[row * 5 + 4]).toBeCloseTo((2 * (-1) ** (t - 1)) / Math.PI, 12);
    }
    expect(() => s.estimate(quarterly, 1, 12)).not.toThrow();
  });
});

describe('estimate: recovery of known equations', () => {
  it('exponential growth y = 100·e^{0.05t}: the trapezoid fixed point r̂ = 2·tanh(r/2) exactly (analytic)', () => {
    // Trapezoid row for y = y0·e^{rt}: y_t − y_{t−1} = r̂·(y_{t−1} + y_t)/2 ⇒ r̂ = 2(e^r − 1)/(e^r + 1) = 2·tanh(r/2).
    const y = Array.from({ length: 30 }, (_, t) => 100 * Math.exp(0.05 * t));
    const s = odeStructure({ powers: [1], selection: 'dense' });
    const e = s.estimate(monthly(y), 1, 30);
    expect(e.theta[0]).toBeCloseTo(2 * Math.tanh(0.025), 12);
  });

  it('noise-free logistic sample (closed form K/(1 + ((K − y0)/y0)·e^{−rt}), Verhulst 1838) recovers K and r within 1 %', () => {
    const K = 500;
    const r = 0.2;
    const y0 = 5;
    const y = Array.from({ length: 60 }, (_, t) => K / (1 + ((K - y0) / y0) * Math.exp(-r * t)));
    for (const selection of ['dense', 'sparse'] as const) {
      const s = odeStructure({ powers: [1, 2], selection, periodsPerYear: 12 });
      const series = monthly(y);
      const e = s.estimate(series, 1, 60);
      const d = s.derived(e.theta, series);
      expect(Math.abs(value(d, 'capacity K') / K - 1)).toBeLessThan(0.01);
      expect(Math.abs(value(d, 'rate r') / r - 1)).toBeLessThan(0.01);
      expect(value(d, 'rate r per year')).toBeCloseTo(12 * value(d, 'rate r'), 12);
    }
  });

  it('forced linear relaxation dy/dt = a + b·y + c·u with a step input recovers equilibrium −a/b, time constant −1/b and gain −c/b within 1 %', () => {
    // a = 2, b = −0.2, c = 1.5: equilibrium 10, time constant 5 periods, gain 7.5.
    // Data: the exact solution of the linear ODE (variation of constants) with u linearly
    // interpolated between samples, u = 0 up to t = 19 and 1 from t = 20 on.
    const a = 2;
    const b = -0.2;
    const c = 1.5;
    const n = 60;
    const u = Array.from({ length: n }, (_, t) => (t >= 20 ? 1 : 0));
    const y = new Array<number>(n);
    y[0] = 4;
    for (let t = 1; t < n; t++) {
      // On [t−1, t]: y' = b·y + (a + c·u0) + c·s·τ, s = u_t − u_{t−1}; particular y_p = α + βτ with
      // β = −c·s/b, α = (β − a − c·u0)/b; y(1) = y_p(1) + (y_{t−1} − α)·e^{b}.
      const u0 = u[t - 1];
      const slope = u[t] - u[t - 1];
      const beta = (-c * slope) / b;
      const alpha = (beta - a - c * u0) / b;
      y[t] = alpha + beta + (y[t - 1] - alpha) * Math.exp(b);
    }
    const series = monthly(y, { promo: u });
    const s = odeStructure({ powers: [0, 1], inputs: ['promo'], selection: 'dense', periodsPerYear: 12 });
    const e = s.estimate(series, 1, n);
    const d = s.derived(e.theta, series);
    expect(Math.abs(value(d, 'equilibrium') / 10 - 1)).toBeLessThan(0.01);
    expect(Math.abs(value(d, 'time constant') / 5 - 1)).toBeLessThan(0.01);
    expect(Math.abs(value(d, 'gain promo') / 7.5 - 1)).toBeLessThan(0.01);
    expect(d.find((x) => x.name === 'stable')?.value).toBe(true);
    expect(value(d, 'time constant in years')).toBeCloseTo(value(d, 'time constant') / 12, 12);
  });

  it('seasonally forced relaxation: the harmonic amplitude is recovered within 5 % (the state enters by the trapezoid rule, the harmonics exactly)', () => {
    // y' = a + b·y + A·sin ωt + B·cos ωt has the periodic solution a_p + P sin ωt + Q cos ωt with
    // a_p = −a/b, Q = −(b·B + A·ω)/(ω² + b²), P = (b·Q + B)/ω; plus (y0 − a_p − Q)·e^{bt}.
    const a = 5;
    const b = -0.3;
    const A = 2;
    const B = -1;
    const w = (2 * Math.PI) / 12;
    const Q = -(b * B + A * w) / (w * w + b * b);
    const P = (b * Q + B) / w;
    const ap = -a / b;
    const y = Array.from({ length: 96 }, (_, t) => ap + P * Math.sin(w * t) + Q * Math.cos(w * t) + (10 - ap - Q) * Math.exp(b * t));
    const s = odeStructure({ powers: [0, 1], harmonics: 1, season: 12, selection: 'dense' });
    const e = s.estimate(monthly(y), 1, 96);
    expect(Math.abs(e.theta[1] / b - 1)).toBeLessThan(0.02);
    expect(Math.abs(Math.hypot(e.theta[2], e.theta[3]) / Math.hypot(A, B) - 1)).toBeLessThan(0.05);
  });
});

describe('simulate and oneStep', () => {
  it('simulate follows the logistic closed form y(t) = K/(1 + ((K − y0)/y0)·e^{−rt}) (Verhulst 1838): 1e-7 with 8 substeps, 1e-10 with 64', () => {
    const K = 1000;
    const r = 0.3;
    const theta = Float64Array.of(r, -r / K);
    for (const [substeps, tol] of [[8, 1e-7], [64, 1e-10]]) {
      const s = odeStructure({ powers: [1, 2], dt: 1, substeps });
      const path = s.simulate(theta, indexed([10]), [], 40);
      for (let h = 1; h <= 40; h++) {
        const exact = K / (1 + ((K - 10) / 10) * Math.exp(-r * h));
        expect(Math.abs(path[h - 1] / exact - 1)).toBeLessThan(tol);
      }
    }
  });

  it('oneStep at t equals simulate one step from the series cut at t − 1 (cumulative state, input, harmonics)', () => {
    const n = 30;
    const y = Array.from({ length: n }, (_, t) => 50 + 10 * Math.sin(t) + t);
    const u = Array.from({ length: n }, (_, t) => Math.cos(0.7 * t));
    const series = monthly(y, { price: u, other: u.map((v) => 2 * v) });
    const s = odeStructure({ state: 'cumulative', powers: [0, 1, 2], inputs: ['price'], harmonics: 1, season: 12, dt: 1 });
    const theta = Float64Array.of(40, 0.05, -2e-5, 3, 1.5, -0.5);
    const one = s.oneStep(theta, series, 1, n);
    for (const t of [1, 7, 18, 29]) {
      const cut: Series = { ...series, time: series.time.slice(0, t), values: series.values.slice(0, t), inputs: series.inputs.map((i) => ({ name: i.name, values: i.values.slice(0, t) })) };
      const future = series.inputs.map((i) => i.values.slice(t, t + 1));
      expect(s.simulate(theta, cut, future, 1)[0]).toBeCloseTo(one[t - 1], 10);
    }
  });

  it('raises the RK4 step count for fast dynamics: dy/dt = 150 − 30·y from 0 reaches 5·(1 − e^{−30t}) (analytic), not an RK4 blow-up', () => {
    const s = odeStructure({ powers: [0, 1], dt: 1, substeps: 8 });
    const path = s.simulate(Float64Array.of(150, -30), indexed([0]), [], 3);
    for (let h = 1; h <= 3; h++) expect(path[h - 1]).toBeCloseTo(5 * (1 - Math.exp(-30 * h)), 6);
  });

  it('simulate adds each shock to the one-step prediction and continues from the shocked value', () => {
    const s = odeStructure({ powers: [0, 1] });
    const theta = Float64Array.of(1, -0.1);
    const series = indexed([3, 4, 5]);
    const shocks = Float64Array.of(0.5, -0.25);
    const path = s.simulate(theta, series, [], 2, shocks);
    const first = s.oneStep(theta, indexed([3, 4, 5, 0]), 3, 4)[0] + 0.5;
    expect(path[0]).toBeCloseTo(first, 12);
    const second = s.oneStep(theta, indexed([3, 4, 5, first, 0]), 4, 5)[0] - 0.25;
    expect(path[1]).toBeCloseTo(second, 12);
  });

  it('log scoring scale: oneStep returns ln of the level prediction', () => {
    const series = monthly([10, 12, 15, 17, 20]);
    const plain = odeStructure({ powers: [1, 2] });
    const logged = odeStructure({ powers: [1, 2], transform: 'log' });
    const theta = Float64Array.of(0.2, -0.004);
    const a = plain.oneStep(theta, series, 1, 5);
    const b = logged.oneStep(theta, series, 1, 5);
    for (let i = 0; i < 4; i++) expect(b[i]).toBeCloseTo(Math.log(a[i]), 12);
  });

  it('refuses too few future input values', () => {
    const s = odeStructure({ powers: [0, 1], inputs: ['price'] });
    const series = monthly([1, 2, 3], { price: [1, 1, 1] });
    expect(() => s.simulate(Float64Array.of(0, -0.1, 1), series, [Float64Array.of(1)], 3)).toThrow(UsageError);
  });
});

describe('describe and derived', () => {
  it('writes the logistic equation with K and r per year', () => {
    const s = odeStructure({ powers: [1, 2], periodsPerYear: 1 });
    expect(s.describe(Float64Array.of(0.0313, -1.59e-10))).toBe('dy/dt = 0.0313·y − 1.59e-10·y²   (K = 197 million, r = 0.0313 per year)');
  });

  it('writes standard errors beside coefficients and omits terms switched off', () => {
    const s = odeStructure({ powers: [0, 1, 2] });
    expect(s.describe(Float64Array.of(0, 0.5, -0.001), Float64Array.of(0, 0.01, 0.0001))).toBe(
      'dy/dt = (0.5 ± 0.01)·y − (0.001 ± 1.00e-4)·y²   (K = 500, r = 0.5 per period)',
    );
  });

  it('Bass reading of θ = (p·m, q − p, −q/m) for p = 0.03, q = 0.38, m = 10000 (Bass 1969): p, q, m and peak t* = ln(q/p)/(p + q)', () => {
    const p = 0.03;
    const q = 0.38;
    const m = 10000;
    const s = odeStructure({ state: 'cumulative', powers: [0, 1, 2], periodsPerYear: 12 });
    const series = monthly([300, 400, 500]);
    const d = s.derived(Float64Array.of(p * m, q - p, -q / m), series);
    expect(value(d, 'innovation p')).toBeCloseTo(p, 12);
    expect(value(d, 'imitation q')).toBeCloseTo(q, 12);
    expect(value(d, 'market size m')).toBeCloseTo(m, 8);
    // ln(0.38/0.03)/0.41 = ln(12.6667)/0.41 = 2.53897/0.41 = 6.19261 periods
    expect(value(d, 'peak time since launch')).toBeCloseTo(Math.log(q / p) / (p + q), 10);
    expect(value(d, 'peak adoption per period')).toBeCloseTo((m * (p + q) ** 2) / (4 * q), 8);
    // launch at the start of 2000-01, peak 6.19 months later
    expect(d.find((x) => x.name === 'peak date')?.value).toBe('2000-07');
    expect(s.describe(Float64Array.of(p * m, q - p, -q / m))).toBe('dX/dt = 300 + 0.35·X − 3.80e-5·X²   (X = cumulative y; p = 0.03, q = 0.38, m = 10000)');
  });

  it('warns about an implausible capacity (negative K) and about K below the data', () => {
    const s = odeStructure({ powers: [1, 2] });
    const series = monthly([10, 20, 30]);
    const neg = s.derived(Float64Array.of(0.1, 0.001), series).filter((x) => x.name === 'warning');
    expect(neg.some((w) => String(w.value).includes('implausible capacity'))).toBe(true);
    const low = s.derived(Float64Array.of(0.1, -0.01), series).filter((x) => x.name === 'warning');
    expect(low.some((w) => String(w.value).includes('below the largest observed level'))).toBe(true);
  });

  it('reports equilibria with stability for a cubic: dy/dt = −y(y − 1)(y − 3) = −3y + 4y² − y³ (roots 0, 1, 3)', () => {
    const s = odeStructure({ powers: [1, 2, 3] });
    const d = s.derived(Float64Array.of(-3, 4, -1), monthly([1, 2, 3]));
    expect(value(d, 'equilibrium 1')).toBeCloseTo(0, 10);
    expect(value(d, 'equilibrium 2')).toBeCloseTo(1, 10);
    expect(value(d, 'equilibrium 3')).toBeCloseTo(3, 10);
    // f'(y) = −3 + 8y − 3y²: f'(0) = −3 stable, f'(1) = 2 unstable, f'(3) = −6 stable
    expect(String(d.find((x) => x.name === 'equilibrium 1')?.note)).toMatch(/^stable/);
    expect(String(d.find((x) => x.name === 'equilibrium 2')?.note)).toMatch(/^unstable/);
    expect(value(d, 'capacity K')).toBeCloseTo(3, 10);
  });

  it('stability hook: finite-time blow-up is explosive, exponential growth and logistic are not', () => {
    expect(odeStable(odeStructure({ powers: [1, 2, 3] }), Float64Array.of(0.03, -1e-10, 1e-18))).toBe(false);
    expect(odeStable(odeStructure({ powers: [1, 2] }), Float64Array.of(0.03, -1e-10))).toBe(true);
    expect(odeStable(odeStructure({ powers: [1] }), Float64Array.of(0.03))).toBe(true);
    expect(odeDynamicMask(odeStructure({ powers: [0, 1, 2], inputs: ['u'] }))).toEqual([false, true, true, false]);
  });

  // Analytic: dy/dt = y² − 1 has equilibria −1 (f' = −2, stable) and +1 (f' = 2, unstable). From
  // y = 0 the state falls to −1; from y = 2 it rises with no equilibrium above and reaches +∞ at
  // t = ½·ln 3 (separation of variables), so a fit ending there is explosive.
  it('stability hook from the last state: runs away only when no equilibrium lies the way the state moves', () => {
    const s = odeStructure({ powers: [0, 2], selection: 'dense' });
    const theta = Float64Array.of(-1, 1);
    const at = (last: number) => ({ series: indexed([0.5, 0.3, last]), to: 3 });
    expect(odeStable(s, theta)).toBe(true);
    expect(odeStable(s, theta, at(0))).toBe(true);
    expect(odeStable(s, theta, at(-3))).toBe(true);
    expect(odeStable(s, theta, at(2))).toBe(false);
    // A growing cumulative state above both equilibria of a quadratic with positive X² term.
    const bass = odeStructure({ state: 'cumulative', powers: [0, 1, 2], dt: 1 });
    const grow = Float64Array.of(46.6, 0.0984, 1.19e-6);
    expect(odeStable(bass, grow)).toBe(true);
    expect(odeStable(bass, grow, { series: indexed([100, 200, 300]), to: 3 })).toBe(false);
    expect(odeFamily.unstableReason).toMatch(/finite time/);
  });
});

describe('spec round trip', () => {
  it('fromSpec(JSON of spec) rebuilds the same structure, also through the registry', () => {
    const s = odeStructure({ state: 'cumulative', powers: [0, 1, 2], inputs: ['price'], harmonics: 1, season: 12, transform: 'log', dt: 1, periodsPerYear: 12, substeps: 6, selection: 'dense', initialCumulative: 5 });
    const spec = JSON.parse(JSON.stringify(s.spec));
    for (const back of [odeFromSpec(spec), structureFromSpec(spec)]) {
      expect(back.key).toBe(s.key);
      expect(back.terms).toEqual(s.terms);
      expect(back.spec).toEqual(s.spec);
    }
  });

  it('a bad spec is a UsageError naming the field', () => {
    expect(() => odeFromSpec({ family: 'ode', state: 'level', powers: [4] })).toThrow(UsageError);
    expect(() => odeStructure({ powers: [1], harmonics: 2, season: null })).toThrow(/harmonics/);
  });
});

describe('bad input', () => {
  it('a series with negative values gets no cumulative-state candidate, and a cumulative structure refuses it with a reason', () => {
    const y = Array.from({ length: 20 }, (_, t) => Math.sin(t) * 10);
    const keys = odeCandidates(monthly(y), bounds()).map((s) => s.key);
    expect(keys.some((k) => k.includes('cumulative'))).toBe(false);
    expect(keys.length).toBeGreaterThan(0);
    const s = odeStructure({ state: 'cumulative', powers: [0, 1, 2] });
    try {
      s.estimate(monthly(y), 1, 20);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ModelError);
      expect((e as ModelError).code).toBe('negative-for-cumulative');
    }
  });

  it('a too-short series is a ModelError', () => {
    const s = odeStructure({ powers: [0, 1, 2] });
    expect(() => s.estimate(monthly([1, 2, 3]), 1, 3)).toThrow(ModelError);
    expect(() => samplingInterval(monthly([1]))).toThrow(ModelError);
  });

  it('unequal spacing is a ModelError, and such a series gets no ODE candidates', () => {
    const series: Series = { ...indexed([1, 2, 3, 4, 5, 6]), time: Float64Array.of(0, 1, 2, 4, 5, 6) };
    expect(() => samplingInterval(series)).toThrow(ModelError);
    expect(odeCandidates(series, bounds())).toEqual([]);
  });
});

describe('odeCandidates(series, bounds)', () => {
  it('offers level shapes, Bass-type diffusion for non-negative series, inputs and harmonics, in a fixed order', () => {
    const n = 48;
    const y = Array.from({ length: n }, (_, t) => 100 + t);
    const series = monthly(y, { price: Array.from({ length: n }, (_, t) => t % 5) });
    const keys = odeCandidates(series, bounds({ inputs: ['price'], harmonics: [0, 1], season: 12, transforms: ['none', 'log'] })).map((s: Structure) => s.key);
    expect(keys.slice(0, 5)).toEqual(['ode:level:deg1', 'ode:level:deg1+c', 'ode:level:deg1+c:h1', 'ode:level:deg1+c:in(price)', 'ode:level:deg1+c:in(price):h1']);
    expect(keys).toContain('ode:level:deg2');
    expect(keys).toContain('ode:cumulative:deg2+c');
    expect(keys).toContain('ode:cumulative:deg2+c:in(price):h1:log');
    expect(new Set(keys).size).toBe(keys.length);
    // deterministic
    expect(odeCandidates(series, bounds({ inputs: ['price'], harmonics: [0, 1], season: 12, transforms: ['none', 'log'] })).map((s) => s.key)).toEqual(keys);
  });

  it('leaves out log candidates for a series with a zero and candidates with too few increments', () => {
    const keys = odeCandidates(monthly([0, 1, 2, 3, 5]), bounds({ transforms: ['none', 'log'] })).map((s) => s.key);
    expect(keys.some((k) => k.endsWith(':log'))).toBe(false);
    // 4 increments: terms + 2 ≤ 4 allows at most 2 terms
    expect(keys).toEqual(['ode:level:deg1', 'ode:level:deg1+c', 'ode:level:deg2']);
  });
});
