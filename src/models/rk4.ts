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
 * @example rk4(( _t, x) => 0.1 * x, 0, 1, 1, 10) ≈ e^{0.1} (to about 1e-12)
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
