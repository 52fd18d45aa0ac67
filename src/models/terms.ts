/**
 * Deterministic regressors shared by model families: intercept, linear trend and seasonal
 * Fourier pairs.
 *
 * Time enters as the 0-based count t of observations since the first one ever seen: the
 * position in the series plus `series.before.count` when the series is a later window of a
 * longer one (families add that offset before calling the filler).
 * Seasonal harmonics of period s are the pairs sin(2πkt/s), cos(2πkt/s) for k = 1…K,
 * K ≤ ⌊s/2⌋: a trigonometric-polynomial representation of a periodic mean (Harvey 1989,
 * "Forecasting, Structural Time Series Models and the Kalman Filter", §2.3.4). For even s the
 * k = s/2 sine is sin(πt) = 0 at every integer t, so only its cosine is kept; K = s/2 then spans
 * exactly the s−1 seasonal contrasts. Harmonics also take a season that is a whole number of
 * quarter periods (the yearly cycle of daily data, s = 365.25 days): their values repeat every
 * q·s samples for the least q ∈ {1, 2, 4} that makes q·s whole, and are tabulated over that span.
 */
import { UsageError } from '../data/errors.js';

export interface DeterministicTerms {
  intercept: boolean;
  trend: boolean;
  /** Number K of harmonic pairs (0 = none). */
  harmonics: number;
  /** Season length s (needed when harmonics > 0). */
  season: number | null;
}

interface HarmonicColumn {
  kind: 'sin' | 'cos';
  k: number;
}

/** The harmonic columns in order sin k=1, cos k=1, sin k=2, ... (without the zero sine at k = s/2). */
function harmonicColumns(K: number, s: number): HarmonicColumn[] {
  const cols: HarmonicColumn[] = [];
  for (let k = 1; k <= K; k++) {
    if (!(2 * k === s)) cols.push({ kind: 'sin', k });
    cols.push({ kind: 'cos', k });
  }
  return cols;
}

/** A season harmonics can take: at least 2 and a whole number of quarter periods. */
export function isHarmonicSeason(s: number): boolean {
  return Number.isFinite(s) && s >= 2 && Number.isInteger(4 * s);
}

/** Samples after which the harmonics of season s repeat: q·s for the least q ∈ {1, 2, 4} making it whole. */
export function harmonicRepeat(s: number): number {
  return Number.isInteger(s) ? s : Number.isInteger(2 * s) ? 2 * s : 4 * s;
}

/** Largest meaningful number of harmonic pairs for season s: ⌊s/2⌋. */
export function maxHarmonics(s: number): number {
  return Math.floor(s / 2);
}

/** Names of the deterministic columns, in the order `fillDeterministic` writes them. */
export function deterministicNames(d: DeterministicTerms): string[] {
  const names: string[] = [];
  if (d.intercept) names.push('const');
  if (d.trend) names.push('trend');
  if (d.harmonics > 0 && d.season !== null) {
    for (const c of harmonicColumns(d.harmonics, d.season)) names.push(`${c.kind}(2π·${c.k}·t/${d.season})`);
  }
  return names;
}

/** Number of deterministic columns. */
export function deterministicCount(d: DeterministicTerms): number {
  return deterministicNames(d).length;
}

/**
 * The harmonic values at each phase r = t mod P (P = `harmonicRepeat(s)`, s itself for a whole
 * season), row-major P × m (m harmonic columns), tabulated once per (K, s) and shared by every
 * filler: they depend on nothing else.
 */
function harmonicTable(cols: HarmonicColumn[], K: number, s: number): Float64Array {
  const key = `${K}:${s}`;
  let table = harmonicTables.get(key);
  if (table === undefined) {
    const m = cols.length;
    const P = harmonicRepeat(s);
    table = new Float64Array(m * P);
    for (let r = 0; r < P && m > 0; r++) {
      for (let c = 0; c < m; c++) {
        const angle = (2 * Math.PI * cols[c].k * r) / s;
        table[r * m + c] = cols[c].kind === 'sin' ? Math.sin(angle) : Math.cos(angle);
      }
    }
    harmonicTables.set(key, table);
  }
  return table;
}

const harmonicTables = new Map<string, Float64Array>();

/** What both fillers need: the repeat s of the harmonics, column count m and the tabulated values (s × m). */
function layout(d: DeterministicTerms): { s: number; m: number; table: Float64Array; intercept: boolean; trend: boolean } {
  const cols = d.harmonics > 0 && d.season !== null ? harmonicColumns(d.harmonics, d.season) : [];
  const s = harmonicRepeat(d.season ?? 1);
  const m = cols.length;
  const table = m > 0 ? harmonicTable(cols, d.harmonics, d.season as number) : new Float64Array(0);
  return { s, m, table, intercept: d.intercept, trend: d.trend };
}

/**
 * A filler writing the deterministic values at time t into `out` from `offset`; returns the
 * number of values written. The harmonic values depend only on t mod s, so they are tabulated
 * (s rows, once per K and s), and filling a row costs no sin/cos evaluation.
 */
export function deterministicFiller(d: DeterministicTerms): (t: number, out: Float64Array, offset: number) => number {
  const { s, m, table, intercept, trend } = layout(d);
  return (t, out, offset) => {
    let j = offset;
    if (intercept) out[j++] = 1;
    if (trend) out[j++] = t;
    if (m > 0) {
      const base = (((t % s) + s) % s) * m;
      for (let c = 0; c < m; c++) out[j++] = table[base + c];
    }
    return j - offset;
  };
}

/**
 * The deterministic part Σ_j θ_{offset+j}·d_j(t) as a function of t, summed in column order
 * exactly as a filled row times θ would be. Without a trend the row depends on t only through
 * t mod s (the harmonics' repeat; not at all without harmonics), so each phase is summed once
 * per θ and then read back: recursions over a long history cost one lookup per step.
 */
export function deterministicCombination(d: DeterministicTerms, theta: ArrayLike<number>, offset = 0): (t: number) => number {
  const { s, m, table, intercept, trend } = layout(d);
  const count = (intercept ? 1 : 0) + (trend ? 1 : 0) + m;
  if (count === 0) return () => 0;
  const sumAt = (t: number): number => {
    let sum = 0;
    let j = offset;
    if (intercept) sum += theta[j++] * 1;
    if (trend) sum += theta[j++] * t;
    if (m > 0) {
      const base = (((t % s) + s) % s) * m;
      for (let c = 0; c < m; c++) sum += theta[j++] * table[base + c];
    }
    return sum;
  };
  if (trend) return sumAt;
  const period = m > 0 ? s : 1;
  const known = new Float64Array(period);
  const ready = new Uint8Array(period);
  return (t) => {
    const r = m > 0 ? ((t % s) + s) % s : 0;
    if (ready[r] === 0) {
      known[r] = sumAt(t);
      ready[r] = 1;
    }
    return known[r];
  };
}

/**
 * A filler writing the values `deterministicFiller(d)` writes for times t0 … t0 + rows − 1 into
 * the rows of a row-major matrix `out` with `stride` columns, from column `offset`, column by
 * column.
 */
export function deterministicRowsFiller(d: DeterministicTerms): (t0: number, rows: number, out: Float64Array, stride: number, offset: number) => void {
  const { s, m, table, intercept, trend } = layout(d);
  return (t0, rows, out, stride, offset) => {
    let j = offset;
    if (intercept) {
      for (let r = 0, o = j; r < rows; r++, o += stride) out[o] = 1;
      j++;
    }
    if (trend) {
      for (let r = 0, o = j; r < rows; r++, o += stride) out[o] = t0 + r;
      j++;
    }
    if (m > 0) {
      let phase = ((t0 % s) + s) % s;
      for (let r = 0, o = j; r < rows; r++, o += stride) {
        const base = phase * m;
        for (let c = 0; c < m; c++) out[o + c] = table[base + c];
        if (++phase === s) phase = 0;
      }
    }
  };
}

/**
 * The thrower of a family's spec validator: `bad(field, expected)` raises one UsageError with
 * code `code`, naming the field of `spec` and what it held.
 */
export function specFieldError(spec: object, code: string, what: string): (field: string, expected: string) => never {
  return (field, expected) => {
    throw new UsageError(code, `${what} spec field "${field}" is invalid`, {
      found: JSON.stringify((spec as Record<string, unknown>)[field]),
      expected,
    });
  };
}

/** The terms of the change that the change and smoothed-level families share. */
export interface ChangeTerms {
  /** A constant change per period (absent = false). */
  drift?: boolean;
  /** Harmonic pairs K of the change (absent = 0); needs `season`. */
  harmonics?: number;
  /** Season length s of the harmonics (present exactly when harmonics > 0). */
  season?: number;
}

/**
 * Checks the shared change terms of `s` (drift, harmonics with their season) and copies them,
 * in their canonical form (absent when off), into `out`.
 */
export function checkChangeTerms(s: ChangeTerms, bad: (field: string, expected: string) => never, out: ChangeTerms): void {
  if (s.drift !== undefined && typeof s.drift !== 'boolean') bad('drift', 'true or false');
  const K = s.harmonics ?? 0;
  if (!Number.isInteger(K) || K < 0) bad('harmonics', 'a whole number ≥ 0');
  if (s.drift === true) out.drift = true;
  if (K > 0) {
    const season = s.season;
    if (typeof season !== 'number' || !isHarmonicSeason(season)) bad('season', 'a whole number ≥ 2 (or a multiple of 1/4, e.g. 365.25) when harmonics > 0');
    if (K > maxHarmonics(season as number)) bad('harmonics', `at most ⌊s/2⌋ = ${maxHarmonics(season as number)}`);
    out.harmonics = K;
    out.season = season as number;
  }
}
