/**
 * Recursive least squares with exponential forgetting, started from a batch fit, with a bounded,
 * exactly symmetric P and a running noise-variance estimate.
 *
 * Variant: the weighted least-squares recursion minimising Σ_s λ^{t−s}(y_s − φ_sᵀθ)², λ ∈ (0, 1]
 * (Ljung & Söderström, "Theory and Practice of Recursive Identification", MIT Press 1983,
 * Ch. 2, the RLS algorithm with a forgetting factor — section number not checked). One step,
 * with P = (Σ λ^{t−s} φ_sφ_sᵀ)⁻¹ (the unscaled convention: Cov θ ≈ σ²P, and at λ = 1 it is
 * exactly the (ΦᵀΦ)⁻¹ of the batch fit, `LstsqResult.xtxInv`):
 *   ε = y − φᵀθ                 (innovation, before the update)
 *   g = Pφ,  s = φᵀg,  d = λ + s
 *   K = g/d,  θ ← θ + Kε,  P ← (P − g·gᵀ/d)/λ
 * P is updated on one triangle and mirrored, so it stays exactly symmetric. Bound: when
 * trace(P) exceeds `traceMax`, P is multiplied by traceMax/trace(P) (a project safeguard that
 * keeps P's eigenvectors and positive definiteness; no published source claimed), so forgetting
 * with regressors that do not excite every direction cannot make P grow without limit.
 * Noise: the minimised weighted criterion and the effective sample size follow
 *   V ← λV + λε²/d,  N ← λN + 1       (at λ = 1, V is exactly the batch RSS on all rows so far),
 * and σ̂² = V/(N − p) when N − p ≥ 1, else V/N. Innovation variance reported:
 * σ̂²·(1 + φᵀPφ) with σ̂² from before the update (exact for λ = 1; an approximation under
 * forgetting).
 * Cost: 2p² + O(p) flops per update, no allocation when `update` is given an output object.
 *
 * @example
 *   const rls = Rls.fromFit(lstsq(phi, y, names), { lambda: 1 });
 *   for (each new row φ, y) rls.update(φ, y);
 *   rls.theta; // equals lstsq on all rows to ~1e-12 (asserted in test/linalg/rls.test.ts)
 */
import { z } from 'zod';
import { ModelError, StoreError, UsageError } from '../data/errors.js';
import type { LstsqResult } from './lstsq.js';

export interface RlsOptions {
  /** Forgetting factor λ ∈ (0, 1] (default 1: no forgetting). */
  lambda?: number;
  /** Ceiling on trace(P) (default 1e4·trace(P₀)). */
  traceMax?: number;
}

export interface RlsState extends RlsOptions {
  /** Starting coefficients (length p). */
  theta: ArrayLike<number>;
  /** Starting P, p×p row-major, symmetric positive definite. */
  P: ArrayLike<number>;
  /** Starting weighted residual sum of squares V and effective sample size N (default 0, 0). */
  rss?: number;
  count?: number;
}

export interface RlsStep {
  /** φᵀθ before the update. */
  prediction: number;
  /** y − φᵀθ before the update. */
  innovation: number;
  /** σ̂²(1 + φᵀPφ), P and σ̂² from before the update (P = (ΦᵀΦ)⁻¹ convention). */
  innovationVariance: number;
  /** Gain K = Pφ/(λ + φᵀPφ) used by the update. */
  gain: Float64Array;
}

/** The plain-array form a model file stores; `Rls.fromJSON(rls.toJSON())` restores it exactly. */
export interface RlsJson {
  theta: number[];
  /** Rows of P. */
  P: number[][];
  lambda: number;
  traceMax: number;
  rss: number;
  count: number;
  updates: number;
}

const rlsJsonSchema = z.object({
  theta: z.array(z.number()),
  P: z.array(z.array(z.number())),
  lambda: z.number(),
  traceMax: z.number(),
  rss: z.number(),
  count: z.number(),
  updates: z.number().int().nonnegative(),
});

export class Rls {
  /** Number of parameters p. */
  readonly p: number;
  private lam: number;
  private readonly ceiling: number;
  private readonly th: Float64Array;
  private readonly pm: Float64Array;
  private readonly g: Float64Array;
  private v: number;
  private count: number;
  private steps = 0;

  constructor(state: RlsState) {
    const p = state.theta.length;
    if (state.P.length !== p * p) throw new RangeError(`Rls: P has ${state.P.length} entries, expected ${p}×${p}`);
    this.p = p;
    this.lam = checkLambda(state.lambda ?? 1);
    this.th = Float64Array.from(state.theta);
    this.pm = Float64Array.from(state.P);
    this.g = new Float64Array(p);
    for (let i = 0; i < p; i++) {
      if (!Number.isFinite(this.th[i])) throw new RangeError(`Rls: theta[${i}] is not finite`);
      for (let j = 0; j < p; j++) {
        if (!Number.isFinite(this.pm[i * p + j])) throw new RangeError(`Rls: P(${i}, ${j}) is not finite`);
      }
    }
    if (!isSymmetricPositiveDefinite(this.pm, p)) throw new RangeError('Rls: P must be symmetric positive definite');
    for (let i = 0; i < p; i++) {
      for (let j = i + 1; j < p; j++) {
        const m = 0.5 * (this.pm[i * p + j] + this.pm[j * p + i]);
        this.pm[i * p + j] = m;
        this.pm[j * p + i] = m;
      }
    }
    let tr = 0;
    for (let i = 0; i < p; i++) tr += this.pm[i * p + i];
    // With no coefficients (p = 0, e.g. a random walk) trace(P) is 0 and there is nothing to bound.
    this.ceiling = state.traceMax ?? (p === 0 ? 1 : 1e4 * tr);
    if (!(this.ceiling > 0) || !Number.isFinite(this.ceiling)) {
      throw new UsageError('invalid-trace-max', 'the ceiling on trace(P) must be a positive finite number', { found: String(state.traceMax), expected: 'a number > 0' });
    }
    this.v = state.rss ?? 0;
    this.count = state.count ?? 0;
    if (!(this.v >= 0) || !(this.count >= 0)) throw new RangeError('Rls: rss and count must be ≥ 0');
  }

  /**
   * Starts from a batch fit: θ₀ = θ̂, P₀ = (ΦᵀΦ)⁻¹, V₀ = RSS, N₀ = n. The fit must be of full
   * rank (a dropped term has no finite P entry to start from): ModelError `rank-deficient`.
   */
  static fromFit(fit: LstsqResult, options: RlsOptions = {}): Rls {
    if (fit.rank < fit.p) {
      const dropped = fit.names.filter((_, j) => !fit.active[j]).map((s) => `"${s}"`);
      throw new ModelError('rank-deficient', `cannot learn online from a rank-deficient fit (rank ${fit.rank} of ${fit.p}; dropped ${dropped.join(', ')})`, {
        hint: 'refit without the dropped terms',
      });
    }
    return new Rls({ theta: fit.theta, P: fit.xtxInv, lambda: options.lambda, traceMax: options.traceMax, rss: fit.rss, count: fit.n });
  }

  /** Restores the exact state written by {@link toJSON}; StoreError when the value is malformed. */
  static fromJSON(json: unknown): Rls {
    const parsed = rlsJsonSchema.safeParse(json);
    if (!parsed.success) {
      throw new StoreError('invalid-rls-state', 'stored online-learning state is malformed', { found: parsed.error.issues[0]?.path.join('.') ?? '', expected: 'theta, P, lambda, traceMax, rss, count, updates' });
    }
    const s = parsed.data;
    const p = s.theta.length;
    if (s.P.length !== p || s.P.some((r) => r.length !== p)) {
      throw new StoreError('invalid-rls-state', `stored P is not ${p}×${p}`, { expected: `${p} rows of ${p} numbers` });
    }
    try {
      const r = new Rls({ theta: s.theta, P: s.P.flat(), lambda: s.lambda, traceMax: s.traceMax, rss: s.rss, count: s.count });
      r.steps = s.updates;
      return r;
    } catch (e) {
      throw new StoreError('invalid-rls-state', `stored online-learning state is invalid: ${(e as Error).message}`);
    }
  }

  /** A copy of θ. */
  get theta(): Float64Array {
    return this.th.slice();
  }

  /** A copy of P (p×p row-major). */
  get P(): Float64Array {
    return this.pm.slice();
  }

  get lambda(): number {
    return this.lam;
  }

  /** Changes the forgetting factor for later updates. */
  set lambda(value: number) {
    this.lam = checkLambda(value);
  }

  get traceMax(): number {
    return this.ceiling;
  }

  /** Running noise-variance estimate σ̂² (see the module comment). */
  get sigma2(): number {
    const dof = this.count - this.p;
    return dof >= 1 ? this.v / dof : this.v / this.count;
  }

  /** Weighted residual sum of squares V and effective sample size N. */
  get rss(): number {
    return this.v;
  }

  get effectiveCount(): number {
    return this.count;
  }

  /** Number of updates applied since the batch fit. */
  get updates(): number {
    return this.steps;
  }

  /** φᵀθ. Cost p flops. */
  predict(phi: ArrayLike<number>): number {
    const p = this.p;
    if (phi.length !== p) throw new RangeError(`Rls.predict: φ has ${phi.length} entries, expected ${p}`);
    let s = 0;
    for (let i = 0; i < p; i++) s += phi[i] * this.th[i];
    return s;
  }

  /**
   * One step of the recursion (module comment) for a new row (φ, y). Writes into `out` when
   * given (its `gain` must be a Float64Array of length p): then no memory is allocated. Throws
   * ModelError `non-finite` (state unchanged) when φ or y is not finite.
   */
  update(phi: ArrayLike<number>, y: number, out?: RlsStep): RlsStep {
    const p = this.p;
    if (phi.length !== p) throw new RangeError(`Rls.update: φ has ${phi.length} entries, expected ${p}`);
    const P = this.pm;
    const g = this.g;
    const th = this.th;
    let pred = 0;
    let s = 0;
    for (let i = 0; i < p; i++) {
      let gi = 0;
      const o = i * p;
      for (let j = 0; j < p; j++) gi += P[o + j] * phi[j];
      g[i] = gi;
      const fi = phi[i];
      s += fi * gi;
      pred += fi * th[i];
    }
    const eps = y - pred;
    if (!Number.isFinite(eps) || !Number.isFinite(s)) {
      throw new ModelError('non-finite', 'online update received a value that is not a finite number', { found: String(Number.isFinite(y) ? pred : y), expected: 'finite regressors and target' });
    }
    if (s < 0) s = 0; // P is positive definite; rounding can only make tiny s negative
    const sigma2 = this.sigma2;
    const lam = this.lam;
    const d = lam + s;
    const invD = 1 / d;
    const invLam = 1 / lam;
    const res = out ?? { prediction: 0, innovation: 0, innovationVariance: 0, gain: new Float64Array(p) };
    const gain = res.gain;
    for (let i = 0; i < p; i++) {
      const k = g[i] * invD;
      gain[i] = k;
      th[i] += k * eps;
    }
    let tr = 0;
    for (let i = 0; i < p; i++) {
      const gi = g[i] * invD;
      const o = i * p;
      for (let j = i; j < p; j++) {
        const val = (P[o + j] - gi * g[j]) * invLam;
        P[o + j] = val;
        P[j * p + i] = val;
      }
      tr += P[o + i];
    }
    if (tr > this.ceiling) {
      const f = this.ceiling / tr;
      for (let k = 0; k < p * p; k++) P[k] *= f;
    }
    this.v = lam * this.v + lam * eps * eps * invD;
    this.count = lam * this.count + 1;
    this.steps++;
    res.prediction = pred;
    res.innovation = eps;
    res.innovationVariance = sigma2 * (1 + s);
    return res;
  }

  /** Plain arrays and numbers; JSON numbers round-trip doubles exactly. */
  toJSON(): RlsJson {
    const p = this.p;
    const rows: number[][] = [];
    for (let i = 0; i < p; i++) rows.push(Array.from(this.pm.subarray(i * p, (i + 1) * p)));
    return { theta: Array.from(this.th), P: rows, lambda: this.lam, traceMax: this.ceiling, rss: this.v, count: this.count, updates: this.steps };
  }
}

function checkLambda(lambda: number): number {
  if (!(lambda > 0 && lambda <= 1)) {
    throw new UsageError('invalid-forgetting', 'the forgetting factor must lie in (0, 1]', { found: String(lambda), expected: 'a number with 0 < λ ≤ 1', hint: 'typical values are 0.95 to 1' });
  }
  return lambda;
}

/** Symmetry to 1e-12 relative and a successful Cholesky factorisation (Golub & Van Loan 2013, Alg. 4.2.1). Cost p³/3. */
export function isSymmetricPositiveDefinite(a: ArrayLike<number>, p: number): boolean {
  const l = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < i; j++) {
      const x = a[i * p + j];
      const y = a[j * p + i];
      if (Math.abs(x - y) > 1e-12 * Math.max(Math.abs(x), Math.abs(y), Number.MIN_VALUE)) return false;
    }
  }
  for (let j = 0; j < p; j++) {
    let d = a[j * p + j];
    for (let k = 0; k < j; k++) d -= l[j * p + k] * l[j * p + k];
    if (!(d > 0)) return false;
    const ljj = Math.sqrt(d);
    l[j * p + j] = ljj;
    for (let i = j + 1; i < p; i++) {
      let s = a[i * p + j];
      for (let k = 0; k < j; k++) s -= l[i * p + k] * l[j * p + k];
      l[i * p + j] = s / ljj;
    }
  }
  return true;
}
