/**
 * Sparse regression by sequential thresholded least squares, with the threshold chosen by an
 * information criterion over a deterministic grid.
 *
 * Variant (Brunton, Proctor & Kutz, "Discovering governing equations from data by sparse
 * identification of nonlinear dynamical systems", PNAS 113(15), 2016, the sequential thresholded
 * least-squares algorithm of their supporting information): for a threshold τ,
 *   A ← all terms;  repeat: θ_A = argmin ‖y − Φ_A θ_A‖₂ (QR least squares, see lstsq.ts);
 *   A ← {j ∈ A : c_j ≥ τ} ∪ kept terms;  until A stops changing (or `maxIterations` refits),
 * where the threshold is relative to column scale: c_j = |θ_j|·‖φ_j‖₂/‖y‖₂ is the share of the
 * target's norm that term j's column carries at its fitted coefficient, so τ does not depend on
 * the units of y or of any term (a project convention; the published algorithm thresholds raw
 * |θ_j|). Each τ in the grid yields an active set; each distinct set is scored by
 * `criterion` (select/criteria.ts) with k = |A| + 1 (coefficients + noise variance) on all n
 * rows, and the lowest score wins. Ties (scores within 1e-9 relatively, or both −Infinity) go to
 * the smaller active set, then to the larger τ.
 * Rounding floor: before scoring, RSS is raised to at least (γ·‖y‖₂)², γ = npε/(1 − npε),
 * ε = 2⁻⁵², the size of residual that rounding alone can leave in a Householder least-squares
 * solve (Higham, "Accuracy and Stability of Numerical Algorithms", 2nd ed. 2002, §20.2, the
 * backward error bound of Theorem 20.3 with γ_k = kε/(1 − kε) — theorem number from memory).
 * Below it, RSS differences are rounding noise, so on exact data (e.g. noise-free derivatives)
 * every exact candidate ties and the smallest wins; on noisy data the floor never binds.
 * Default grid: τ = 0 and τ = 10^(−6 + i/4), i = 0…24 (1e-6 to 1), ascending.
 * Cost: at most (grid size)·(maxIterations + 1) least-squares fits of ≤ p columns, each
 * 2np² flops; distinct active sets are fitted once.
 *
 * @example
 *   // Lorenz system, library of monomials of degree ≤ 2 in x, y, z: for dx/dt the result is
 *   // θ = −10 on "x", 10 on "y", exactly 0 elsewhere (asserted in test/linalg/sparse.test.ts)
 */
import { UsageError } from '../data/errors.js';
import { criteria, type Criterion } from '../select/criteria.js';
import { lstsq, type LstsqResult } from './lstsq.js';
import type { DesignMatrix } from './matrix.js';

export interface SparseOptions {
  /** Criterion that picks the threshold (default 'bic'). */
  criterion?: Criterion;
  /** Relative thresholds τ to try (see the module comment); default 0 and 1e-6 … 1 in quarter decades. */
  thresholds?: number[];
  /** Most refits per threshold after the first fit (default 10). */
  maxIterations?: number;
  /** Names of terms never pruned (e.g. the intercept). */
  keep?: string[];
  /** Passed to lstsq. */
  rankTolerance?: number;
  onRankDeficient?: 'throw' | 'warn';
  /** Added to log L of every candidate (see select/criteria.ts). */
  logJacobian?: number;
}

/** One threshold of the grid and what it gave. */
export interface SparseCandidate {
  threshold: number;
  /** Number of active terms. */
  size: number;
  score: number;
  /** Refits used before the active set stopped changing. */
  iterations: number;
}

export interface SparseResult {
  /** Full-length θ in term order, exactly 0 for pruned terms. */
  theta: Float64Array;
  /** Which terms are active. */
  active: boolean[];
  /** Names of the active terms, in term order. */
  activeNames: string[];
  /** The least-squares fit on the active columns only (its names are `activeNames`). */
  fit: LstsqResult;
  /** The chosen relative threshold τ. */
  threshold: number;
  criterion: Criterion;
  /** The chosen candidate's criterion value. */
  score: number;
  /** Every threshold tried, in grid order. */
  path: SparseCandidate[];
  warnings: string[];
}

/** The default relative-threshold grid: 0, then 10^(−6 + i/4) for i = 0…24. */
export function defaultThresholds(): number[] {
  const out = [0];
  for (let i = 0; i <= 24; i++) out.push(10 ** (-6 + i / 4));
  return out;
}

/**
 * Sequential thresholded least squares of y on the named columns of Φ (module comment).
 * Throws UsageError `unknown-term` for a `keep` name not in `names`, `invalid-threshold` for a
 * negative or non-finite threshold; lstsq's ModelErrors pass through.
 */
export function sparseRegression(phi: DesignMatrix, y: Float64Array, names: string[], options: SparseOptions = {}): SparseResult {
  const n = phi.rows;
  const p = phi.cols;
  if (names.length !== p) throw new RangeError(`sparseRegression: ${names.length} names for ${p} columns`);
  if (y.length !== n) throw new RangeError(`sparseRegression: y has ${y.length} values, Φ has ${n} rows`);
  const criterion = options.criterion ?? 'bic';
  const thresholds = options.thresholds ?? defaultThresholds();
  const maxIterations = options.maxIterations ?? 10;
  for (const t of thresholds) {
    if (!(t >= 0) || !Number.isFinite(t)) throw new UsageError('invalid-threshold', 'sparse-regression thresholds must be finite and ≥ 0', { found: String(t), expected: 'a number ≥ 0' });
  }
  if (thresholds.length === 0) throw new UsageError('invalid-threshold', 'no sparse-regression thresholds given', { expected: 'at least one threshold' });
  const keep = new Array<boolean>(p).fill(false);
  for (const k of options.keep ?? []) {
    const j = names.indexOf(k);
    if (j < 0) throw new UsageError('unknown-term', `term "${k}" to keep is not in the library`, { found: k, expected: `one of ${names.map((s) => `"${s}"`).join(', ')}` });
    keep[j] = true;
  }
  // Column norms and ‖y‖ for the relative coefficient size c_j.
  const colNorm = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += phi.data[i * p + j] ** 2;
    colNorm[j] = Math.sqrt(s);
  }
  let yy = 0;
  for (let i = 0; i < n; i++) yy += y[i] * y[i];
  const yNorm = Math.sqrt(yy);
  const npe = n * p * 2 ** -52;
  const rssFloor = npe < 1 ? ((npe / (1 - npe)) * yNorm) ** 2 : yy;

  const fits = new Map<string, { fit: LstsqResult; theta: Float64Array; score: number; size: number }>();
  const evaluate = (active: boolean[]) => {
    const key = active.map((a) => (a ? '1' : '0')).join('');
    let e = fits.get(key);
    if (e === undefined) {
      const cols: number[] = [];
      for (let j = 0; j < p; j++) if (active[j]) cols.push(j);
      const sub = selectColumns(phi, cols);
      const fit = lstsq(sub, y, cols.map((j) => names[j]), { rankTolerance: options.rankTolerance, onRankDeficient: options.onRankDeficient });
      const theta = new Float64Array(p);
      cols.forEach((j, k) => (theta[j] = fit.theta[k]));
      const score = criteria(Math.max(fit.rss, rssFloor), n, cols.length + 1, { logJacobian: options.logJacobian })[criterion];
      e = { fit, theta, score, size: cols.length };
      fits.set(key, e);
    }
    return { key, ...e };
  };

  const path: SparseCandidate[] = [];
  const warnings: string[] = [];
  let best: { key: string; threshold: number; score: number; size: number } | undefined;
  for (const tau of thresholds) {
    let active = new Array<boolean>(p).fill(true);
    let cur = evaluate(active);
    let iterations = 0;
    let converged = false;
    while (iterations < maxIterations) {
      const next = active.map((a, j) => a && (keep[j] || (yNorm > 0 && (Math.abs(cur.theta[j]) * colNorm[j]) / yNorm >= tau)));
      if (next.every((v, j) => v === active[j])) {
        converged = true;
        break;
      }
      active = next;
      cur = evaluate(active);
      iterations++;
    }
    if (!converged) {
      const next = active.map((a, j) => a && (keep[j] || (yNorm > 0 && (Math.abs(cur.theta[j]) * colNorm[j]) / yNorm >= tau)));
      if (!next.every((v, j) => v === active[j])) warnings.push(`threshold ${tau}: active set still changing after ${maxIterations} refits`);
    }
    path.push({ threshold: tau, size: cur.size, score: cur.score, iterations });
    if (best === undefined || better(cur.score, cur.size, tau, best)) best = { key: cur.key, threshold: tau, score: cur.score, size: cur.size };
  }
  const chosen = fits.get(best!.key)!;
  const active = best!.key.split('').map((c) => c === '1');
  return {
    theta: chosen.theta,
    active,
    activeNames: names.filter((_, j) => active[j]),
    fit: chosen.fit,
    threshold: best!.threshold,
    criterion,
    score: chosen.score,
    path,
    warnings: [...warnings, ...chosen.fit.warnings],
  };
}

function better(score: number, size: number, tau: number, best: { score: number; size: number; threshold: number }): boolean {
  const tie = score === best.score || Math.abs(score - best.score) <= 1e-9 * Math.max(1, Math.abs(score), Math.abs(best.score));
  if (!tie) return score < best.score || Number.isNaN(best.score);
  if (size !== best.size) return size < best.size;
  return tau > best.threshold;
}

/** Columns `cols` of Φ as a new row-major matrix. Cost n·|cols|. */
export function selectColumns(phi: DesignMatrix, cols: number[]): DesignMatrix {
  const n = phi.rows;
  const p = phi.cols;
  const q = cols.length;
  const data = new Float64Array(n * q);
  for (let i = 0; i < n; i++) for (let k = 0; k < q; k++) data[i * q + k] = phi.data[i * p + cols[k]];
  return { rows: n, cols: q, data };
}
