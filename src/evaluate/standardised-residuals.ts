/**
 * Standardised one-step residuals and the count of those outside a bound.
 *
 * Variant: u_t = e_t / s, with s the standard deviation given by the caller (the asserted
 * equation's σ̂ = √(RSS/(n − k)), on the residuals' scale) or, without one, the root mean square
 * about zero √(Σ e_t² / n) of the finite residuals (about zero, not the mean, so a bias in the
 * residuals stays visible). Under white normal errors |u_t| > 2 with probability
 * 2·(1 − Φ(2)) = 0.0455 (Abramowitz & Stegun, "Handbook of Mathematical Functions" (1964),
 * Table 26.1), so about 4.6 % of the points fall outside ±2.
 * Cost: O(n).
 */

/** The bound, in standard deviations, outside which a standardised residual is marked. */
export const RESIDUAL_BOUND = 2;

/** P(|Z| > 2) for a standard normal Z, to four digits. */
export const OUTSIDE_TWO_SIGMA = 0.0455;

export interface StandardisedResiduals {
  /** u_t = e_t / scale, aligned with the residuals; NaN where the residual is missing. */
  values: Float64Array;
  /** The s used (NaN when no finite residual and no usable scale). */
  scale: number;
  /** Number of finite values. */
  n: number;
  /** Number of finite values with |u_t| > bound. */
  outside: number;
  /** Largest |u_t| (0 without finite values). */
  largest: number;
}

/**
 * Residuals divided by `scale` (see the module comment); a scale that is missing, not finite or
 * not positive falls back to the root mean square. `bound` (default 2) sets what counts as outside.
 * @example standardisedResiduals([1, -3], 1).outside → 1
 */
export function standardisedResiduals(residuals: ArrayLike<number>, scale?: number, bound = RESIDUAL_BOUND): StandardisedResiduals {
  let s = scale;
  if (s === undefined || !(s > 0) || !Number.isFinite(s)) {
    let sum = 0;
    let count = 0;
    for (let i = 0; i < residuals.length; i++) {
      if (Number.isFinite(residuals[i])) {
        sum += residuals[i] * residuals[i];
        count++;
      }
    }
    s = count > 0 ? Math.sqrt(sum / count) : Number.NaN;
  }
  const values = new Float64Array(residuals.length);
  let n = 0;
  let outside = 0;
  let largest = 0;
  for (let i = 0; i < residuals.length; i++) {
    const u = s > 0 ? residuals[i] / s : Number.NaN;
    values[i] = u;
    if (!Number.isFinite(u)) continue;
    n++;
    if (Math.abs(u) > bound) outside++;
    if (Math.abs(u) > largest) largest = Math.abs(u);
  }
  return { values, scale: s, n, outside, largest };
}
