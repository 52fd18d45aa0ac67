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
