/**
 * Real roots of a polynomial of degree ≤ 3, and the stability of the equilibria they give.
 *
 * The polynomial ODE family needs the equilibria of dx/dt = c0 + c1·x + c2·x² + c3·x³ (inputs
 * and seasonal terms held at zero) and their stability.
 */
import { modulus, polynomialRoots } from './roots.js';

/**
 * Real roots of c0 + c1·x + c2·x² + c3·x³ (coefficients in ascending powers), ascending.
 *
 * Variant by degree after dropping zero leading coefficients:
 * - degree 1: x = −c0/c1;
 * - degree 2: the cancellation-free form q = −½(c1 + sgn(c1)·√(c1² − 4c2c0)), x₁ = q/c2,
 *   x₂ = c0/q (Press, Teukolsky, Vetterling & Flannery, "Numerical Recipes", 3rd ed. 2007, §5.6,
 *   eqs. 5.6.4–5.6.5, equation numbers from memory); no real roots when the discriminant is negative;
 * - degree 3: eigenvalues of the companion matrix (roots.ts; Golub & Van Loan, "Matrix
 *   Computations", 4th ed. 2013, §7.4.6), keeping those whose imaginary part is below 1e-9 of the largest
 *   modulus, each polished by two Newton steps.
 * A constant polynomial has no roots (an identically zero one is reported as none as well).
 * Roots are returned with −0 normalised to 0.
 */
export function realRoots(coefficients: readonly number[]): number[] {
  const c = [...coefficients];
  while (c.length > 0 && c[c.length - 1] === 0) c.pop();
  const degree = c.length - 1;
  if (degree < 1) return [];
  if (degree === 1) return [-c[0] / c[1] + 0];
  if (degree === 2) {
    const [c0, c1, c2] = c;
    const disc = c1 * c1 - 4 * c2 * c0;
    if (disc < 0) return [];
    const q = -0.5 * (c1 + (c1 >= 0 ? 1 : -1) * Math.sqrt(disc));
    if (q === 0) return [0, 0];
    return [q / c2 + 0, c0 / q + 0].sort((a, b) => a - b);
  }
  if (degree > 3) throw new RangeError(`realRoots handles degree ≤ 3, got ${degree}`);
  const complex = polynomialRoots([c[3], c[2], c[1], c[0]]);
  const scale = Math.max(1, ...complex.map(modulus));
  const roots: number[] = [];
  for (const z of complex) {
    if (Math.abs(z.im) > 1e-9 * scale) continue;
    let x = z.re;
    for (let k = 0; k < 2; k++) {
      const f = polyValue(c, x);
      const df = polySlope(c, x);
      if (df === 0) break;
      x -= f / df;
    }
    roots.push(x + 0);
  }
  return roots.sort((a, b) => a - b);
}

/** Value of the polynomial c0 + c1·x + ... at x (Horner's rule). */
export function polyValue(coefficients: readonly number[], x: number): number {
  let v = 0;
  for (let k = coefficients.length - 1; k >= 0; k--) v = v * x + coefficients[k];
  return v;
}

/** Derivative of the polynomial c0 + c1·x + ... at x. */
export function polySlope(coefficients: readonly number[], x: number): number {
  let v = 0;
  for (let k = coefficients.length - 1; k >= 1; k--) v = v * x + k * coefficients[k];
  return v;
}

/** An equilibrium x* of dx/dt = f(x) with the slope f'(x*) that decides its stability. */
export interface Equilibrium {
  value: number;
  slope: number;
  /** Linear stability: f'(x*) < 0 attracts, f'(x*) > 0 repels (Strogatz, "Nonlinear Dynamics and Chaos", 1994, §2.4). */
  stable: boolean;
}

/** Equilibria of dx/dt = Σ c_k x^k, ascending, each with its linear-stability verdict. */
export function equilibria(coefficients: readonly number[]): Equilibrium[] {
  return realRoots(coefficients).map((value) => {
    const slope = polySlope(coefficients, value);
    return { value, slope, stable: slope < 0 };
  });
}
