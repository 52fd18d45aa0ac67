/**
 * Classical fourth-order Runge–Kutta integration of a scalar ODE dx/dτ = f(τ, x).
 *
 * One step of size h from (τ, x):
 *   k1 = f(τ, x)
 *   k2 = f(τ + h/2, x + h·k1/2)
 *   k3 = f(τ + h/2, x + h·k2/2)
 *   k4 = f(τ + h, x + h·k3)
 *   x(τ + h) ≈ x + h·(k1 + 2·k2 + 2·k3 + k4)/6
 * Local error O(h⁵), global error O(h⁴) (Kutta 1901; Press, Teukolsky, Vetterling & Flannery,
 * "Numerical Recipes", 3rd ed. 2007, §17.1, eq. 17.1.3 — equation number from memory).
 *
 * Cost: 4·substeps evaluations of f per call.
 */

/** Right-hand side f(τ, x) of a scalar ODE. */
export type ScalarRhs = (tau: number, x: number) => number;

/**
 * Integrates dx/dτ = f(τ, x) from τ0 to τ0 + span with `substeps` equal RK4 steps.
 * Returns the state at τ0 + span; a non-finite intermediate state is returned as is (NaN or
 * ±Infinity) so callers can see that the trajectory blew up.
 *
 * @example rk4(( _t, x) => 0.1 * x, 0, 1, 1, 10) ≈ e^{0.1} (to about 1e-11)
 */
export function rk4(f: ScalarRhs, tau0: number, x0: number, span: number, substeps: number): number {
  if (!Number.isInteger(substeps) || substeps < 1) throw new RangeError(`substeps must be a positive integer, got ${substeps}`);
  const h = span / substeps;
  let x = x0;
  let tau = tau0;
  for (let i = 0; i < substeps; i++) {
    const k1 = f(tau, x);
    const k2 = f(tau + h / 2, x + (h * k1) / 2);
    const k3 = f(tau + h / 2, x + (h * k2) / 2);
    const k4 = f(tau + h, x + h * k3);
    x += (h * (k1 + 2 * k2 + 2 * k3 + k4)) / 6;
    if (!Number.isFinite(x)) return x;
    tau = tau0 + (i + 1) * h;
  }
  return x;
}

/**
 * The same classical RK4 steps as {@link rk4} for a right-hand side that is a cubic in x plus a
 * forcing term known in advance, f(τ, x) = c₀ + c₁x + c₂x² + c₃x³ + F(τ). `forcing` holds F at
 * the 2·substeps + 1 half-step nodes τ0 + j·h/2, h = span/substeps: F[2i] at the start of step
 * i (k1), F[2i + 1] at its midpoint (k2, k3), F[2i + 2] at its end (k4). Nothing is called
 * inside the loop, and F is formed once per node instead of once per stage.
 * Returns the state at τ0 + span; a non-finite intermediate state is returned as is.
 *
 * @example rk4Polynomial(0, 0.1, 0, 0, new Float64Array(21), 1, 1, 10) ≈ e^{0.1} (to about 1e-11)
 */
export function rk4Polynomial(c0: number, c1: number, c2: number, c3: number, forcing: Float64Array, x0: number, span: number, substeps: number): number {
  if (!Number.isInteger(substeps) || substeps < 1) throw new RangeError(`substeps must be a positive integer, got ${substeps}`);
  if (forcing.length < 2 * substeps + 1) throw new RangeError(`forcing has ${forcing.length} nodes, expected ${2 * substeps + 1}`);
  const h = span / substeps;
  let x = x0;
  for (let i = 0; i < substeps; i++) {
    const fa = forcing[2 * i];
    const fm = forcing[2 * i + 1];
    const fb = forcing[2 * i + 2];
    const k1 = c0 + x * (c1 + x * (c2 + x * c3)) + fa;
    const x2 = x + (h * k1) / 2;
    const k2 = c0 + x2 * (c1 + x2 * (c2 + x2 * c3)) + fm;
    const x3 = x + (h * k2) / 2;
    const k3 = c0 + x3 * (c1 + x3 * (c2 + x3 * c3)) + fm;
    const x4 = x + h * k3;
    const k4 = c0 + x4 * (c1 + x4 * (c2 + x4 * c3)) + fb;
    x += (h * (k1 + 2 * k2 + 2 * k3 + k4)) / 6;
    if (!Number.isFinite(x)) return x;
  }
  return x;
}

/**
 * The RK4 steps of {@link rk4Polynomial} for a cubic scaled by a known factor,
 * f(τ, x) = S(τ)·(c₀ + c₁x + c₂x² + c₃x³) + F(τ), with S and F given at the same 2·substeps + 1
 * half-step nodes (`scale`, `forcing`). This is the right-hand side of a law whose rate an input
 * multiplies, the generalized Bass model's x(t) (models/ode.ts).
 *
 * @example rk4ScaledPolynomial(0, 0.1, 0, 0, new Float64Array(21).fill(2), new Float64Array(21), 1, 1, 10) ≈ e^{0.2}
 */
export function rk4ScaledPolynomial(
  c0: number,
  c1: number,
  c2: number,
  c3: number,
  scale: Float64Array,
  forcing: Float64Array,
  x0: number,
  span: number,
  substeps: number,
): number {
  if (!Number.isInteger(substeps) || substeps < 1) throw new RangeError(`substeps must be a positive integer, got ${substeps}`);
  if (forcing.length < 2 * substeps + 1 || scale.length < 2 * substeps + 1) throw new RangeError(`scale and forcing need ${2 * substeps + 1} nodes`);
  const h = span / substeps;
  let x = x0;
  for (let i = 0; i < substeps; i++) {
    const sa = scale[2 * i];
    const sm = scale[2 * i + 1];
    const sb = scale[2 * i + 2];
    const k1 = sa * (c0 + x * (c1 + x * (c2 + x * c3))) + forcing[2 * i];
    const x2 = x + (h * k1) / 2;
    const k2 = sm * (c0 + x2 * (c1 + x2 * (c2 + x2 * c3))) + forcing[2 * i + 1];
    const x3 = x + (h * k2) / 2;
    const k3 = sm * (c0 + x3 * (c1 + x3 * (c2 + x3 * c3))) + forcing[2 * i + 1];
    const x4 = x + h * k3;
    const k4 = sb * (c0 + x4 * (c1 + x4 * (c2 + x4 * c3))) + forcing[2 * i + 2];
    x += (h * (k1 + 2 * k2 + 2 * k3 + k4)) / 6;
    if (!Number.isFinite(x)) return x;
  }
  return x;
}
