/**
 * The Structure contract: one candidate model written in regression form y = Φθ.
 *
 * Estimation, ranking, forecasting and online learning see only this interface, never which
 * family a structure belongs to. A family (ARX difference equations, polynomial ODEs, ...)
 * provides factories returning Structures and registers a rebuild function for its spec
 * (see registry.ts), so a saved model can be rebuilt from JSON.
 *
 * Scales. Every structure has a *scoring scale* z = g(y): g = identity for `transform: 'none'`,
 * g = ln for `transform: 'log'`. One-step predictions are compared with observations on that
 * scale, and the search adds the log-Jacobian Σ ln|g'(y_t)| to the log-likelihood so that all
 * candidates are scored on the original scale (see select/criteria.ts). The regression target
 * (`Regression.y`) may differ from z (a differenced value, an integral increment of an ODE
 * state); `oneStep` is what the search scores, so it always predicts z itself.
 *
 * Time indices are 0-based positions in `series.values`. A structure needs `history` past
 * points before its first row, so rows exist for t ≥ history.
 */
import type { Series } from '../data/series.js';
import type { DesignMatrix } from '../linalg/matrix.js';

export type Transform = 'none' | 'log';

/** JSON-serialisable description from which the registry rebuilds a structure. */
export interface StructureSpec {
  family: string;
  [key: string]: unknown;
}

/** Regression rows for a range of time indices. */
export interface Regression {
  /** Time index (position in the series) each row belongs to. */
  index: Int32Array;
  /** Targets on the structure's regression scale. */
  y: Float64Array;
  /** Regressor matrix Φ, one row per target, columns in `terms` order. */
  phi: DesignMatrix;
}

/** Result of estimating a structure's coefficients on a sample. */
export interface Estimate {
  theta: Float64Array;
  /** Standard errors of θ (0 for coefficients fixed at zero by sparse selection). */
  se: Float64Array;
  /** Covariance of θ, row-major p×p (σ̂²(ΦᵀΦ)⁻¹ on the active terms, zero elsewhere). */
  cov: Float64Array;
  /** Which terms are estimated (all true for dense fits; sparse fits switch some off). */
  active: boolean[];
  /** Noise variance of the regression residuals. */
  sigma2: number;
  /** Numerical rank and condition estimate of the regression. */
  rank: number;
  condition: number;
  warnings: string[];
  /**
   * One-step predictions of z_t for t in [from, to) of the `estimate` call, when the structure
   * gets them from the fit at no cost (an ARX model's fitted values are its one-step predictions
   * on the estimation rows). Identical to `oneStep(theta, series, from, to)` on the same series;
   * absent when the structure does not provide them, in which case callers use `oneStep`.
   */
  oneStep?: Float64Array;
}

/**
 * A quantity a user reads off the fitted equation. Quantities of one input are named
 * `gain <input>` (steady-state change of y per unit), `delay <input>` (periods before it acts)
 * and `rate effect <input>` (relative change of a law's rate per unit); input-effects.ts reads
 * them by these names.
 */
export interface Derived {
  name: string;
  value: number | string | boolean;
  unit?: string;
  note?: string;
}

export interface Structure {
  /** Family name, e.g. 'arx' or 'ode'. */
  readonly family: string;
  /** Unique, stable, deterministic key of this candidate within a search. */
  readonly key: string;
  /** Short readable label for tables, e.g. "AR lags 1-2, price lags 0-1 after delay 2, trend". */
  readonly label: string;
  readonly spec: StructureSpec;
  /** Regressor names in θ order. */
  readonly terms: string[];
  /** Past points one row needs. */
  readonly history: number;
  readonly transform: Transform;
  /**
   * The scale the equation itself is written on, when it differs from the scoring scale
   * `transform` (absent: the same). An ODE always describes the untransformed state; its log
   * variant only scores the same dynamics on the log scale.
   */
  readonly equationScale?: Transform;

  /**
   * True when the equation is nonlinear in θ (a closed-form growth path, an input that scales
   * a rate): its regression rows are then the Gauss–Newton rows at a given θ (`regression`'s
   * `at`). Absent: the rows are linear in θ and do not depend on it.
   */
  readonly linearized?: boolean;

  /**
   * Regression rows for time indices t in [from, to) (those the structure can form). For a
   * `linearized` structure, the Gauss–Newton rows at θ = `at` (required there): Φ = ∂r̂/∂θ and
   * targets r − r̂(at) + Φ·at, where r is the structure's regression target and r̂(θ) its
   * prediction. At the fitted θ least squares on these rows returns θ itself (the normal
   * equations Φᵀ(r − r̂) = 0 hold there), and recursive least squares on them is the recursive
   * Gauss–Newton step of a prediction-error method (Ljung & Söderström, "Theory and Practice of
   * Recursive Identification", 1983, §3.3 — section number from memory).
   */
  regression(series: Series, from: number, to: number, at?: Float64Array): Regression;

  /** Estimates θ on rows t in [from, to) (QR least squares, or sparse selection for ODEs). */
  estimate(series: Series, from: number, to: number): Estimate;

  /**
   * One-step-ahead predictions of z_t = g(y_t) for t in [from, to), each using observations up
   * to t−1 and inputs up to t.
   */
  oneStep(theta: Float64Array, series: Series, from: number, to: number): Float64Array;

  /**
   * Simulates h steps past the last observation of `series` (the forecast origin). `future`
   * holds, for each input in series order, its h future values. `shocks`, when given (length h,
   * on the scoring scale), is added to the one-step prediction of each step: resampled
   * residuals for simulation intervals. Returns values on the original scale.
   */
  simulate(theta: Float64Array, series: Series, future: Float64Array[], h: number, shocks?: Float64Array): Float64Array;

  /** The fitted equation in readable form, with standard errors when given. */
  describe(theta: Float64Array, se?: Float64Array): string;

  /** Quantities a user reads: gains, half-lives, delays, capacities, diffusion p/q/m, stability. */
  derived(theta: Float64Array, series: Series): Derived[];
}
