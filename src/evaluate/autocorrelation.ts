/**
 * Sample autocorrelations of a series (residual diagnostics, the seasonality test of Naive2).
 */

/**
 * Sample autocorrelation function r_1 … r_maxLag, the standard estimator with the overall mean
 * and the lag-0 sum of squares as common denominator:
 *   r_k = Σ_{t=k+1}^{n} (x_t − x̄)(x_{t−k} − x̄) / Σ_{t=1}^{n} (x_t − x̄)².
 *
 * Missing values (NaN) are handled pairwise and never shift lags: x̄ and the denominator use the
 * finite values only, and a lag-k product is left out when either factor is missing. Without
 * missing values this is exactly the standard estimator. A constant series (zero denominator)
 * gives NaN for every lag; lags ≥ n give NaN.
 *
 * Returned array: index k − 1 holds r_k. Cost O(n · maxLag).
 * Source: Box, Jenkins, Reinsel & Ljung, "Time Series Analysis: Forecasting and Control",
 * 5th ed. (2015), chapter 2 (estimation of the autocorrelation function).
 * @example sampleAutocorrelations([1, 3, 1, 3], 2) → [−0.75, 0.5]   // −3/4, 2/4
 */
export function sampleAutocorrelations(x: ArrayLike<number>, maxLag: number): Float64Array {
  if (!Number.isInteger(maxLag) || maxLag < 0) throw new RangeError(`sampleAutocorrelations: maxLag must be an integer ≥ 0, got ${maxLag}`);
  const n = x.length;
  let sum = 0;
  let count = 0;
  for (let t = 0; t < n; t++) {
    if (Number.isFinite(x[t])) {
      sum += x[t];
      count++;
    }
  }
  const r = new Float64Array(maxLag);
  if (count === 0) return r.fill(Number.NaN);
  const mean = sum / count;
  let c0 = 0;
  for (let t = 0; t < n; t++) {
    if (Number.isFinite(x[t])) c0 += (x[t] - mean) * (x[t] - mean);
  }
  for (let k = 1; k <= maxLag; k++) {
    if (k >= n || c0 === 0) {
      r[k - 1] = Number.NaN;
      continue;
    }
    let ck = 0;
    for (let t = k; t < n; t++) {
      const a = x[t];
      const b = x[t - k];
      if (Number.isFinite(a) && Number.isFinite(b)) ck += (a - mean) * (b - mean);
    }
    r[k - 1] = ck / c0;
  }
  return r;
}
