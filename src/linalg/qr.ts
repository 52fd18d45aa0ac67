/**
 * Householder QR with column scaling and column pivoting, as a factor-once object.
 *
 * Variant. Each column of Φ is first divided by its Euclidean norm (Φ_s = Φ·D with
 * D = diag(1/‖φ_j‖₂); a zero column keeps scale 1), then Φ_s·P = Q·R is computed by Householder
 * reflections H_k = I − τ_k·v_k·v_kᵀ (v_k[k] = 1) with column pivoting: at step k the remaining
 * column of largest partial norm is moved to position k, so |R_00| ≥ |R_11| ≥ … (near-ties,
 * within 1e-12 relatively, go to the earlier column, so of two duplicated terms the later drops).
 * Sources: Householder reflections and QR with column pivoting, Golub & Van Loan, "Matrix
 * Computations", 4th ed. (2013), Algorithm 5.1.1 and §5.4.2 (Businger & Golub 1965); the
 * partial-norm downdate with its recomputation safeguard follows Drmač & Bujanović, "On the
 * failure of rank-revealing QR factorization software — a case study", ACM TOMS 35(2), 2008,
 * eq. (3.4) (equation number from memory). Column scaling to unit norm: Golub & Van Loan §3.5.2
 * (equilibration); it makes the rank tolerance and the condition number independent of the units
 * of each term.
 *
 * Rank. rank = number of leading k with |R_kk| > tol·|R_00|, tol = `rankTolerance`
 * (default max(n, p)·ε, ε = 2⁻⁵²). Columns past the rank are "dropped": the basic solution
 * gives them coefficient 0 (Golub & Van Loan 2013, §5.5.5, basic solution).
 *
 * Cost: 2np² − 2p³/3 flops for the factorisation plus O(np) for scaling and norms; each
 * `solve` costs 4np − p² + O(p) flops.
 *
 * @example
 *   const f = qr(fromRows([[1, 1], [1, 2], [1, 3]]));
 *   f.rank;                              // 2
 *   f.solve(Float64Array.of(1, 2, 2));   // ≈ [2/3, 1/2]  (asserted in test/linalg/qr.test.ts)
 */
import type { DesignMatrix } from './matrix.js';

/** Machine epsilon of IEEE-754 double precision, 2⁻⁵². */
export const EPSILON = 2 ** -52;

export interface QrOptions {
  /** Relative tolerance on |R_kk|/|R_00| below which a column counts as dependent. */
  rankTolerance?: number;
}

/** A dropped column written as a combination of the kept ones (in scaled coordinates). */
export interface Dependency {
  /** Original index of the dropped column. */
  column: number;
  /** Original indices of the kept columns it depends on (by weight, largest first). */
  on: number[];
  /** True when the column is zero (it depends on nothing). */
  zero: boolean;
}

/**
 * The factorisation Φ·D·P = Q·R. Create with {@link qr}. Every query reuses the factors; none
 * refactors.
 */
export class QrFactorization {
  /** Number of rows n and columns p of Φ. */
  readonly rows: number;
  readonly cols: number;
  /** Numerical rank (see the module comment for the rule). */
  readonly rank: number;
  /** Column scale factors: column j of Φ was multiplied by scale[j] = 1/‖φ_j‖₂. */
  readonly scale: Float64Array;
  /** Pivot order: position k of the factorisation holds original column perm[k]. */
  readonly perm: Int32Array;
  /** Relative rank tolerance used. */
  readonly tolerance: number;
  /** Column-major n×p: R on and above the diagonal, Householder vectors below it. */
  private readonly qrData: Float64Array;
  /** Householder coefficients τ_k. */
  private readonly tau: Float64Array;
  /** 1 for columns of Φ that are entirely zero. */
  private readonly zero: Uint8Array;
  private conditionCache = -1;

  /** @internal use {@link qr}. */
  constructor(rows: number, cols: number, qrData: Float64Array, tau: Float64Array, scale: Float64Array, perm: Int32Array, tolerance: number, zero: Uint8Array) {
    this.zero = zero;
    this.rows = rows;
    this.cols = cols;
    this.qrData = qrData;
    this.tau = tau;
    this.scale = scale;
    this.perm = perm;
    this.tolerance = tolerance;
    const m = Math.min(rows, cols);
    let rank = 0;
    if (m > 0) {
      const r00 = Math.abs(qrData[0]);
      if (r00 > 0) {
        const limit = tolerance * r00;
        while (rank < m && Math.abs(qrData[rank * rows + rank]) > limit) rank++;
      }
    }
    this.rank = rank;
  }

  /** True when rank equals the number of columns. */
  get isFullRank(): boolean {
    return this.rank === this.cols;
  }

  /** R_kk of the scaled, pivoted factorisation (k < min(n, p)). */
  diagonal(): Float64Array {
    const m = Math.min(this.rows, this.cols);
    const d = new Float64Array(m);
    for (let k = 0; k < m; k++) d[k] = this.qrData[k * this.rows + k];
    return d;
  }

  /**
   * 2-norm condition number of the column-scaled Φ restricted to the kept columns,
   * κ₂(Φ_s) = σ_max(R₁₁)/σ_min(R₁₁), R₁₁ the leading rank×rank block of R. Estimated by the
   * power method (Golub & Van Loan 2013, §7.3.1) on R₁₁ᵀR₁₁ and on R₁₁⁻¹R₁₁⁻ᵀ, iterated until
   * the Rayleigh quotient changes by less than 1e-10 relatively (at most 200 steps); a lower
   * bound that is accurate to several digits unless the top singular values nearly coincide.
   * Cost O(r²) per step. Infinity when rank is 0. Computed once, on first access.
   */
  get condition(): number {
    if (this.conditionCache < 0) this.conditionCache = this.computeCondition();
    return this.conditionCache;
  }

  /** Computes Qᵀ·y into `out` (length n). `y` is not modified. */
  qtMul(y: Float64Array, out: Float64Array = new Float64Array(this.rows)): Float64Array {
    const n = this.rows;
    if (y.length !== n) throw new RangeError(`qtMul: vector length ${y.length}, expected ${n}`);
    if (out !== y) out.set(y);
    const m = Math.min(n, this.cols);
    for (let k = 0; k < m; k++) this.reflect(k, out);
    return out;
  }

  /** Computes Q·v into `out` (length n): the reflections applied in reverse order. */
  qMul(v: Float64Array, out: Float64Array = new Float64Array(this.rows)): Float64Array {
    const n = this.rows;
    if (v.length !== n) throw new RangeError(`qMul: vector length ${v.length}, expected ${n}`);
    if (out !== v) out.set(v);
    const m = Math.min(n, this.cols);
    for (let k = m - 1; k >= 0; k--) this.reflect(k, out);
    return out;
  }

  /** Applies reflection k, H_k = I − τ_k v_k v_kᵀ (v_k stored below the diagonal, v_k[k] = 1), to `out` in place. */
  private reflect(k: number, out: Float64Array): void {
    const t = this.tau[k];
    if (t === 0) return;
    const n = this.rows;
    const a = this.qrData;
    const off = k * n;
    let s = out[k];
    for (let i = k + 1; i < n; i++) s += a[off + i] * out[i];
    s *= t;
    out[k] -= s;
    for (let i = k + 1; i < n; i++) out[i] -= s * a[off + i];
  }

  /**
   * Basic least-squares solution θ of min ‖Φθ − y‖₂ in Φ's original units: z solves
   * R₁₁z = (Qᵀy)[0:r], dropped positions get 0, θ = D·P·z. Cost 4np − p² flops.
   */
  solve(y: Float64Array, work: Float64Array = new Float64Array(this.rows)): Float64Array {
    const theta = new Float64Array(this.cols);
    this.solveInto(y, theta, work);
    return theta;
  }

  /** As {@link solve}, writing θ into `theta` (length p) and using `work` (length n) as scratch. */
  solveInto(y: Float64Array, theta: Float64Array, work: Float64Array): void {
    this.solveTransformedInto(this.qtMul(y, work), theta);
  }

  /**
   * As {@link solveInto} from c = Qᵀy already formed (for example by {@link tryQr}'s `rhs`);
   * c[0:r] is overwritten by z.
   */
  solveTransformedInto(c: Float64Array, theta: Float64Array): void {
    const n = this.rows;
    const r = this.rank;
    const a = this.qrData;
    // Back substitution R₁₁ z = c[0:r], in place in c.
    for (let k = r - 1; k >= 0; k--) {
      let s = c[k];
      for (let j = k + 1; j < r; j++) s -= a[j * n + k] * c[j];
      c[k] = s / a[k * n + k];
    }
    theta.fill(0);
    for (let k = 0; k < r; k++) {
      const j = this.perm[k];
      theta[j] = c[k] * this.scale[j];
    }
  }

  /**
   * S = R₁₁⁻¹R₁₁⁻ᵀ = (P₁ᵀ Φ_sᵀ Φ_s P₁)⁻¹ on the kept columns, r×r row-major in pivoted order.
   * Cost r³/3 flops (triangular inverse, then the product).
   */
  pivotedInverseGram(): Float64Array {
    const r = this.rank;
    const buf = new Float64Array(2 * r * r);
    this.inverseGramInto(buf);
    return buf.subarray(r * r);
  }

  /** Writes U = R₁₁⁻¹ into buf[0 … r²) and S = U·Uᵀ into buf[r² … 2r²), both r×r row-major. */
  private inverseGramInto(buf: Float64Array): void {
    const r = this.rank;
    const n = this.rows;
    const a = this.qrData;
    // U = R₁₁⁻¹ (upper triangular), row-major r×r, column by column; entries below the
    // diagonal are never read.
    const u = buf;
    for (let j = 0; j < r; j++) {
      u[j * r + j] = 1 / a[j * n + j];
      for (let i = j - 1; i >= 0; i--) {
        let s = 0;
        for (let k = i + 1; k <= j; k++) s += a[k * n + i] * u[k * r + j];
        u[i * r + j] = -s / a[i * n + i];
      }
    }
    // S = U·Uᵀ, symmetric: S_ij = Σ_{k ≥ max(i,j)} U_ik U_jk.
    const so = r * r;
    for (let i = 0; i < r; i++) {
      for (let j = i; j < r; j++) {
        let s = 0;
        for (let k = j; k < r; k++) s += u[i * r + k] * u[j * r + k];
        buf[so + i * r + j] = s;
        buf[so + j * r + i] = s;
      }
    }
  }

  /**
   * (ΦᵀΦ)⁻¹ in Φ's original units, p×p row-major: D·P₁·S·P₁ᵀ·D on the kept columns, zero rows
   * and columns for dropped ones (then it is the inverse on the kept subspace only); exactly
   * symmetric.
   * Cost r³/3 + p² flops.
   */
  xtxInv(): Float64Array {
    const out = new Float64Array(this.cols * this.cols);
    this.xtxInvInto(out);
    return out;
  }

  /** As {@link xtxInv}, writing into `out` (length p², all zero on entry). */
  xtxInvInto(out: Float64Array): void {
    const p = this.cols;
    const r = this.rank;
    if (gramScratch.length < 2 * r * r) gramScratch = new Float64Array(Math.max(2 * r * r, 2 * gramScratch.length));
    const buf = gramScratch;
    this.inverseGramInto(buf);
    const so = r * r;
    for (let k = 0; k < r; k++) {
      const i = this.perm[k];
      const si = this.scale[i];
      for (let l = k; l < r; l++) {
        const j = this.perm[l];
        const v = si * buf[so + k * r + l] * this.scale[j];
        out[i * p + j] = v;
        out[j * p + i] = v;
      }
    }
  }

  /** The upper-trapezoidal R (min(n,p)×p, row-major) of the scaled, pivoted factorisation. */
  r(): DesignMatrix {
    const n = this.rows;
    const p = this.cols;
    const m = Math.min(n, p);
    const data = new Float64Array(m * p);
    for (let i = 0; i < m; i++) for (let j = i; j < p; j++) data[i * p + j] = this.qrData[j * n + i];
    return { rows: m, cols: p, data };
  }

  /** The thin Q (n×min(n,p), row-major, orthonormal columns), formed explicitly. Cost O(n²p). */
  q(): DesignMatrix {
    const n = this.rows;
    const m = Math.min(n, this.cols);
    const data = new Float64Array(n * m);
    const e = new Float64Array(n);
    for (let j = 0; j < m; j++) {
      e.fill(0);
      e[j] = 1;
      this.qMul(e, e);
      for (let i = 0; i < n; i++) data[i * m + j] = e[i];
    }
    return { rows: n, cols: m, data };
  }

  /**
   * For each dropped column, the kept columns it is (numerically) a combination of: w solves
   * R₁₁w = R₁₂[:, k], and kept column i is named when |w_i| > 1e-6·max|w| (all columns are unit
   * norm, so w compares like with like). Cost r² per dropped column.
   */
  dependencies(): Dependency[] {
    const n = this.rows;
    const p = this.cols;
    const r = this.rank;
    const a = this.qrData;
    const out: Dependency[] = [];
    const w = new Float64Array(r);
    for (let k = r; k < p; k++) {
      const column = this.perm[k];
      if (this.zero[column] === 1) {
        out.push({ column, on: [], zero: true });
        continue;
      }
      for (let i = 0; i < r; i++) w[i] = a[k * n + i];
      for (let i = r - 1; i >= 0; i--) {
        let s = w[i];
        for (let j = i + 1; j < r; j++) s -= a[j * n + i] * w[j];
        w[i] = s / a[i * n + i];
      }
      let big = 0;
      for (let i = 0; i < r; i++) big = Math.max(big, Math.abs(w[i]));
      const idx: number[] = [];
      for (let i = 0; i < r; i++) if (Math.abs(w[i]) > 1e-6 * big) idx.push(i);
      idx.sort((x, y) => Math.abs(w[y]) - Math.abs(w[x]) || x - y);
      out.push({ column, on: idx.map((i) => this.perm[i]), zero: big === 0 });
    }
    return out;
  }

  private computeCondition(): number {
    const r = this.rank;
    if (r === 0) return Infinity;
    const n = this.rows;
    const a = this.qrData;
    // Largest eigenvalue of RᵀR: x ← Rᵀ(R x).
    const x = new Float64Array(r);
    const t = new Float64Array(r);
    const top = powerMethod(r, x, t, (v, out) => {
      for (let i = 0; i < r; i++) {
        let s = 0;
        for (let j = i; j < r; j++) s += a[j * n + i] * v[j];
        out[i] = s;
      }
      for (let j = r - 1; j >= 0; j--) {
        let s = 0;
        for (let i = 0; i <= j; i++) s += a[j * n + i] * out[i];
        v[j] = s;
      }
    });
    // Largest eigenvalue of R⁻¹R⁻ᵀ: x ← R⁻¹(R⁻ᵀ x), two triangular solves.
    const bottom = powerMethod(r, x, t, (v) => {
      for (let i = 0; i < r; i++) {
        let s = v[i];
        for (let k = 0; k < i; k++) s -= a[i * n + k] * v[k];
        v[i] = s / a[i * n + i];
      }
      for (let i = r - 1; i >= 0; i--) {
        let s = v[i];
        for (let j = i + 1; j < r; j++) s -= a[j * n + i] * v[j];
        v[i] = s / a[i * n + i];
      }
    });
    return Math.sqrt(top * bottom);
  }
}

/**
 * Power method for the largest eigenvalue of a symmetric positive semi-definite operator
 * applied in place by `apply(v, scratch)`; the start vector is (1, 1 + 1/4r, 1 + 2/4r, …).
 * Returns ‖A·u‖ for the last unit iterate u.
 */
function powerMethod(r: number, v: Float64Array, scratch: Float64Array, apply: (v: Float64Array, scratch: Float64Array) => void): number {
  for (let i = 0; i < r; i++) v[i] = 1 + i / (4 * r);
  let lambda = 0;
  for (let it = 0; it < 200; it++) {
    let nn = 0;
    for (let i = 0; i < r; i++) nn += v[i] * v[i];
    const inv = 1 / Math.sqrt(nn);
    for (let i = 0; i < r; i++) v[i] *= inv;
    apply(v, scratch);
    // For a unit vector u, ‖A·u‖ converges to the largest eigenvalue of a PSD A.
    let aa = 0;
    for (let i = 0; i < r; i++) aa += v[i] * v[i];
    const next = Math.sqrt(aa);
    if (!Number.isFinite(next)) return Infinity;
    if (it > 0 && Math.abs(next - lambda) <= 1e-10 * next) return next;
    lambda = next;
  }
  return lambda;
}

/**
 * Factors Φ (row-major, n×p) as Φ·D·P = Q·R; see the module comment for the variant and source.
 * Φ is copied (once, into column-major order) and left untouched. Entries must be finite.
 */
export function qr(phi: DesignMatrix, options: QrOptions = {}): QrFactorization {
  const f = tryQr(phi, options);
  if (f === undefined) throw new RangeError('qr: Φ has an entry that is not finite');
  return f;
}

/** U = R₁₁⁻¹ and S = U·Uᵀ while (ΦᵀΦ)⁻¹ is formed; shared, grown on demand. */
let gramScratch = new Float64Array(128);

/**
 * The partial column norms of the pivoting (2p) of the factorisation in progress; shared, grown
 * on demand, never referenced after `tryQr` returns.
 */
let normScratch = new Float64Array(48);

/**
 * As {@link qr}, but returns undefined (instead of throwing) when Φ has a non-finite entry.
 * `storage`, when given (length ≥ n·(p + 1)), receives the factors instead of a new array: a
 * caller that factors many matrices and drops each factorisation before the next (lstsq) saves
 * the allocation. The returned object then reads `storage`, so it is valid only until `storage`
 * is written again. `rhs`, when given (length n), is overwritten by Qᵀ·rhs: it rides along as
 * one more (unpivoted, unscaled) column, each reflection applied to it with the same arithmetic
 * as {@link QrFactorization.qtMul}, so the result is the same to the last bit.
 */
export function tryQr(phi: DesignMatrix, options: QrOptions = {}, storage?: Float64Array, rhs?: Float64Array): QrFactorization | undefined {
  const n = phi.rows;
  const p = phi.cols;
  if (phi.data.length !== n * p) throw new RangeError(`qr: data length ${phi.data.length}, expected ${n}×${p}`);
  const tolerance = options.rankTolerance ?? Math.max(n, p) * EPSILON;
  if (!(tolerance >= 0)) throw new RangeError(`qr: rankTolerance must be ≥ 0, got ${tolerance}`);
  if (storage !== undefined && storage.length < n * (p + 1)) throw new RangeError(`qr: storage length ${storage.length}, expected at least ${n}×${p + 1}`);
  if (rhs !== undefined && rhs.length !== n) throw new RangeError(`qr: rhs length ${rhs.length}, expected ${n}`);
  const src = phi.data;
  const extra = rhs === undefined ? 0 : 1;
  const a = storage ?? new Float64Array(n * (p + extra));
  const scale = new Float64Array(p);
  const zero = new Uint8Array(p);
  if (normScratch.length < 2 * p) normScratch = new Float64Array(Math.max(2 * p, 2 * normScratch.length));
  // Column by column: copy into column-major order while summing squares (a register
  // accumulator per column), then scale the contiguous column (Φ_s = Φ·D).
  for (let j = 0; j < p; j++) {
    const off = j * n;
    let ss = 0;
    for (let i = 0; i < n; i++) {
      const v = src[i * p + j];
      a[off + i] = v;
      ss += v * v;
    }
    let norm = Math.sqrt(ss);
    if (!(norm > 1e-150 && norm < 1e150)) {
      // NaN/Infinity, zero, or a sum of squares at risk of over- or underflow: rescale by the
      // largest magnitude first.
      let big = 0;
      for (let i = 0; i < n; i++) {
        const v = Math.abs(a[off + i]);
        if (!(v <= Number.MAX_VALUE)) return undefined;
        if (v > big) big = v;
      }
      if (big === 0) {
        scale[j] = 1;
        zero[j] = 1;
        continue;
      }
      let t = 0;
      for (let i = 0; i < n; i++) {
        const v = a[off + i] / big;
        t += v * v;
      }
      norm = big * Math.sqrt(t);
    }
    const sc = 1 / norm;
    scale[j] = sc;
    for (let i = 0; i < n; i++) a[off + i] *= sc;
  }
  const tau = new Float64Array(p);
  const perm = new Int32Array(p);
  if (rhs !== undefined) a.set(rhs, n * p);
  factorInPlace(a, n, p, extra, tau, perm, zero, normScratch);
  if (rhs !== undefined) rhs.set(a.subarray(n * p, n * (p + 1)));
  return new QrFactorization(n, p, a, tau, scale, perm, tolerance, zero);
}

/**
 * Contiguous copy of the current Householder vector v_k (below the diagonal), shared by every
 * factorisation: the column updates read v from this small buffer instead of from the strided
 * factor storage. Grown on demand; only used inside one synchronous `factorInPlace` call.
 */
let reflectorScratch = new Float64Array(256);

/**
 * Householder QR with column pivoting of the column-major n×p `a`, in place; `extra` (0 or 1)
 * more columns after the p are transformed by the reflections but never pivoted. The update of the
 * trailing columns handles four columns per pass over v_k; each column's sums are formed in the
 * same order as one column at a time, so the factors do not depend on the pairing.
 */
function factorInPlace(a: Float64Array, n: number, p: number, extra: number, tau: Float64Array, perm: Int32Array, zero: Uint8Array, norms: Float64Array): void {
  const pe = p + extra; // columns the reflections are applied to
  const vn1 = norms.subarray(0, p); // partial column norms, downdated
  const vn2 = norms.subarray(p, 2 * p); // norms at last exact computation
  for (let j = 0; j < p; j++) {
    // Scaled columns have unit norm (to rounding): start every non-zero column at exactly 1,
    // so the first pivot is the first non-zero column.
    perm[j] = j;
    vn1[j] = zero[j] === 1 ? 0 : 1;
    vn2[j] = vn1[j];
  }
  if (reflectorScratch.length < n) reflectorScratch = new Float64Array(Math.max(n, 2 * reflectorScratch.length));
  const v = reflectorScratch;
  const tol3z = Math.sqrt(EPSILON);
  const m = Math.min(n, p);
  for (let k = 0; k < m; k++) {
    // Pivot: the column of largest partial norm; near-ties (within 1e-12 relatively, as
    // for duplicated terms) go to the earlier original column, so the later one is dropped.
    let pvt = k;
    for (let j = k + 1; j < p; j++) {
      const a1 = vn1[j];
      const a0 = vn1[pvt];
      if (a1 > a0 * (1 + 1e-12) || (a1 >= a0 * (1 - 1e-12) && perm[j] < perm[pvt])) pvt = j;
    }
    if (pvt !== k) {
      const o1 = pvt * n;
      const o2 = k * n;
      for (let i = 0; i < n; i++) {
        const t = a[o1 + i];
        a[o1 + i] = a[o2 + i];
        a[o2 + i] = t;
      }
      const tp = perm[pvt];
      perm[pvt] = perm[k];
      perm[k] = tp;
      vn1[pvt] = vn1[k];
      vn2[pvt] = vn2[k];
    }
    // Householder vector for a[k:n, k]: β = −sign(α)·‖x‖, τ = (β − α)/β, v = x/(α − β).
    // v (without its leading 1) lives in v[0 … len) while the trailing columns are updated.
    const ok = k * n;
    const below = ok + k + 1; // first entry under the diagonal
    const len = n - k - 1;
    const alpha = a[ok + k];
    let xs = 0;
    for (let i = 0; i < len; i++) {
      const x = a[below + i];
      v[i] = x;
      xs += x * x;
    }
    if (xs === 0) {
      tau[k] = 0;
    } else {
      const norm = Math.sqrt(alpha * alpha + xs);
      const beta = alpha >= 0 ? -norm : norm;
      const t = (beta - alpha) / beta;
      tau[k] = t;
      const inv = 1 / (alpha - beta);
      for (let i = 0; i < len; i++) {
        const x = v[i] * inv;
        v[i] = x;
        a[below + i] = x;
      }
      a[ok + k] = beta;
      // Apply H_k to the remaining columns, four at a time (four independent sums per pass
      // over v), then two, then one: s_j = τ·(a_kj + vᵀa[k+1:n, j]), a[k:n, j] −= s_j·(1, v).
      let j = k + 1;
      for (; j + 3 < pe; j += 4) {
        const o1 = j * n + k + 1;
        const o2 = o1 + n;
        const o3 = o2 + n;
        const o4 = o3 + n;
        let s1 = a[o1 - 1];
        let s2 = a[o2 - 1];
        let s3 = a[o3 - 1];
        let s4 = a[o4 - 1];
        for (let i = 0; i < len; i++) {
          const vi = v[i];
          s1 += vi * a[o1 + i];
          s2 += vi * a[o2 + i];
          s3 += vi * a[o3 + i];
          s4 += vi * a[o4 + i];
        }
        s1 *= t;
        s2 *= t;
        s3 *= t;
        s4 *= t;
        a[o1 - 1] -= s1;
        a[o2 - 1] -= s2;
        a[o3 - 1] -= s3;
        a[o4 - 1] -= s4;
        for (let i = 0; i < len; i++) {
          const vi = v[i];
          a[o1 + i] -= s1 * vi;
          a[o2 + i] -= s2 * vi;
          a[o3 + i] -= s3 * vi;
          a[o4 + i] -= s4 * vi;
        }
      }
      if (j + 1 < pe) {
        const o1 = j * n + k + 1;
        const o2 = o1 + n;
        let s1 = a[o1 - 1];
        let s2 = a[o2 - 1];
        for (let i = 0; i < len; i++) {
          const vi = v[i];
          s1 += vi * a[o1 + i];
          s2 += vi * a[o2 + i];
        }
        s1 *= t;
        s2 *= t;
        a[o1 - 1] -= s1;
        a[o2 - 1] -= s2;
        for (let i = 0; i < len; i++) {
          const vi = v[i];
          a[o1 + i] -= s1 * vi;
          a[o2 + i] -= s2 * vi;
        }
        j += 2;
      }
      if (j < pe) {
        const o1 = j * n + k + 1;
        let s1 = a[o1 - 1];
        for (let i = 0; i < len; i++) s1 += v[i] * a[o1 + i];
        s1 *= t;
        a[o1 - 1] -= s1;
        for (let i = 0; i < len; i++) a[o1 + i] -= s1 * v[i];
      }
    }
    // Downdate partial norms; recompute when cancellation makes the downdate unreliable.
    for (let j = k + 1; j < p; j++) {
      if (vn1[j] === 0) continue;
      const ratio = Math.abs(a[j * n + k]) / vn1[j];
      let temp = 1 - ratio * ratio;
      if (temp < 0) temp = 0;
      const q = vn1[j] / vn2[j];
      if (temp * q * q <= tol3z) {
        let s = 0;
        const oj = j * n;
        for (let i = k + 1; i < n; i++) s += a[oj + i] * a[oj + i];
        vn1[j] = Math.sqrt(s);
        vn2[j] = vn1[j];
      } else {
        vn1[j] *= Math.sqrt(temp);
      }
    }
  }
}
