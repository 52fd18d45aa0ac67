/**
 * The family registry: how the search finds candidate structures and how a saved spec becomes a
 * Structure again.
 *
 * A family (ARX difference equations, polynomial ODEs, ...) is one `FamilyDefinition`:
 * - `candidates(series, bounds)`: its candidate grid within the resolved bounds, in a fixed,
 *   deterministic order (the search keeps that order and breaks score ties by `key`);
 * - `fromSpec(spec)`: rebuilds a structure from the JSON spec it produced;
 * - `dynamicMask(structure)` (optional): which θ entries are dynamic coefficients (AR lags,
 *   state feedback). The residual whiteness check subtracts the number of active dynamic
 *   coefficients from its degrees of freedom; a family without it counts none;
 * - `stable(structure, θ, at)` (optional): false when the fitted dynamics are explosive (`at`,
 *   when given, is the series and the end of the estimation sample, for a check that depends
 *   on where the state is); the search then lists the candidate as failed, with the family's
 *   `unstableReason`. A family without it is never rejected on this ground;
 * - `explore(series, bounds, scorer)` (optional): further candidates found by scoring, for a
 *   family whose full grid would be too large to fit (the ARX family's per-input delays and lag
 *   counts). The scorer fits and scores a structure on the search's common sample, each key
 *   once; every structure scored this way enters the ranking. `maxHistory(series, bounds)` is
 *   then required: the longest history any structure `explore` may try needs, so the common
 *   sample is fixed before the first score and every candidate is scored on it.
 *
 * Families are listed once in `FAMILIES` below (one line each, a fixed order), so the registry
 * holds no hidden mutable state. The search never branches on family names.
 *
 * Bounds reach families already resolved: every "auto" has become the explicit list of
 * alternatives to try, so all families read the same settings the same way.
 */
import type { Series } from '../data/series.js';
import { UsageError } from '../data/errors.js';
import type { Structure, StructureSpec, Transform } from './structure.js';
import { arxFamily } from './arx.js';
import { odeFamily } from './ode.js';
import { dampedFamily } from './damped.js';
import { pathFamily } from './growth-path.js';
import { smoothedFamily } from './smoothed.js';

/** Differencing applied to the scoring-scale target before regression. */
export type Differencing = 'none' | 'first' | 'seasonal';

/** Search bounds as families receive them: every alternative listed explicitly. */
export interface CandidateBounds {
  /** Largest number of AR lags (lags 1…p for p = 0…maxAr). */
  maxAr: number;
  /** Largest number of lags per input (lags 0…q−1 for q = 1…maxInputLags; 0 means inputs unused). */
  maxInputLags: number;
  /** Largest input delay d (d = 0…maxDelay). */
  maxDelay: number;
  /** Inputs of the series the search may use, in series order. */
  inputs: string[];
  /** Numbers of seasonal harmonic pairs to try, ascending (0 = none); empty when no season. */
  harmonics: number[];
  /**
   * Numbers of harmonic pairs of the change for the structures of the change (damped, smoothed),
   * ascending; empty when no season (absent: as `harmonics`).
   */
  changeHarmonics?: number[];
  /** Season length used by harmonics, seasonal lag and seasonal differencing (null = none). */
  season: number | null;
  /** Scoring-scale transforms to try, in this order. */
  transforms: Transform[];
  /** Trend term alternatives to try ([false], [true] or [false, true]). */
  trend: boolean[];
  /**
   * Trend alternatives for level structures on the log scale, where a trend is an exponential
   * line (absent: as `trend`).
   */
  logTrend?: boolean[];
  /** Seasonal-lag alternatives to try. */
  seasonalLag: boolean[];
  /** Differencing alternatives to try. */
  differencing: Differencing[];
}

/** What a guided family (`FamilyDefinition.explore`) scores its structures with. */
export interface CandidateScorer {
  /**
   * The ranking criterion of `structure` on the search's common sample (lower is better), or
   * Infinity when it cannot be fitted. A key already scored is not fitted again.
   */
  score(structure: Structure): number;
}

export interface FamilyDefinition {
  readonly name: string;
  candidates(series: Series, bounds: CandidateBounds): Structure[];
  /** Further candidates found by scoring (see the module comment); needs `maxHistory`. */
  explore?(series: Series, bounds: CandidateBounds, scorer: CandidateScorer): void;
  /** The longest `history` of any structure `candidates` or `explore` may offer within the bounds. */
  maxHistory?(series: Series, bounds: CandidateBounds): number;
  fromSpec(spec: StructureSpec): Structure;
  dynamicMask?(structure: Structure): boolean[];
  stable?(structure: Structure, theta: Float64Array, at?: StateAt): boolean;
  /** Why `stable` refused a candidate, in words (default: a generic phrase). */
  readonly unstableReason?: string;
}

/** Built-in families, in the order their candidates enter a search. Add one line per family. */
export const FAMILIES: readonly FamilyDefinition[] = [
  arxFamily,
  odeFamily,
  dampedFamily,
  smoothedFamily,
  pathFamily,
];

/** Names of the registered families, in registry order. */
export function familyNames(families: readonly FamilyDefinition[] = FAMILIES): string[] {
  return families.map((f) => f.name);
}

/** The family of that name; UsageError listing the known ones otherwise. */
export function getFamily(name: string, families: readonly FamilyDefinition[] = FAMILIES): FamilyDefinition {
  const f = families.find((x) => x.name === name);
  if (!f) {
    throw new UsageError('unknown-family', `unknown model family "${name}"`, {
      found: name,
      expected: `one of ${familyNames(families).join(', ')}`,
    });
  }
  return f;
}

/** Rebuilds a structure from a saved spec through its family. */
export function structureFromSpec(spec: StructureSpec, families: readonly FamilyDefinition[] = FAMILIES): Structure {
  if (typeof spec !== 'object' || spec === null || typeof spec.family !== 'string') {
    throw new UsageError('bad-spec', 'a structure spec needs a "family" field', { found: JSON.stringify(spec), expected: 'an object with family' });
  }
  return getFamily(spec.family, families).fromSpec(spec);
}

/** Which θ entries of a structure are dynamic coefficients (all false when its family does not say). */
export function dynamicMask(structure: Structure, families: readonly FamilyDefinition[] = FAMILIES): boolean[] {
  const f = families.find((x) => x.name === structure.family);
  return f?.dynamicMask ? f.dynamicMask(structure) : structure.terms.map(() => false);
}

/** Where a stability check looks from: the series and the end (exclusive) of the estimation sample. */
export interface StateAt {
  series: Series;
  to: number;
}

/** False when the structure's family reports explosive fitted dynamics for θ (from `at`, when given). */
export function isStable(structure: Structure, theta: Float64Array, families: readonly FamilyDefinition[] = FAMILIES, at?: StateAt): boolean {
  const f = families.find((x) => x.name === structure.family);
  return f?.stable ? f.stable(structure, theta, at) : true;
}

/** The reason a family gives for an explosive fit. */
export function unstableReason(structure: Structure, families: readonly FamilyDefinition[] = FAMILIES): string {
  return families.find((x) => x.name === structure.family)?.unstableReason ?? 'explosive fitted dynamics';
}
