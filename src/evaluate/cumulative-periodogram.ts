/**
 * The normalised cumulative periodogram of residuals and Bartlett's test of whiteness on it.
 *
 * Variant: residuals e_1 … e_n (missing values dropped, mean removed); periodogram ordinates at
 * the Fourier frequencies f_j = j/n, j = 1 … q with q = ⌊(n − 1)/2⌋ (the Nyquist ordinate of an
 * even n left out, so every ordinate has two degrees of freedom):
 *   I(f_j) = (2/n) · |Σ_t e_t · exp(−2πi f_j t)|²,
 *   C_j = Σ_{i≤j} I(f_i) / Σ_{i≤q} I(f_i).
 * For white noise C_j rises along the line j/q; a trend or a cycle left in the residuals shows as
 * a bulge. Bartlett's statistic is D = max_j |C_j − j/q| over j = 1 … q − 1 (C_q = 1 always);
 * the Kolmogorov–Smirnov band j/q ± K_α/√(q − 1) holds C with probability about 1 − α under
 * whiteness, K_0.05 = 1.358, K_0.25 = 1.019, and the p-value is the Kolmogorov tail
 * Q(√(q − 1) · D) = 2 Σ_{k≥1} (−1)^{k−1} exp(−2k²x²).
 *
 * Sources: Bartlett, "An Introduction to Stochastic Processes" (1955), §9.2; Box, Jenkins,
 * Reinsel & Ljung, "Time Series Analysis", 5th ed. (2015), §8.2.4 (the cumulative periodogram
 * check and its limit lines ±K_ε/√q); Kolmogorov's limit distribution as tabulated in Smirnov
 * (1948), "Table for estimating the goodness of fit of empirical distributions".
 * Cost: O(n·q), direct sums (residual series are short).
 */

export interface CumulativePeriodogram {
  /** Number of finite residuals used. */
  n: number;
  /** Fourier frequencies f_j = j/n (cycles per period), j = 1 … q. */
  frequency: Float64Array;
  /** Periodogram ordinates I(f_j). */
  ordinate: Float64Array;
  /** Normalised cumulative periodogram C_j (C_q = 1); all NaN when the residuals are constant. */
  cumulative: Float64Array;
  /** Bartlett's statistic D = max |C_j − j/q|, j < q (NaN when q < 2 or constant residuals). */
  statistic: number;
  /** Half-width K_0.05/√(q − 1) of the 95 % band around j/q. */
  band95: number;
  /** Kolmogorov tail probability of √(q − 1)·D (NaN when the statistic is). */
  pValue: number;
}

/** Kolmogorov's K_α, the 1 − α quantile of the limit distribution of √m·D (Smirnov 1948). */
export const KOLMOGOROV_K = { 0.25: 1.019, 0.1: 1.224, 0.05: 1.358, 0.01: 1.628 } as const;

/**
 * Kolmogorov's limit tail probability Q(x) = P(√m·D > x) = 2 Σ_{k≥1} (−1)^{k−1} e^{−2k²x²}
 * (1 for x ≤ 0; the series converges fast for x > 0.3, below it the value is 1 to 10 digits).
 * @example kolmogorovTail(1.358) ≈ 0.050
 */
export function kolmogorovTail(x: number): number {
  if (!(x > 0)) return 1;
  if (x < 0.3) return 1;
  let sum = 0;
  for (let k = 1; k <= 100; k++) {
    const term = Math.exp(-2 * k * k * x * x);
    sum += (k % 2 === 1 ? 1 : -1) * term;
    if (term < 1e-16) break;
  }
  return Math.min(1, Math.max(0, 2 * sum));
}

/** The cumulative periodogram of `residuals` with Bartlett's test (see the module comment). */
export function cumulativePeriodogram(residuals: ArrayLike<number>): CumulativePeriodogram {
  const e: number[] = [];
  for (let i = 0; i < residuals.length; i++) if (Number.isFinite(residuals[i])) e.push(residuals[i]);
  const n = e.length;
  const mean = n > 0 ? e.reduce((s, x) => s + x, 0) / n : 0;
  for (let i = 0; i < n; i++) e[i] -= mean;
  const q = Math.max(0, Math.floor((n - 1) / 2));
  const frequency = new Float64Array(q);
  const ordinate = new Float64Array(q);
  let total = 0;
  for (let j = 1; j <= q; j++) {
    const w = (2 * Math.PI * j) / n;
    let re = 0;
    let im = 0;
    for (let t = 0; t < n; t++) {
      re += e[t] * Math.cos(w * (t + 1));
      im -= e[t] * Math.sin(w * (t + 1));
    }
    frequency[j - 1] = j / n;
    ordinate[j - 1] = (2 / n) * (re * re + im * im);
    total += ordinate[j - 1];
  }
  const cumulative = new Float64Array(q).fill(Number.NaN);
  let statistic = Number.NaN;
  if (total > 0) {
    let run = 0;
    statistic = q >= 2 ? 0 : Number.NaN;
    for (let j = 1; j <= q; j++) {
      run += ordinate[j - 1];
      cumulative[j - 1] = j === q ? 1 : run / total;
      if (j < q) statistic = Math.max(statistic, Math.abs(cumulative[j - 1] - j / q));
    }
  }
  const m = q - 1;
  const band95 = m >= 1 ? KOLMOGOROV_K[0.05] / Math.sqrt(m) : Number.NaN;
  const pValue = Number.isFinite(statistic) && m >= 1 ? kolmogorovTail(Math.sqrt(m) * statistic) : Number.NaN;
  return { n, frequency, ordinate, cumulative, statistic, band95, pValue };
}
