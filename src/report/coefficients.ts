/**
 * The coefficient table of an asserted equation: one row per term with its estimate, standard
 * error and a normal-approximation interval estimate ± z·se at the given level (90 % unless
 * told). The equation itself prints the coefficients inline without their errors; this table
 * carries the uncertainty, in text, summary.json and the HTML report alike.
 */
import { normalQuantile } from '../forecast/normal.js';

/** The level of the coefficient intervals, percent. */
export const COEFFICIENT_LEVEL = 90;

export interface CoefficientRow {
  term: string;
  estimate: number;
  se: number;
  lower: number;
  upper: number;
  /** False for a term the estimation left out (its estimate and se are 0). */
  active: boolean;
}

/**
 * Rows of the coefficient table: lower/upper = estimate ∓ z·se with z = Φ⁻¹(1/2 + level/200)
 * (1.645 at 90 %); a non-finite se gives NaN bounds.
 * @example coefficientRows(['c'], [2], [0.5], [true])[0].upper ≈ 2.822
 */
export function coefficientRows(terms: readonly string[], theta: ArrayLike<number>, se: ArrayLike<number>, active: ArrayLike<boolean>, level = COEFFICIENT_LEVEL): CoefficientRow[] {
  const z = normalQuantile(0.5 + level / 200);
  return terms.map((term, j) => {
    const s = se[j];
    const ok = Number.isFinite(s);
    return { term, estimate: theta[j], se: s, lower: ok ? theta[j] - z * s : Number.NaN, upper: ok ? theta[j] + z * s : Number.NaN, active: Boolean(active[j]) };
  });
}

/** The coefficient table of a fitted structure (its terms, θ, se and active terms). */
export function estimateRows(fit: { structure: { terms: readonly string[] }; estimate: { theta: ArrayLike<number>; se: ArrayLike<number>; active: ArrayLike<boolean> } }): CoefficientRow[] {
  return coefficientRows(fit.structure.terms, fit.estimate.theta, fit.estimate.se, fit.estimate.active);
}

/** The coefficient table as text lines for the terminal summary (term, estimate, se, interval). */
export function coefficientLines(rows: readonly CoefficientRow[], level = COEFFICIENT_LEVEL, format: (x: number) => string = String): string[] {
  const width = Math.max(4, ...rows.map((r) => r.term.length));
  const cells = (a: string, b: string, c: string, d: string) => `  ${a.padEnd(width)}  ${b.padStart(12)}  ${c.padStart(12)}  ${d}`.trimEnd();
  return [
    cells('term', 'estimate', 'std. error', `${level} % interval`),
    ...rows.map((r) => cells(r.term, format(r.estimate), r.active ? format(r.se) : 'left out', r.active && Number.isFinite(r.lower) ? `${format(r.lower)} to ${format(r.upper)}` : '')),
  ];
}

/**
 * The coefficient table as JSON terms (summary.json, `--json`): name, estimate, standard error,
 * the interval bounds of the table (null where the table leaves the interval blank: a term left
 * out or a non-finite standard error) and whether the term is active.
 */
export function coefficientTerms(rows: readonly CoefficientRow[]): Array<{ name: string; estimate: number; se: number; lower: number | null; upper: number | null; active: boolean }> {
  return rows.map((r) => {
    const shown = r.active && Number.isFinite(r.lower) && Number.isFinite(r.upper);
    return { name: r.term, estimate: r.estimate, se: r.se, lower: shown ? r.lower : null, upper: shown ? r.upper : null, active: r.active };
  });
}
