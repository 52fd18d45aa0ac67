/**
 * Roots of real polynomials, for stability and dominant time constants of difference equations.
 *
 * Method: eigenvalues of the companion matrix (the roots of a monic polynomial are exactly the
 * eigenvalues of its companion matrix; Golub & Van Loan 2013, "Matrix Computations", 4th ed.,
 * §7.4.6), computed by the Hessenberg QR algorithm of ml-matrix's EigenvalueDecomposition.
 * Cost O(p³) for degree p.
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

export interface Complex {
  re: number;
  im: number;
}

/**
 * Roots of c[0]·x^p + c[1]·x^{p−1} + … + c[p] (c[0] ≠ 0), sorted by decreasing modulus, ties
 * by real then imaginary part (a stable order).
 */
export function polynomialRoots(c: ArrayLike<number>): Complex[] {
  let lead = 0;
  while (lead < c.length && c[lead] === 0) lead++;
  const coefs = Array.from(c).slice(lead);
  const p = coefs.length - 1;
  if (p < 1) return [];
  if (p === 1) return [{ re: -coefs[1] / coefs[0], im: 0 }];
  // Companion matrix: first row −c[1..p]/c[0], ones on the subdiagonal.
  const m = Matrix.zeros(p, p);
  for (let j = 0; j < p; j++) m.set(0, j, -coefs[j + 1] / coefs[0]);
  for (let i = 1; i < p; i++) m.set(i, i - 1, 1);
  const evd = new EigenvalueDecomposition(m, { assumeSymmetric: false });
  const roots = evd.realEigenvalues.map((re, i) => ({ re, im: evd.imaginaryEigenvalues[i] }));
  return roots.sort((a, b) => modulus(b) - modulus(a) || a.re - b.re || a.im - b.im);
}

export function modulus(z: Complex): number {
  return Math.hypot(z.re, z.im);
}

/**
 * Characteristic roots λ of the AR recursion w_t = a_1 w_{t−1} + … + a_p w_{t−p} + …, i.e. the
 * roots of λ^p − a_1 λ^{p−1} − … − a_p. The recursion is stable when every |λ| < 1 (equivalently,
 * the lag polynomial 1 − a_1 x − … − a_p x^p has all roots outside the unit circle; Box, Jenkins
 * & Reinsel 2008, "Time Series Analysis", 4th ed., §3.2.1). `a[i]` is the coefficient of lag i+1.
 */
export function characteristicRoots(a: ArrayLike<number>): Complex[] {
  let p = a.length;
  while (p > 0 && a[p - 1] === 0) p--;
  if (p === 0) return [];
  const c = new Float64Array(p + 1);
  c[0] = 1;
  for (let i = 0; i < p; i++) c[i + 1] = -a[i];
  return polynomialRoots(c);
}

/** Largest |λ| among the characteristic roots (0 without AR terms). */
export function spectralRadius(a: ArrayLike<number>): number {
  const r = characteristicRoots(a);
  return r.length === 0 ? 0 : modulus(r[0]);
}

/**
 * Stability of the AR recursion w_t = a_1 w_{t−1} + … + a_p w_{t−p} without computing roots:
 * the Schur–Cohn test by the step-down (reverse Levinson) recursion. For the monic
 * characteristic polynomial c(λ) = λ^p + c_1 λ^{p−1} + … + c_p (c_i = −a_i), take the reflection
 * coefficient k = c_p; if |k| ≥ 1 some root has |λ| ≥ 1; otherwise step down to degree p−1 with
 *   c'_i = (c_i − k·c_{p−i}) / (1 − k²),  i = 1…p−1,
 * and repeat. All roots lie strictly inside the unit circle iff every |k| < 1 (Jury 1964,
 * "Theory and Application of the z-Transform Method", §3.4; Hayes 1996, "Statistical Digital
 * Signal Processing and Modeling", §5.2.7, the step-down recursion and its stability property).
 * Cost O(p²), one scratch array. Agrees with `spectralRadius(a) < 1` (asserted in
 * test/models/roots.test.ts).
 */
export function isStableRecursion(a: ArrayLike<number>): boolean {
  let p = a.length;
  while (p > 0 && a[p - 1] === 0) p--;
  if (p === 0) return true;
  const c = new Float64Array(p + 1);
  const next = new Float64Array(p + 1);
  c[0] = 1;
  for (let i = 1; i <= p; i++) c[i] = -a[i - 1];
  for (let m = p; m >= 1; m--) {
    const k = c[m];
    if (!(Math.abs(k) < 1)) return false;
    const d = 1 - k * k;
    for (let i = 1; i < m; i++) next[i] = (c[i] - k * c[m - i]) / d;
    for (let i = 1; i < m; i++) c[i] = next[i];
  }
  return true;
}
