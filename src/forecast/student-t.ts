/**
 * Student's t distribution: cumulative distribution and quantile for ν > 0 degrees of freedom
 * (ν need not be a whole number).
 *
 * CDF through the regularized incomplete beta function (Abramowitz & Stegun, "Handbook of
 * Mathematical Functions", 1964, 26.7.1 with 26.5.27): for t ≥ 0,
 *   F(t; ν) = 1 − ½·I_x(ν/2, ½),  x = ν / (ν + t²),
 * and F(−t) = 1 − F(t). I_x(a, b) by its continued fraction (A&S 26.5.8), evaluated by the
 * modified Lentz method, on the side x < (a + 1)/(a + b + 2) where it converges fast (the other
 * side through I_x(a, b) = 1 − I_{1−x}(b, a)). Quantile by bisection on the CDF to 1e-13.
 */
import { logGamma } from '../select/whiteness.js';
import { normalQuantile } from './normal.js';

/** Regularized incomplete beta I_x(a, b) for a, b > 0 and 0 ≤ x ≤ 1. */
export function regularizedBeta(x: number, a: number, b: number): number {
  if (!(a > 0 && b > 0) || !(x >= 0 && x <= 1)) return NaN;
  if (x === 0 || x === 1) return x;
  const logPrefix = a * Math.log(x) + b * Math.log(1 - x) + logGamma(a + b) - logGamma(a) - logGamma(b);
  if (x > (a + 1) / (a + b + 2)) return 1 - regularizedBeta(1 - x, b, a);
  const tiny = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let f = d;
  for (let m = 1; m <= 500; m++) {
    // Even step d_{2m} = m(b − m)x / ((a + 2m − 1)(a + 2m)).
    let num = (m * (b - m) * x) / ((a + 2 * m - 1) * (a + 2 * m));
    d = 1 + num * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + num / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    f *= d * c;
    // Odd step d_{2m+1} = −(a + m)(a + b + m)x / ((a + 2m)(a + 2m + 1)).
    num = -((a + m) * (a + b + m) * x) / ((a + 2 * m) * (a + 2 * m + 1));
    d = 1 + num * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + num / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-15) break;
  }
  return (Math.exp(logPrefix) * f) / a;
}

/**
 * P(T ≤ t) for Student's t with ν degrees of freedom.
 * @example studentTCdf(0, 5) === 0.5; studentTCdf(1, 1) === 0.75 (Cauchy: ½ + atan(t)/π)
 */
export function studentTCdf(t: number, dof: number): number {
  if (!(dof > 0) || Number.isNaN(t)) return NaN;
  if (t === Infinity) return 1;
  if (t === -Infinity) return 0;
  const tail = 0.5 * regularizedBeta(dof / (dof + t * t), dof / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

/**
 * The p-quantile of Student's t with ν degrees of freedom: t with P(T ≤ t) = p. Above 1e7
 * degrees of freedom the normal quantile is returned (they agree to better than 1e-7).
 * @example studentTQuantile(0.975, 10) ≈ 2.228139 (A&S Table 26.10)
 */
export function studentTQuantile(p: number, dof: number): number {
  if (!(dof > 0) || !(p > 0 && p < 1)) {
    if (dof > 0 && p === 0) return -Infinity;
    if (dof > 0 && p === 1) return Infinity;
    return NaN;
  }
  if (p === 0.5) return 0;
  if (dof > 1e7) return normalQuantile(p);
  const upper = p > 0.5;
  const q = upper ? p : 1 - p;
  let lo = 0;
  let hi = Math.max(1, normalQuantile(q));
  while (studentTCdf(hi, dof) < q) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-13 * Math.max(1, hi); i++) {
    const mid = 0.5 * (lo + hi);
    if (studentTCdf(mid, dof) < q) lo = mid;
    else hi = mid;
  }
  const t = 0.5 * (lo + hi);
  return upper ? t : -t;
}
