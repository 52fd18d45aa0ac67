/**
 * Prewhitened cross-correlation: the first step of transfer-function identification, used to
 * guess each input's delay before the structure search refines it.
 *
 * Procedure (Box, Jenkins, Reinsel & Ljung, "Time Series Analysis: Forecasting and Control",
 * 5th ed. 2015, §12.2.1 "Identification of transfer function models" — section number from
 * memory):
 * 1. Fit an autoregression φ(B)x_t = c + α_t to the input x by least squares, its order p =
 *    0…maxOrder chosen by AICc on one common sample (criteria.ts), so α is close to white.
 * 2. Filter the output with the same operator: β_t = φ(B)y_t.
 * 3. Cross-correlate: r_αβ(k) = c_αβ(k) / (s_α s_β), c_αβ(k) = (1/n) Σ_t (α_t − ᾱ)(β_{t+k} − β̄)
 *    for k = 0…maxLag. Because α is white, r_αβ(k) is proportional to the impulse response
 *    weight v_k of y on x: v_k = r_αβ(k)·s_β/s_α.
 * 4. Under no effect at lag k, r_αβ(k) has standard error about 1/√n (the same reference,
 *    §12.1.3, for a white series against any series independent of it); lags beyond ±2/√n are
 *    called significant.
 * The delay is the first significant lag: the first period in which the input acts.
 *
 * Cost: (maxOrder + 1) small least-squares fits of n rows, plus O(n·maxLag).
 */
import { lstsq } from '../linalg/lstsq.js';
import { zeros } from '../linalg/matrix.js';
import { criteria } from './criteria.js';

export interface CrossCorrelation {
  /** r_αβ(k) for k = 0…maxLag (0 where it cannot be formed). */
  r: Float64Array;
  /** Impulse-response weights v_k = r_αβ(k)·s_β/s_α. */
  weights: Float64Array;
  /** The significance bound 2/√n on |r|. */
  bound: number;
  /** Pairs (α_t, β_t) the correlations were formed from. */
  n: number;
  /** Order p of the prewhitening autoregression. */
  order: number;
}

/** First index from which x holds only finite values (NaN heads of differenced arrays are skipped). */
function firstFinite(x: Float64Array, from: number): number {
  let s = from;
  for (let t = from; t < x.length; t++) if (!Number.isFinite(x[t])) s = t + 1;
  return s;
}

/**
 * Coefficients φ_1…φ_p of the AR prewhitener of x[start…] and its constant (p chosen by AICc
 * among 0…maxOrder on the rows t ≥ start + maxOrder). An input that does not vary is returned
 * with p = 0 (nothing to whiten).
 */
export function arPrewhitener(x: Float64Array, start: number, maxOrder: number): { phi: Float64Array; c: number } {
  const first = start + maxOrder;
  const rows = x.length - first;
  let best = { aicc: Infinity, phi: new Float64Array(0), c: 0 };
  for (let p = 0; p <= maxOrder; p++) {
    if (rows <= p + 3) break;
    const m = zeros(rows, p + 1);
    const y = new Float64Array(rows);
    for (let r = 0; r < rows; r++) {
      const t = first + r;
      m.data[r * (p + 1)] = 1;
      for (let i = 1; i <= p; i++) m.data[r * (p + 1) + i] = x[t - i];
      y[r] = x[t];
    }
    const fit = lstsq(m, y, Array.from({ length: p + 1 }, (_, i) => (i === 0 ? 'const' : `x[t-${i}]`)), { onRankDeficient: 'warn' });
    if (fit.rank < p + 1) break;
    if (!(fit.rss > 0)) break;
    const aicc = criteria(fit.rss, rows, p + 2).aicc;
    if (aicc < best.aicc) best = { aicc, phi: fit.theta.slice(1), c: fit.theta[0] };
  }
  return { phi: best.phi, c: best.c };
}

/**
 * The prewhitened cross-correlation of output y on input x for lags 0…maxLag, from index `start`
 * on (both arrays the same length; NaN heads are skipped). See the module comment.
 */
export function prewhitenedCrossCorrelation(x: Float64Array, y: Float64Array, maxLag: number, options: { start?: number; maxOrder?: number } = {}): CrossCorrelation {
  const start = Math.max(firstFinite(x, options.start ?? 0), firstFinite(y, options.start ?? 0));
  const available = x.length - start;
  const maxOrder = Math.max(0, Math.min(options.maxOrder ?? 6, Math.floor(available / 10)));
  const { phi, c } = arPrewhitener(x, start, maxOrder);
  const p = phi.length;
  const from = start + p;
  const n = x.length - from;
  const r = new Float64Array(maxLag + 1);
  const weights = new Float64Array(maxLag + 1);
  if (n < 3) return { r, weights, bound: Infinity, n: Math.max(0, n), order: p };
  const alpha = new Float64Array(n);
  const beta = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = from + i;
    let a = x[t] - c;
    let b = y[t];
    for (let k = 1; k <= p; k++) {
      a -= phi[k - 1] * x[t - k];
      b -= phi[k - 1] * y[t - k];
    }
    alpha[i] = a;
    beta[i] = b;
  }
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < n; i++) {
    ma += alpha[i];
    mb += beta[i];
  }
  ma /= n;
  mb /= n;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    saa += (alpha[i] - ma) ** 2;
    sbb += (beta[i] - mb) ** 2;
  }
  const sa = Math.sqrt(saa / n);
  const sb = Math.sqrt(sbb / n);
  if (!(sa > 0) || !(sb > 0)) return { r, weights, bound: 2 / Math.sqrt(n), n, order: p };
  for (let k = 0; k <= maxLag && k < n; k++) {
    let acc = 0;
    for (let i = 0; i + k < n; i++) acc += (alpha[i] - ma) * (beta[i + k] - mb);
    r[k] = acc / n / (sa * sb);
    weights[k] = (r[k] * sb) / sa;
  }
  return { r, weights, bound: 2 / Math.sqrt(n), n, order: p };
}

/**
 * The delay the cross-correlation points to: the first lag k ≤ maxDelay whose |r(k)| exceeds
 * the bound, or, when only later lags (up to the correlation's length) are significant, the
 * largest allowed delay; null when no lag is significant.
 */
export function firstSignificantLag(cc: CrossCorrelation, maxDelay: number): number | null {
  for (let k = 0; k < cc.r.length; k++) if (Math.abs(cc.r[k]) > cc.bound) return Math.min(k, maxDelay);
  return null;
}
