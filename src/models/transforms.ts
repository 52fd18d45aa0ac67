/**
 * Scoring-scale transforms z = g(y) of a target series.
 *
 * - `none`: g(y) = y.
 * - `log`:  g(y) = ln y, for strictly positive series. A model fitted on z with Gaussian errors
 *   implies a density for y through the change of variables f_y(y) = f_z(g(y))·|g'(y)|, so its
 *   log-likelihood on the original scale gains Σ ln|g'(y_t)| = −Σ ln y_t (the log-Jacobian;
 *   Akaike 1978, "On the likelihood of a time series model", The Statistician 27, §3, uses the
 *   same correction to compare models of y and ln y). The search adds this term so log and
 *   untransformed candidates are ranked on one scale.
 *
 * Inputs are never transformed; only the target is.
 */
import type { Transform } from './structure.js';

/** True when every value is finite and > 0 (the condition for the log transform). */
export function isStrictlyPositive(values: Float64Array): boolean {
  for (let i = 0; i < values.length; i++) if (!(values[i] > 0) || !Number.isFinite(values[i])) return false;
  return values.length > 0;
}

/** z = g(y) elementwise, as a new array. */
export function forward(transform: Transform, y: Float64Array): Float64Array {
  if (transform === 'none') return Float64Array.from(y);
  const z = new Float64Array(y.length);
  for (let i = 0; i < y.length; i++) z[i] = Math.log(y[i]);
  return z;
}

/** y = g⁻¹(z) for one value. */
export function inverse(transform: Transform, z: number): number {
  return transform === 'none' ? z : Math.exp(z);
}

/** Log-Jacobian Σ_{t∈[from,to)} ln|g'(y_t)|: 0 for `none`, −Σ ln y_t for `log`. */
export function logJacobian(transform: Transform, y: Float64Array, from: number, to: number): number {
  if (transform === 'none') return 0;
  let s = 0;
  for (let t = from; t < to; t++) s -= Math.log(y[t]);
  return s;
}

/** How the transformed target reads in equations: `y` or `ln y`. */
export function transformedName(transform: Transform, name: string): string {
  return transform === 'log' ? `ln ${name}` : name;
}
