/**
 * Ordinary least squares y = Φθ + e by Householder QR with column scaling and pivoting
 * (never the normal equations): θ̂, residuals, σ̂², covariance, rank and condition.
 *
 * Formulas (Golub & Van Loan, "Matrix Computations", 4th ed. 2013, §5.3.3 QR solution of the
 * full-rank problem and §5.5.5 basic solution; Seber & Lee, "Linear Regression Analysis", 2nd ed.
 * 2003, §3.3 for σ̂² and Cov θ̂):
 *   Φ·D·P = Q·R,  θ̂ = D·P·R⁻¹·(Qᵀy)[0:r],  e = y − Φθ̂,  RSS = eᵀe,
 *   dof = n − r,  σ̂² = RSS/dof,  (ΦᵀΦ)⁻¹ = D·P·R⁻¹R⁻ᵀ·Pᵀ·D,  Cov θ̂ = σ̂²(ΦᵀΦ)⁻¹,  se_j = √Cov_jj.
 * `condition` is the Frobenius-norm condition number of the column-scaled Φ_s = Φ·D on the kept
 * columns: κ_F = ‖Φ_s‖_F·‖Φ_s⁺‖_F = √(r·trace((R₁₁ᵀR₁₁)⁻¹)), because every scaled column has unit
 * norm (‖R₁₁‖_F² = r) and Φ_s⁺ = P₁R₁₁⁻¹Q₁ᵀ. It costs O(p) once (ΦᵀΦ)⁻¹ is known, does not depend
 * on the units of the terms, and brackets the 2-norm condition: κ₂ ≤ κ_F ≤ r·κ₂ (from
 * ‖A‖₂ ≤ ‖A‖_F ≤ √r‖A‖₂, Golub & Van Loan 2013, §2.3.2). `qr(phi).condition` gives κ₂.
 *
 * Cost: 2np² − 2p³/3 (factorisation) + 4np (solve, residuals) + p³/3 (covariance) flops.
 * Allocates one buffer for the result arrays; the factors go to storage shared by all calls.
 *
 * @example
 *   lstsq(fromRows([[1, 1], [1, 2], [1, 3]]), Float64Array.of(1, 2, 2), ['a', 'b'])
 *   // theta ≈ [2/3, 1/2], rss = 1/6, dof = 1  (asserted in test/linalg/lstsq.test.ts)
 */
import { ModelError } from '../data/errors.js';
import type { DesignMatrix } from './matrix.js';
import { tryQr, type QrFactorization } from './qr.js';

export interface LstsqOptions {
  /** Relative tolerance on |R_kk|/|R_00| (default max(n, p)·2⁻⁵²). */
  rankTolerance?: number;
  /** What to do when the rank is below p: throw a ModelError (default) or warn and drop terms. */
  onRankDeficient?: 'throw' | 'warn';
}

export interface LstsqResult {
  /** θ̂ in term order; 0 for dropped terms. */
  theta: Float64Array;
  /** Term names in θ order (the array passed in). */
  names: string[];
  /** e = y − Φθ̂. */
  residuals: Float64Array;
  /** Φθ̂. */
  fitted: Float64Array;
  /** Residual sum of squares eᵀe. */
  rss: number;
  /** Rows n, columns p, numerical rank, residual degrees of freedom n − rank. */
  n: number;
  p: number;
  rank: number;
  dof: number;
  /** σ̂² = rss/dof (NaN when dof = 0). */
  sigma2: number;
  /** σ̂²(ΦᵀΦ)⁻¹, p×p row-major; rows and columns of dropped terms are 0. */
  cov: Float64Array;
  /** (ΦᵀΦ)⁻¹ unscaled by σ̂², p×p row-major (on the kept terms; 0 for dropped ones). */
  xtxInv: Float64Array;
  /** Standard errors √cov_jj. */
  se: Float64Array;
  /**
   * Frobenius-norm condition number of the column-scaled Φ on the kept terms,
   * κ_F = ‖Φ_s‖_F·‖Φ_s⁺‖_F; it bounds the 2-norm one, κ₂ ≤ κ_F ≤ rank·κ₂ (Infinity at rank 0).
   * For κ₂ itself use `qr(phi).condition`.
   */
  condition: number;
  /** Which terms were estimated (false for terms dropped by rank deficiency). */
  active: boolean[];
  warnings: string[];
}

/**
 * Least-squares fit of y on Φ with named terms. Throws ModelError `no-rows` when Φ has no rows,
 * `non-finite` when an entry of Φ or y is NaN or infinite, and `rank-deficient` (naming the
 * collinear terms) when rank < p unless `onRankDeficient: 'warn'`, in which case the dropped
 * terms get θ = 0 and are named in `warnings`. Shape mismatches are programming errors
 * (RangeError).
 */
export function lstsq(phi: DesignMatrix, y: Float64Array, names: string[], options: LstsqOptions = {}): LstsqResult {
  const n = phi.rows;
  const p = phi.cols;
  if (y.length !== n) throw new RangeError(`lstsq: y has ${y.length} values, Φ has ${n} rows`);
  if (names.length !== p) throw new RangeError(`lstsq: ${names.length} names for ${p} columns`);
  if (phi.data.length !== n * p) throw new RangeError(`lstsq: Φ data length ${phi.data.length}, expected ${n}×${p}`);
  if (n === 0) {
    throw new ModelError('no-rows', `no rows to estimate ${p} term${p === 1 ? '' : 's'} from`, {
      expected: `at least ${p + 1} rows`,
      hint: 'use a longer series or a structure with fewer lags',
    });
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(y[i])) {
      throw new ModelError('non-finite', `target value in regression row ${i + 1} is not a finite number`, { found: String(y[i]), expected: 'a finite number' });
    }
  }
  // Every result array is a view of one buffer (one allocation instead of six). Qᵀy is formed
  // alongside the factors, in the view that later holds the residuals.
  const out = resultArrays(n, p);
  out.residuals.set(y);
  const f = tryQr(phi, { rankTolerance: options.rankTolerance }, factorStorage(n * (p + 1)), out.residuals);
  if (f === undefined) throw nonFiniteTerm(phi, names);
  const warnings: string[] = [];
  if (f.rank < p) {
    const message = collinearityMessage(f, names);
    if ((options.onRankDeficient ?? 'throw') === 'throw') {
      throw new ModelError('rank-deficient', message, {
        found: `rank ${f.rank}`,
        expected: `rank ${p}`,
        hint: 'remove one of the named terms, or use more varied data',
      });
    }
    warnings.push(message);
  }
  return finish(f, phi, y, out, names, warnings);
}

/**
 * Storage for the factors of the fit in progress, reused by every call: the factorisation never
 * leaves `lstsq`, so the next call may overwrite it. Matrices above FACTOR_STORAGE_LIMIT entries
 * get their own array (there the allocation is small beside the factorisation).
 */
let sharedFactors = new Float64Array(0);
const FACTOR_STORAGE_LIMIT = 1 << 16;

function factorStorage(size: number): Float64Array | undefined {
  if (size > FACTOR_STORAGE_LIMIT) return undefined;
  if (sharedFactors.length < size) sharedFactors = new Float64Array(Math.max(size, Math.min(FACTOR_STORAGE_LIMIT, 2 * sharedFactors.length)));
  return sharedFactors;
}

interface ResultArrays {
  theta: Float64Array;
  residuals: Float64Array;
  fitted: Float64Array;
  cov: Float64Array;
  xtxInv: Float64Array;
  se: Float64Array;
}

/** The result arrays of an n×p fit, zero-filled views of one buffer. */
function resultArrays(n: number, p: number): ResultArrays {
  const buf = new ArrayBuffer(8 * (2 * n + 2 * p * p + 2 * p));
  let at = 0;
  const take = (len: number): Float64Array => {
    const v = new Float64Array(buf, at, len);
    at += 8 * len;
    return v;
  };
  return { residuals: take(n), fitted: take(n), cov: take(p * p), xtxInv: take(p * p), theta: take(p), se: take(p) };
}

/** Builds the result from a factorisation and `out.residuals` = Qᵀy (overwritten by e). */
function finish(f: QrFactorization, phi: DesignMatrix, y: Float64Array, out: ResultArrays, names: string[], warnings: string[]): LstsqResult {
  const n = phi.rows;
  const p = phi.cols;
  const { theta, residuals, fitted, cov, xtxInv, se } = out;
  f.solveTransformedInto(residuals, theta); // Qᵀy becomes scratch for z, then holds e
  const d = phi.data;
  let rss = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    const o = i * p;
    for (let j = 0; j < p; j++) s += d[o + j] * theta[j];
    fitted[i] = s;
    const e = y[i] - s;
    residuals[i] = e;
    rss += e * e;
  }
  const rank = f.rank;
  const dof = n - rank;
  const sigma2 = dof > 0 ? rss / dof : NaN;
  if (dof === 0) warnings.push(`no residual degrees of freedom (${n} rows, rank ${rank}): noise variance and standard errors are undefined`);
  f.xtxInvInto(xtxInv);
  for (let k = 0; k < p * p; k++) cov[k] = sigma2 * xtxInv[k];
  for (let j = 0; j < p; j++) se[j] = Math.sqrt(cov[j * p + j]);
  const active = new Array<boolean>(p).fill(false);
  for (let k = 0; k < rank; k++) active[f.perm[k]] = true;
  // κ_F(Φ_s) = √(r·trace S), S = (R₁₁ᵀR₁₁)⁻¹, read off the diagonal of (ΦᵀΦ)⁻¹ = D·S·D.
  let traceS = 0;
  for (let k = 0; k < rank; k++) {
    const j = f.perm[k];
    traceS += xtxInv[j * p + j] / (f.scale[j] * f.scale[j]);
  }
  const condition = rank > 0 ? Math.sqrt(rank * traceS) : Infinity;
  return { theta, names, residuals, fitted, rss, n, p, rank, dof, sigma2, cov, xtxInv, se, condition, active, warnings };
}

/** The ModelError for the first non-finite entry of Φ, naming its term and row. */
function nonFiniteTerm(phi: DesignMatrix, names: string[]): ModelError {
  const p = phi.cols;
  const d = phi.data;
  for (let i = 0; i < phi.rows; i++) {
    for (let j = 0; j < p; j++) {
      const v = d[i * p + j];
      if (!Number.isFinite(v)) {
        return new ModelError('non-finite', `term "${names[j]}" in regression row ${i + 1} is not a finite number`, { found: String(v), expected: 'a finite number' });
      }
    }
  }
  return new ModelError('non-finite', 'a regressor is not a finite number', { expected: 'finite numbers' });
}

/** `terms "a" and "b" are collinear (rank 3 of 4)` and similar, naming terms, never indices. */
function collinearityMessage(f: QrFactorization, names: string[]): string {
  const parts: string[] = [];
  for (const dep of f.dependencies()) {
    const self = `"${names[dep.column]}"`;
    if (dep.zero || dep.on.length === 0) {
      parts.push(`term ${self} is zero in every row`);
    } else {
      const group = [dep.column, ...dep.on].sort((a, b) => a - b).map((j) => `"${names[j]}"`);
      parts.push(group.length === 2 ? `terms ${group[0]} and ${group[1]} are collinear` : `terms ${group.slice(0, -1).join(', ')} and ${group[group.length - 1]} are linearly dependent`);
    }
  }
  const unique = [...new Set(parts)];
  const tooFew = f.rows < f.cols ? `; only ${f.rows} rows for ${f.cols} terms` : '';
  return `${unique.join('; ')} (rank ${f.rank} of ${f.cols}${tooFew})`;
}
