import { describe, expect, it } from 'vitest';
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { fromRows, type DesignMatrix } from '../../src/linalg/matrix.js';
import { qr, tryQr } from '../../src/linalg/qr.js';
import { lstsq } from '../../src/linalg/lstsq.js';
import { createRng } from '../../src/linalg/random.js';
import { readPolynomialDat } from './nist.js';

function randomMatrix(seed: number, n: number, p: number): DesignMatrix {
  const rng = createRng(seed);
  const data = new Float64Array(n * p);
  for (let i = 0; i < n * p; i++) data[i] = rng.normal() * 10 ** ((i % p) - 2);
  return { rows: n, cols: p, data };
}

describe('qr(phi)', () => {
  it('solves the 3×2 example of the doc comment: θ = (2/3, 1/2)', () => {
    // Hand arithmetic in test/linalg/lstsq.test.ts (normal equations of the same problem).
    const f = qr(fromRows([[1, 1], [1, 2], [1, 3]]));
    expect(f.rank).toBe(2);
    expect(f.isFullRank).toBe(true);
    const th = f.solve(Float64Array.of(1, 2, 2));
    expect(th[0]).toBeCloseTo(2 / 3, 14);
    expect(th[1]).toBeCloseTo(1 / 2, 14);
  });

  it('reconstructs the scaled, pivoted Φ as Q·R, with orthonormal Q and non-increasing |R_kk|', () => {
    // Invariants of the factorisation Φ·D·P = Q·R (Golub & Van Loan 2013, §5.4.2).
    for (const [seed, n, p] of [[1, 20, 5], [2, 7, 7], [3, 50, 12]]) {
      const phi = randomMatrix(seed, n, p);
      const f = qr(phi);
      const q = f.q();
      const r = f.r();
      const m = Math.min(n, p);
      for (let i = 0; i < n; i++) {
        for (let k = 0; k < p; k++) {
          let s = 0;
          for (let l = 0; l < m; l++) s += q.data[i * m + l] * r.data[l * p + k];
          const j = f.perm[k];
          expect(Math.abs(s - phi.data[i * p + j] * f.scale[j])).toBeLessThan(1e-14);
        }
      }
      for (let a = 0; a < m; a++) {
        for (let b = 0; b < m; b++) {
          let s = 0;
          for (let i = 0; i < n; i++) s += q.data[i * m + a] * q.data[i * m + b];
          expect(Math.abs(s - (a === b ? 1 : 0))).toBeLessThan(1e-14);
        }
      }
      const d = f.diagonal();
      for (let k = 1; k < m; k++) expect(Math.abs(d[k])).toBeLessThanOrEqual(Math.abs(d[k - 1]) * (1 + 1e-12));
    }
  });

  it('qtMul and qMul are inverse to each other', () => {
    const f = qr(randomMatrix(4, 15, 4));
    const rng = createRng(5);
    const v = Float64Array.from({ length: 15 }, () => rng.normal());
    const back = f.qMul(f.qtMul(v));
    v.forEach((x, i) => expect(back[i]).toBeCloseTo(x, 14));
  });

  it('condition matches the 2-norm condition number from ml-matrix SVD of the scaled Φ', () => {
    // Independent source: ml-matrix SingularValueDecomposition.
    for (const phi of [randomMatrix(6, 40, 6), readPolynomialDat('Filip.dat').phi, readPolynomialDat('Wampler1.dat').phi]) {
      const f = qr(phi);
      const scaled = new Matrix(phi.rows, phi.cols);
      for (let i = 0; i < phi.rows; i++) for (let j = 0; j < phi.cols; j++) scaled.set(i, j, phi.data[i * phi.cols + j] * f.scale[j]);
      const svd = new SingularValueDecomposition(scaled, { autoTranspose: true });
      const s = svd.diagonal;
      const kappa = Math.max(...s) / Math.min(...s);
      expect(Math.abs(f.condition - kappa) / kappa).toBeLessThan(1e-4);
    }
  });

  it('reports the rank of a matrix with a duplicated column and names the dependency', () => {
    const f = qr(fromRows([[1, 2, 2], [1, 3, 3], [1, 5, 5], [1, 7, 7]]));
    expect(f.rank).toBe(2);
    expect(f.dependencies()).toEqual([{ column: 2, on: [1], zero: false }]);
    const th = f.solve(Float64Array.of(1, 2, 3, 4));
    expect(th[2]).toBe(0);
  });

  it('honours a looser rank tolerance', () => {
    // Columns 1 and 2 differ by 1e-9 relative: full rank by default, rank 2 at tolerance 1e-6.
    const rows = [[1, 2, 2 + 2e-9], [1, 3, 3], [1, 5, 5], [1, 7, 7 - 7e-9]];
    expect(qr(fromRows(rows)).rank).toBe(3);
    expect(qr(fromRows(rows), { rankTolerance: 1e-6 }).rank).toBe(2);
  });

  it('tryQr with storage and rhs: the same factors as qr(phi), and rhs becomes Qᵀy bit for bit', () => {
    // Invariant: the right-hand side carried through the factorisation gets exactly the
    // arithmetic of qtMul, and borrowed storage changes nothing but where the factors live.
    for (const [seed, n, p] of [[4, 30, 1], [5, 40, 6], [6, 9, 9], [7, 5, 8]]) {
      const phi = randomMatrix(seed, n, p);
      const y = Float64Array.from({ length: n }, (_, i) => Math.sin(i + seed));
      const fresh = qr(phi);
      const rhs = Float64Array.from(y);
      const storage = new Float64Array(n * (p + 1) + 3).fill(7);
      const lent = tryQr(phi, {}, storage, rhs)!;
      expect(Array.from(rhs)).toEqual(Array.from(fresh.qtMul(y)));
      expect(Array.from(lent.diagonal())).toEqual(Array.from(fresh.diagonal()));
      expect(Array.from(lent.perm)).toEqual(Array.from(fresh.perm));
      expect(Array.from(lent.solve(y))).toEqual(Array.from(fresh.solve(y)));
      expect(Array.from(lent.xtxInv())).toEqual(Array.from(fresh.xtxInv()));
    }
  });

  it('lstsq gives the same fit before and after fits of other shapes (its shared factor storage)', () => {
    const phi = randomMatrix(8, 25, 4);
    const y = Float64Array.from({ length: 25 }, (_, i) => i % 3);
    const names = ['a', 'b', 'c', 'd'];
    const first = lstsq(phi, y, names);
    lstsq(randomMatrix(9, 60, 9), new Float64Array(60).fill(1), Array.from({ length: 9 }, (_, j) => `x${j}`));
    lstsq(randomMatrix(10, 3, 2), Float64Array.of(1, 2, 4), ['u', 'v']);
    const again = lstsq(phi, y, names);
    expect(Array.from(again.theta)).toEqual(Array.from(first.theta));
    expect(Array.from(again.cov)).toEqual(Array.from(first.cov));
    expect(Array.from(again.residuals)).toEqual(Array.from(first.residuals));
  });
});
