/**
 * Information criteria AIC, AICc and BIC on Gaussian one-step errors, and Akaike weights.
 *
 * Convention (used by every candidate so scores compare): the n one-step errors are taken as
 * independent N(0, σ²) with σ² at its maximum-likelihood value RSS/n, so the maximised
 * log-likelihood is
 *   log L = −(n/2)·(ln(2π·RSS/n) + 1) + J,
 * where J = `logJacobian` = Σ_t ln|g'(y_t)| for a candidate scored on a transformed scale
 * z = g(y) (e.g. J = −Σ ln y_t for g = ln), which puts its likelihood on the original scale
 * (Box & Cox, "An analysis of transformations", JRSS B 26, 1964, §2, the Jacobian of the
 * transformation). k counts every estimated coefficient plus the noise variance. Then
 *   AIC  = −2 log L + 2k                      (Akaike, "A new look at the statistical model
 *                                               identification", IEEE TAC 19(6), 1974, eq. (3)
 *                                               — equation number from memory)
 *   AICc = AIC + 2k(k+1)/(n−k−1)              (Hurvich & Tsai, "Regression and time series model
 *                                               selection in small samples", Biometrika 76(2),
 *                                               1989); Infinity when n − k − 1 ≤ 0
 *   BIC  = −2 log L + k·ln n                  (Schwarz, "Estimating the dimension of a model",
 *                                               Annals of Statistics 6(2), 1978)
 * RSS = 0 gives log L = +Infinity and every criterion −Infinity (a perfect fit).
 * Cost O(1).
 *
 * @example
 *   criteria(2, 10, 3)
 *   // logLik = −5·(ln(0.4π) + 1) ≈ −6.142196, aic ≈ 18.284392, aicc ≈ 22.284392, bic ≈ 19.192147
 *   // (arithmetic written out in test/select/criteria.test.ts)
 */

/** Which information criterion ranks candidates. */
export type Criterion = 'aic' | 'aicc' | 'bic';

export const CRITERIA: readonly Criterion[] = ['aic', 'aicc', 'bic'];

export interface CriteriaOptions {
  /** Σ ln|g'(y_t)| over the scored observations, added to log L (0 for untransformed data). */
  logJacobian?: number;
}

export interface CriteriaValues {
  logLik: number;
  aic: number;
  aicc: number;
  bic: number;
}

/**
 * The criteria for a fit with residual sum of squares `rss` on `n` one-step errors and `k`
 * estimated parameters (coefficients + noise variance). Throws RangeError for n < 1, k < 0 or
 * rss < 0 (programming errors: callers validate user input before this point).
 */
export function criteria(rss: number, n: number, k: number, options: CriteriaOptions = {}): CriteriaValues {
  if (!(n >= 1) || !Number.isInteger(n)) throw new RangeError(`criteria: n must be a positive integer, got ${n}`);
  if (!(k >= 0) || !Number.isInteger(k)) throw new RangeError(`criteria: k must be a non-negative integer, got ${k}`);
  if (!(rss >= 0)) throw new RangeError(`criteria: rss must be ≥ 0, got ${rss}`);
  const jac = options.logJacobian ?? 0;
  const logLik = -(n / 2) * (Math.log((2 * Math.PI * rss) / n) + 1) + jac;
  const aic = -2 * logLik + 2 * k;
  const denom = n - k - 1;
  const aicc = denom > 0 ? aic + (2 * k * (k + 1)) / denom : Infinity;
  const bic = -2 * logLik + k * Math.log(n);
  return { logLik, aic, aicc, bic };
}

/**
 * Akaike weights w_i = exp(−Δ_i/2) / Σ_j exp(−Δ_j/2), Δ_i = value_i − min_j value_j (Burnham &
 * Anderson, "Model Selection and Multimodel Inference", 2nd ed. 2002, §2.9, eq. (2.14) —
 * equation number from memory). Works for any of the criteria. Non-finite values (Infinity, NaN)
 * get weight 0; if no value is finite every weight is 0. When the minimum is −Infinity, the
 * candidates attaining it share the weight equally. Cost O(m).
 *
 * @example
 *   akaikeWeights([0, 2, 4]) // [1, e⁻¹, e⁻²]/(1 + e⁻¹ + e⁻²) ≈ [0.66524, 0.24473, 0.09003]
 */
export function akaikeWeights(values: number[]): number[] {
  const m = values.length;
  const w = new Array<number>(m).fill(0);
  let best = Infinity;
  for (const v of values) if (v < best) best = v;
  if (best === Infinity || Number.isNaN(best)) return w;
  if (best === -Infinity) {
    const count = values.filter((v) => v === -Infinity).length;
    return values.map((v) => (v === -Infinity ? 1 / count : 0));
  }
  let total = 0;
  for (let i = 0; i < m; i++) {
    const v = values[i];
    if (Number.isFinite(v)) {
      w[i] = Math.exp(-(v - best) / 2);
      total += w[i];
    }
  }
  for (let i = 0; i < m; i++) w[i] /= total;
  return w;
}

/** How a criterion is written for people: AIC, AICc, BIC. */
export function criterionLabel(c: Criterion | string): string {
  return ({ aic: 'AIC', aicc: 'AICc', bic: 'BIC' } as Record<string, string>)[c] ?? c;
}
