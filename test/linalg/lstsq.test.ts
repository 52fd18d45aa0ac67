import { describe, expect, it } from 'vitest';
import { inv, lusolve, multiply, transpose } from 'mathjs';
import { lstsq } from '../../src/linalg/lstsq.js';
import { fromRows, type DesignMatrix } from '../../src/linalg/matrix.js';
import { createRng } from '../../src/linalg/random.js';
import { ModelError } from '../../src/data/errors.js';
import { lre, readCsvProblem, readPolynomialDat, type NistProblem } from './nist.js';

/** Smallest LRE over coefficients, their standard deviations and the residual SD (skipping zeros). */
function scores(pr: NistProblem) {
  const fit = lstsq(pr.phi, pr.y, pr.names);
  const coef = Math.min(...pr.certified.map((c, j) => lre(fit.theta[j], c)));
  const sds = pr.certifiedSd.filter((c) => c !== 0);
  const sd = sds.length === 0 ? Infinity : Math.min(...pr.certifiedSd.flatMap((c, j) => (c === 0 ? [] : [lre(fit.se[j], c)])));
  const resid = pr.residualSd === 0 ? Infinity : lre(Math.sqrt(fit.sigma2), pr.residualSd);
  return { fit, coef, sd, resid };
}

describe('lstsq on NIST StRD linear regression (certified values parsed from test/fixtures/nist)', () => {
  // Required minimum LRE (McCullough 1998 scoring) per dataset.
  const cases: [string, () => NistProblem, number][] = [
    ['Wampler1', () => readPolynomialDat('Wampler1.dat'), 8],
    ['Wampler2', () => readPolynomialDat('Wampler2.dat'), 10],
    ['Longley', () => readCsvProblem('Longley'), 9],
    ['Filip', () => readPolynomialDat('Filip.dat'), 7],
    ['Norris', () => readCsvProblem('Norris'), 9],
  ];
  for (const [name, load, need] of cases) {
    it(`${name}: every coefficient, standard error and the residual SD reach LRE ≥ ${need}`, () => {
      const pr = load();
      const s = scores(pr);
      // Reached at the time of writing (smallest over coefficients / standard errors / residual SD):
      // Wampler1 9.5 / – / – and Wampler2 12.5 / – / – (certified SDs are 0), Longley 11.7 / 12.7 / 12.6,
      // Filip 8.3 / 7.1 / 8.3, Norris 11.8 / 13.8 / 13.9.
      expect(s.fit.rank).toBe(pr.certified.length);
      expect(s.coef).toBeGreaterThanOrEqual(need);
      expect(s.sd).toBeGreaterThanOrEqual(need);
      expect(s.resid).toBeGreaterThanOrEqual(need);
    });
  }

  it('Wampler1: the certified residual SD is 0 and the fit is exact to rounding', () => {
    const pr = readPolynomialDat('Wampler1.dat');
    expect(pr.residualSd).toBe(0);
    const s = scores(pr);
    // y reaches 3.4e6; rounding-level residuals are ~1e-16 of that.
    expect(Math.sqrt(s.fit.sigma2)).toBeLessThan(1e-8);
  });
});

describe('lstsq(phi, y, names) basics', () => {
  it('fits y = (1, 2, 2) on [1, x], x = 1, 2, 3 as worked by hand', () => {
    // By hand: ΦᵀΦ = [[3, 6], [6, 14]], Φᵀy = (5, 11); det = 6;
    // θ = (14·5 − 6·11, −6·5 + 3·11)/6 = (4/6, 3/6) = (2/3, 1/2); fitted 7/6, 10/6, 13/6;
    // residuals −1/6, 2/6, −1/6; RSS = 6/36 = 1/6; dof = 1; (ΦᵀΦ)⁻¹ = [[14/6, −1], [−1, 1/2]].
    const r = lstsq(fromRows([[1, 1], [1, 2], [1, 3]]), Float64Array.of(1, 2, 2), ['a', 'b']);
    expect(r.theta[0]).toBeCloseTo(2 / 3, 14);
    expect(r.theta[1]).toBeCloseTo(1 / 2, 14);
    expect(r.rss).toBeCloseTo(1 / 6, 14);
    expect(r.dof).toBe(1);
    expect(r.sigma2).toBeCloseTo(1 / 6, 14);
    expect(Array.from(r.xtxInv)).toEqual([14 / 6, -1, -1, 0.5].map((v) => expect.closeTo(v, 13)));
    expect(r.se[1]).toBeCloseTo(Math.sqrt(1 / 12), 14);
    expect(r.residuals[1]).toBeCloseTo(1 / 3, 14);
    expect(r.fitted[2]).toBeCloseTo(13 / 6, 14);
    expect(r.warnings).toEqual([]);
    expect(r.active).toEqual([true, true]);
  });

  it('agrees with mathjs (lusolve on the normal equations) on random well-conditioned systems', () => {
    // Independent implementation: mathjs LU solve of ΦᵀΦθ = Φᵀy.
    for (let seed = 1; seed <= 6; seed++) {
      const rng = createRng(100 + seed);
      const n = 30 + 10 * seed;
      const p = 2 + seed;
      const rows = Array.from({ length: n }, () => Array.from({ length: p }, () => rng.normal()));
      const y = Array.from({ length: n }, () => rng.normal());
      const fit = lstsq(fromRows(rows), Float64Array.from(y), Array.from({ length: p }, (_, j) => `x${j}`));
      const xt = transpose(rows) as number[][];
      const ref = (lusolve(multiply(xt, rows) as number[][], multiply(xt, y) as number[]) as number[][]).map((r) => r[0]);
      ref.forEach((v, j) => expect(Math.abs(fit.theta[j] - v)).toBeLessThan(1e-10 * Math.max(1, Math.abs(v))));
      // Covariance against the mathjs inverse of ΦᵀΦ.
      const xtxInv = inv(multiply(xt, rows) as number[][]) as number[][];
      for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) expect(Math.abs(fit.xtxInv[i * p + j] - xtxInv[i][j])).toBeLessThan(1e-10);
    }
  });

  it('leaves residuals orthogonal to every column of Φ (|φ_jᵀe| ≤ 1e-12·‖φ_j‖·‖e‖)', () => {
    // Invariant of least squares: Φᵀe = 0.
    for (let seed = 1; seed <= 4; seed++) {
      const { phi, y } = badlyScaled(seed, 80, 6);
      const fit = lstsq(phi, y, ['a', 'b', 'c', 'd', 'e', 'f']);
      const en = Math.hypot(...fit.residuals);
      for (let j = 0; j < phi.cols; j++) {
        let dot = 0;
        let cn = 0;
        for (let i = 0; i < phi.rows; i++) {
          dot += phi.data[i * phi.cols + j] * fit.residuals[i];
          cn += phi.data[i * phi.cols + j] ** 2;
        }
        expect(Math.abs(dot)).toBeLessThan(1e-12 * Math.sqrt(cn) * en);
      }
    }
  });

  it('is unaffected by the units of a column (column scaling)', () => {
    const { phi, y } = badlyScaled(9, 50, 6);
    const a = lstsq(phi, y, ['a', 'b', 'c', 'd', 'e', 'f']);
    const scaled = { ...phi, data: phi.data.slice() };
    for (let i = 0; i < phi.rows; i++) scaled.data[i * 6 + 2] *= 1e-9;
    const b = lstsq(scaled, y, ['a', 'b', 'c', 'd', 'e', 'f']);
    expect(b.theta[2] * 1e-9).toBeCloseTo(a.theta[2], 10);
    expect(b.condition / a.condition).toBeCloseTo(1, 8);
  });
});

describe('lstsq rank deficiency', () => {
  const rows = [
    [1, 3, 3, 0.5],
    [1, 1, 1, -1],
    [1, 4, 4, 2],
    [1, 1, 1, 0.25],
    [1, 5, 5, 3],
    [1, 9, 9, -2],
  ];
  const names = ['1', 'price[t]', 'price_copy[t]', 'promo[t]'];
  const y = Float64Array.of(2, 1, 3, 1, 4, 6);

  it('throws ModelError rank-deficient naming the two collinear terms', () => {
    let caught: unknown;
    try {
      lstsq(fromRows(rows), y, names);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(ModelError);
    const e = caught as ModelError;
    expect(e.code).toBe('rank-deficient');
    expect(e.message).toBe('terms "price[t]" and "price_copy[t]" are collinear (rank 3 of 4)');
  });

  it('names all members of a three-term dependency', () => {
    const r3 = rows.map((r) => [r[0], r[1], r[3], r[1] - 2 * r[3]]);
    expect(() => lstsq(fromRows(r3), y, ['1', 'a', 'b', 'a_minus_2b'])).toThrow('terms "a", "b" and "a_minus_2b" are linearly dependent (rank 3 of 4)');
  });

  it('with onRankDeficient: warn, drops one term, names it and still fits the rest', () => {
    const r = lstsq(fromRows(rows), y, names, { onRankDeficient: 'warn' });
    expect(r.rank).toBe(3);
    expect(r.dof).toBe(3);
    expect(r.active).toEqual([true, true, false, true]);
    expect(r.theta[2]).toBe(0);
    expect(r.se[2]).toBe(0);
    expect(r.warnings[0]).toContain('"price[t]" and "price_copy[t]"');
    // Same fit as leaving the copy out (independent: the full-rank 3-column problem).
    const ref = lstsq(fromRows(rows.map((q) => [q[0], q[1], q[3]])), y, ['1', 'price[t]', 'promo[t]']);
    expect(r.theta[1]).toBeCloseTo(ref.theta[1], 12);
    expect(r.theta[3]).toBeCloseTo(ref.theta[2], 12);
    expect(r.rss).toBeCloseTo(ref.rss, 12);
  });

  it('reports a zero column and too few rows', () => {
    expect(() => lstsq(fromRows(rows.map((q) => [q[0], q[1], 0])), y, ['1', 'x', 'z'])).toThrow('term "z" is zero in every row (rank 2 of 3)');
    expect(() => lstsq(fromRows([[1, 2, 3]]), Float64Array.of(1), ['a', 'b', 'c'])).toThrow(/only 1 rows for 3 terms/);
  });

  it('refuses empty and non-finite input with ModelErrors', () => {
    expect(() => lstsq({ rows: 0, cols: 2, data: new Float64Array(0) }, new Float64Array(0), ['a', 'b'])).toThrow(expect.objectContaining({ code: 'no-rows' }));
    expect(() => lstsq(fromRows([[1, NaN], [1, 2]]), Float64Array.of(1, 2), ['a', 'b'])).toThrow('term "b" in regression row 1 is not a finite number');
  });
});

/** Random regressors whose column scales span twelve orders of magnitude. */
export function badlyScaled(seed: number, n: number, p: number): { phi: DesignMatrix; y: Float64Array } {
  const rng = createRng(seed);
  const data = new Float64Array(n * p);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < p; j++) data[i * p + j] = rng.normal() * 10 ** (2 * j - 6);
    y[i] = rng.normal();
  }
  return { phi: { rows: n, cols: p, data }, y };
}

describe('lstsq condition', () => {
  it('equals the Frobenius-norm condition √(Σσ²·Σσ⁻²) of the scaled Φ from ml-matrix SVD, and brackets κ₂', async () => {
    // Independent source: singular values σ of Φ·D from ml-matrix SingularValueDecomposition.
    const { Matrix, SingularValueDecomposition } = await import('ml-matrix');
    for (const pr of [readPolynomialDat('Filip.dat'), readCsvProblem('Longley'), readPolynomialDat('Wampler1.dat')]) {
      const fit = lstsq(pr.phi, pr.y, pr.names);
      const { rows, cols, data } = pr.phi;
      const m = new Matrix(rows, cols);
      for (let j = 0; j < cols; j++) {
        let s = 0;
        for (let i = 0; i < rows; i++) s += data[i * cols + j] ** 2;
        for (let i = 0; i < rows; i++) m.set(i, j, data[i * cols + j] / Math.sqrt(s));
      }
      const sv = new SingularValueDecomposition(m, { autoTranspose: true }).diagonal;
      const kF = Math.sqrt(sv.reduce((a, s) => a + s * s, 0) * sv.reduce((a, s) => a + 1 / (s * s), 0));
      const k2 = Math.max(...sv) / Math.min(...sv);
      expect(Math.abs(fit.condition - kF) / kF).toBeLessThan(1e-6);
      expect(fit.condition).toBeGreaterThanOrEqual(k2 * (1 - 1e-9));
      expect(fit.condition).toBeLessThanOrEqual(cols * k2);
    }
  });
});
