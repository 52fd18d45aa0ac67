/**
 * Residual whiteness: the Ljung–Box portmanteau test and the χ² distribution it refers to.
 */

/**
 * ln Γ(x) for x > 0: the Stirling asymptotic series
 *   ln Γ(x) = (x − ½) ln x − x + ½ ln 2π + 1/(12x) − 1/(360x³) + 1/(1260x⁵) − 1/(1680x⁷)
 * (Abramowitz & Stegun 1964, "Handbook of Mathematical Functions", eq. 6.1.41), applied at
 * x + N ≥ 15 and brought back by the recurrence ln Γ(x) = ln Γ(x + N) − Σ_{i<N} ln(x + i)
 * (A&S 6.1.15). Truncation error below 1e−13 at x ≥ 15.
 */
export function logGamma(x: number): number {
  if (!(x > 0)) return NaN;
  let shift = 0;
  let v = x;
  while (v < 15) {
    shift += Math.log(v);
    v += 1;
  }
  const inv = 1 / v;
  const inv2 = inv * inv;
  const series = inv * (1 / 12 - inv2 * (1 / 360 - inv2 * (1 / 1260 - inv2 / 1680)));
  return (v - 0.5) * Math.log(v) - v + 0.5 * Math.log(2 * Math.PI) + series - shift;
}

/**
 * Regularised lower incomplete gamma P(a, x) = γ(a, x)/Γ(a), a > 0, x ≥ 0.
 *
 * For x < a + 1 the power series γ(a,x) = e^{−x} x^a Σ_{n≥0} x^n / (a(a+1)…(a+n)) (A&S 6.5.29);
 * otherwise Q = 1 − P from the continued fraction
 *   Γ(a,x) = e^{−x} x^a · 1/(x + 1 − a − 1·(1−a)/(x + 3 − a − 2·(2−a)/(x + 5 − a − …)))
 * (A&S 6.5.31, in even form), evaluated by the modified Lentz algorithm (Lentz 1976, Applied
 * Optics 15, 668; Thompson & Barnett 1986, J. Comput. Phys. 64, 490). Both converge to ~1e−15.
 */
export function regularizedGammaP(a: number, x: number): number {
  if (!(a > 0) || !(x >= 0)) return NaN;
  if (x === 0) return 0;
  if (x === Infinity) return 1;
  const logPrefix = a * Math.log(x) - x - logGamma(a);
  if (x < a + 1) {
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < 10_000; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-16) break;
    }
    return Math.min(1, sum * Math.exp(logPrefix));
  }
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let f = d;
  for (let i = 1; i < 10_000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return Math.max(0, 1 - Math.exp(logPrefix) * f);
}

/**
 * χ² cumulative distribution with ν degrees of freedom: F(x; ν) = P(ν/2, x/2)
 * (A&S 26.4.19). Table check: F(18.307; 10) = 0.95 (A&S Table 26.8).
 */
export function chiSquareCdf(x: number, dof: number): number {
  if (!(dof > 0)) return NaN;
  if (x <= 0) return 0;
  return regularizedGammaP(dof / 2, x / 2);
}

/**
 * Sample autocorrelations r_k = Σ_{t=k}^{n−1} (e_t − ē)(e_{t−k} − ē) / Σ_t (e_t − ē)², k = 1…m
 * (Box, Jenkins & Reinsel 2008, "Time Series Analysis", 4th ed., eq. 2.1.12). Returns m values.
 */
export function residualAutocorrelations(e: ArrayLike<number>, m: number): Float64Array {
  const n = e.length;
  let mean = 0;
  for (let t = 0; t < n; t++) mean += e[t];
  mean /= n;
  let c0 = 0;
  for (let t = 0; t < n; t++) c0 += (e[t] - mean) ** 2;
  const r = new Float64Array(m);
  for (let k = 1; k <= m; k++) {
    let ck = 0;
    for (let t = k; t < n; t++) ck += (e[t] - mean) * (e[t - k] - mean);
    r[k - 1] = c0 > 0 ? ck / c0 : 0;
  }
  return r;
}

export interface LjungBoxResult {
  /** Q = n(n+2) Σ_{k=1}^{m} r_k² / (n − k). */
  q: number;
  /** Lags m used. */
  lags: number;
  /** Degrees of freedom m − (fitted dynamic coefficients). */
  dof: number;
  /** P(χ²_dof > Q). */
  pValue: number;
  /** Residual autocorrelations r_1…r_m. */
  autocorrelations: Float64Array;
  /** True when p ≥ the level (no evidence against white residuals). */
  white: boolean;
  level: number;
}

/**
 * The default number of lags m: min(10, ⌊n/5⌋) for non-seasonal data and min(2s, ⌊n/5⌋) with a
 * season s (Hyndman & Athanasopoulos 2021, "Forecasting: Principles and Practice", 3rd ed.,
 * §5.4), at least 1.
 */
export function defaultLjungBoxLags(n: number, season: number | null): number {
  const base = season !== null && season > 1 ? 2 * season : 10;
  return Math.max(1, Math.min(base, Math.floor(n / 5)));
}

/**
 * Ljung–Box test of residual whiteness (Ljung & Box 1978, "On a measure of lack of fit in time
 * series models", Biometrika 65(2), 297–303, eq. 2.1):
 *   Q = n(n+2) Σ_{k=1}^{m} r_k² / (n − k),
 * referred to χ² with m − fitted dynamic coefficients degrees of freedom (at least 1). White
 * when p ≥ level (default 0.05).
 */
export function ljungBox(e: ArrayLike<number>, options: { lags: number; fittedDynamic?: number; level?: number }): LjungBoxResult {
  const n = e.length;
  const m = Math.min(options.lags, n - 1);
  const level = options.level ?? 0.05;
  const r = residualAutocorrelations(e, m);
  let s = 0;
  for (let k = 1; k <= m; k++) s += (r[k - 1] * r[k - 1]) / (n - k);
  const q = n * (n + 2) * s;
  const dof = Math.max(1, m - (options.fittedDynamic ?? 0));
  const pValue = 1 - chiSquareCdf(q, dof);
  return { q, lags: m, dof, pValue, autocorrelations: r, white: pValue >= level, level };
}
