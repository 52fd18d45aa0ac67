import { describe, expect, it } from 'vitest';
import { lstsq } from '../../src/linalg/lstsq.js';
import type { DesignMatrix } from '../../src/linalg/matrix.js';
import { createRng } from '../../src/linalg/random.js';
import { isSymmetricPositiveDefinite, Rls, type RlsStep } from '../../src/linalg/rls.js';
import { ModelError, StoreError, UsageError } from '../../src/data/errors.js';

function randomProblem(seed: number, n: number, p: number, noise = 0.1) {
  const rng = createRng(seed);
  const data = new Float64Array(n * p);
  const y = new Float64Array(n);
  const truth = Array.from({ length: p }, () => rng.normal());
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < p; j++) {
      const v = j === 0 ? 1 : rng.normal() * (j + 1);
      data[i * p + j] = v;
      s += v * truth[j];
    }
    y[i] = s + noise * rng.normal();
  }
  const names = Array.from({ length: p }, (_, j) => `x${j}`);
  return { phi: { rows: n, cols: p, data } as DesignMatrix, y, names, truth };
}

function head(m: DesignMatrix, rows: number): DesignMatrix {
  return { rows, cols: m.cols, data: m.data.slice(0, rows * m.cols) };
}

function maxRelDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let scale = 0;
  let diff = 0;
  for (let i = 0; i < a.length; i++) {
    scale = Math.max(scale, Math.abs(b[i]));
    diff = Math.max(diff, Math.abs(a[i] - b[i]));
  }
  return diff / scale;
}

describe('Rls with λ = 1 from a batch fit', () => {
  it('ends at the batch solution on all rows (θ, P and RSS) for several seeds', () => {
    // Invariant: RLS at λ = 1 is an exact rewriting of least squares (matrix inversion lemma).
    for (const [seed, n, p] of [[1, 120, 8], [2, 200, 3], [3, 60, 12], [4, 500, 20]]) {
      const { phi, y, names } = randomProblem(seed, n, p);
      const start = 2 * p + 5;
      const rls = Rls.fromFit(lstsq(head(phi, start), y.slice(0, start), names));
      for (let i = start; i < n; i++) rls.update(phi.data.subarray(i * p, (i + 1) * p), y[i]);
      const batch = lstsq(phi, y, names);
      expect(maxRelDiff(rls.theta, batch.theta)).toBeLessThan(1e-9);
      expect(maxRelDiff(rls.P, batch.xtxInv)).toBeLessThan(1e-9);
      expect(Math.abs(rls.rss - batch.rss) / batch.rss).toBeLessThan(1e-9);
      expect(Math.abs(rls.sigma2 - batch.sigma2) / batch.sigma2).toBeLessThan(1e-9);
    }
  });

  it('reports the innovation before the update and σ̂²(1 + φᵀPφ) as its variance', () => {
    const { phi, y, names } = randomProblem(5, 40, 3);
    const fit = lstsq(head(phi, 39), y.slice(0, 39), names);
    const rls = Rls.fromFit(fit);
    const row = phi.data.subarray(39 * 3, 40 * 3);
    const pred = rls.predict(row);
    // Independent: φᵀPφ from the batch (ΦᵀΦ)⁻¹ by plain summation.
    let q = 0;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) q += row[i] * fit.xtxInv[i * 3 + j] * row[j];
    const step = rls.update(row, y[39]);
    expect(step.prediction).toBe(pred);
    expect(step.innovation).toBeCloseTo(y[39] - pred, 14);
    expect(step.innovationVariance).toBeCloseTo(fit.sigma2 * (1 + q), 12);
    // Gain: K = Pφ/(1 + φᵀPφ).
    for (let i = 0; i < 3; i++) {
      let pf = 0;
      for (let j = 0; j < 3; j++) pf += fit.xtxInv[i * 3 + j] * row[j];
      expect(step.gain[i]).toBeCloseTo(pf / (1 + q), 12);
    }
  });

  it('writes into a supplied step object without replacing its gain array', () => {
    const { phi, y, names } = randomProblem(6, 30, 2);
    const rls = Rls.fromFit(lstsq(head(phi, 20), y.slice(0, 20), names));
    const out: RlsStep = { prediction: 0, innovation: 0, innovationVariance: 0, gain: new Float64Array(2) };
    const gain = out.gain;
    const r = rls.update(phi.data.subarray(40, 42), y[20], out);
    expect(r).toBe(out);
    expect(r.gain).toBe(gain);
    expect(rls.updates).toBe(1);
  });
});

describe('Rls forgetting', () => {
  // y = a + b·x + e, x ~ N(0, 1), e ~ N(0, 0.05²); (a, b) jumps from (1, 2) to (3, −1) at t = 200.
  function jumpData(seed: number) {
    const rng = createRng(seed);
    const rows: Float64Array[] = [];
    const ys: number[] = [];
    for (let t = 0; t < 400; t++) {
      const x = rng.normal();
      const [a, b] = t < 200 ? [1, 2] : [3, -1];
      rows.push(Float64Array.of(1, x));
      ys.push(a + b * x + 0.05 * rng.normal());
    }
    return { rows, ys };
  }
  function start(rows: Float64Array[], ys: number[], lambda: number) {
    const data = new Float64Array(100);
    rows.slice(0, 50).forEach((r, i) => data.set(r, 2 * i));
    return Rls.fromFit(lstsq({ rows: 50, cols: 2, data }, Float64Array.from(ys.slice(0, 50)), ['1', 'x']), { lambda });
  }

  it('with λ = 0.95 is within 0.05 of the new coefficients 100 steps after the jump, for 5 seeds', () => {
    // Memory 1/(1 − λ) = 20 rows: after 100 rows the old data keep weight 0.95¹⁰⁰ ≈ 0.0059, so the
    // leftover bias is about 0.0059·|jump| ≤ 0.018 (|Δb| = 3), plus noise of order 0.05/√20.
    for (let seed = 1; seed <= 5; seed++) {
      const { rows, ys } = jumpData(seed);
      const rls = start(rows, ys, 0.95);
      for (let t = 50; t < 300; t++) rls.update(rows[t], ys[t]);
      const th = rls.theta;
      expect(Math.abs(th[0] - 3)).toBeLessThan(0.05);
      expect(Math.abs(th[1] + 1)).toBeLessThan(0.05);
    }
  });

  it('with λ = 1 is still far from the new coefficients 100 steps after the jump', () => {
    // Without forgetting θ is the least-squares compromise over all 300 rows: ≈ (200·old + 100·new)/300,
    // i.e. a ≈ 1.67, b ≈ 1.0 — more than 1 away from (3, −1).
    for (let seed = 1; seed <= 5; seed++) {
      const { rows, ys } = jumpData(seed);
      const rls = start(rows, ys, 1);
      for (let t = 50; t < 300; t++) rls.update(rows[t], ys[t]);
      const th = rls.theta;
      expect(Math.abs(th[0] - 3)).toBeGreaterThan(1);
      expect(Math.abs(th[1] + 1)).toBeGreaterThan(1);
    }
  });

  it('keeps P symmetric positive definite and bounded with λ = 0.9 and constant regressors over 10,000 steps', () => {
    const { phi, y, names } = randomProblem(7, 50, 4);
    const rls = Rls.fromFit(lstsq(phi, y, names), { lambda: 0.9 });
    const constant = Float64Array.of(1, 0.5, -0.25, 2);
    const out: RlsStep = { prediction: 0, innovation: 0, innovationVariance: 0, gain: new Float64Array(4) };
    let maxTrace = 0;
    for (let t = 0; t < 10_000; t++) {
      rls.update(constant, 3 + 0.01 * Math.sin(t), out);
      const P = rls.P;
      const tr = P[0] + P[5] + P[10] + P[15];
      maxTrace = Math.max(maxTrace, tr);
      if (t % 1000 === 999) {
        expect(isSymmetricPositiveDefinite(P, 4)).toBe(true);
        for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) expect(P[i * 4 + j]).toBe(P[j * 4 + i]);
      }
    }
    expect(maxTrace).toBeLessThanOrEqual(rls.traceMax * (1 + 1e-12));
    expect(Number.isFinite(rls.theta[0])).toBe(true);
    // Without the ceiling the unexcited directions would grow like 0.9⁻¹⁰⁰⁰⁰ (overflow).
  });
});

describe('Rls.toJSON / Rls.fromJSON', () => {
  it('restores the state exactly through a JSON string, and later updates agree bit for bit', () => {
    const { phi, y, names } = randomProblem(8, 80, 5);
    const a = Rls.fromFit(lstsq(head(phi, 30), y.slice(0, 30), names), { lambda: 0.98 });
    for (let i = 30; i < 50; i++) a.update(phi.data.subarray(i * 5, (i + 1) * 5), y[i]);
    const b = Rls.fromJSON(JSON.parse(JSON.stringify(a)));
    expect(b.toJSON()).toEqual(a.toJSON());
    for (let i = 50; i < 80; i++) {
      const r = phi.data.subarray(i * 5, (i + 1) * 5);
      expect(b.update(r, y[i]).innovation).toBe(a.update(r, y[i]).innovation);
    }
    expect(Array.from(b.theta)).toEqual(Array.from(a.theta));
    expect(Array.from(b.P)).toEqual(Array.from(a.P));
  });

  it('rejects malformed state with a StoreError', () => {
    expect(() => Rls.fromJSON({ theta: [1] })).toThrow(StoreError);
    expect(() => Rls.fromJSON({ theta: [1, 2], P: [[1, 0]], lambda: 1, traceMax: 10, rss: 0, count: 0, updates: 0 })).toThrow(StoreError);
    expect(() => Rls.fromJSON({ theta: [1], P: [[-1]], lambda: 1, traceMax: 10, rss: 0, count: 0, updates: 0 })).toThrow(StoreError);
  });
});

describe('Rls validation', () => {
  it('rejects λ outside (0, 1] with a UsageError', () => {
    expect(() => new Rls({ theta: [0], P: [1], lambda: 1.1 })).toThrow(UsageError);
    expect(() => new Rls({ theta: [0], P: [1], lambda: 0 })).toThrow(UsageError);
  });

  it('refuses a non-finite row and leaves the state unchanged', () => {
    const rls = new Rls({ theta: [1, 2], P: [1, 0, 0, 1] });
    expect(() => rls.update([NaN, 1], 1)).toThrow(ModelError);
    expect(Array.from(rls.theta)).toEqual([1, 2]);
    expect(rls.updates).toBe(0);
  });

  it('refuses to start from a rank-deficient fit', () => {
    const phi = { rows: 4, cols: 2, data: Float64Array.of(1, 2, 2, 4, 3, 6, 4, 8) };
    const fit = lstsq(phi, Float64Array.of(1, 2, 3, 4), ['a', 'b'], { onRankDeficient: 'warn' });
    expect(() => Rls.fromFit(fit)).toThrow(/rank 1 of 2/);
  });
});

describe('Rls with no coefficients (p = 0)', () => {
  it('starts from an empty state and accumulates the squared innovations of y itself', () => {
    const rls = new Rls({ theta: [], P: [], rss: 0, count: 0 });
    const step = rls.update(new Float64Array(0), 3);
    expect(step.innovation).toBe(3);
    rls.update(new Float64Array(0), -1);
    expect(rls.toJSON().rss).toBe(10);
    expect(rls.toJSON().count).toBe(2);
  });
});
