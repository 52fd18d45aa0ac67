/**
 * An asserted model ⇄ its model-file body.
 *
 * What is saved is what continuing needs: the structure spec (rebuilt by the registry), θ and
 * the RLS state of the active terms (P embedded in the full p×p matrix, zero for terms a sparse
 * fit switched off), λ, σ², the last `capacity` raw observations (the window) with the count and
 * sum of the observations before it (so time-indexed terms and cumulative states continue where
 * they were), a fingerprint of every row seen, the drift detector and the update log.
 */
import type { Series } from '../data/series.js';
import { formatTime } from '../data/calendar.js';
import type { Criterion } from '../select/criteria.js';
import type { Structure } from '../models/structure.js';
import { structureFromSpec } from '../models/registry.js';
import { inputEffects } from '../models/input-effects.js';
import { Learner } from '../forecast/online.js';
import type { CombinationMember } from '../forecast/combine.js';
import { createDriftState, type DriftOptions } from '../forecast/drift.js';
import { fingerprintSeries } from './fingerprint.js';
import { DEFAULT_WINDOW_CAPACITY, windowFromSeries } from './window.js';
import type { ModelBody } from './model-file.js';

export interface AssertedState {
  structure: Structure;
  learner: Learner;
  /** Standard errors of θ at the time of the fit (for reports). */
  se: ArrayLike<number>;
}

export interface BodyOptions {
  criterion: Criterion;
  criterionValue: number;
  /** ISO time stamp of this write (the caller's clock). */
  now: string;
  /** When the model was first created (default: `now`). */
  created?: string;
  windowCapacity?: number;
  drift?: DriftOptions;
  meta?: Record<string, unknown>;
  /** The members of the delivered point forecast (`storedCombination`), when it combines candidates. */
  combination?: ModelBody['combination'];
}

/** The body of a model file for a learner that has learnt every row of `series`. */
export function modelBody(model: AssertedState, series: Series, options: BodyOptions): ModelBody {
  const { structure } = model;
  const n = series.values.length;
  const capacity = Math.max(options.windowCapacity ?? DEFAULT_WINDOW_CAPACITY, structure.history + 1);
  const window = windowFromSeries(series, capacity);
  const skipped = n - window.values.length;
  let skippedSum = 0;
  for (let i = 0; i < skipped; i++) skippedSum += series.values[i];
  const fields = learnerFields(model, series);
  return {
    ...fields.model,
    series: {
      name: series.name,
      frequency: series.frequency,
      ...(series.step !== undefined && series.step > 1 ? { step: series.step } : {}),
      season: series.season,
      lastTime: series.time[n - 1],
      lastTimeLabel: formatTime(series.time[n - 1], series.frequency),
      inputs: series.inputs.map((i) => i.name),
    },
    state: {
      ...fields.state,
      before: (series.before?.count ?? 0) + skipped,
      beforeSum: (series.before?.sum ?? 0) + skippedSum,
    },
    window,
    fingerprint: fingerprintSeries(series),
    criterion: { name: options.criterion, value: options.criterionValue },
    created: options.created ?? options.now,
    updated: options.now,
    log: [],
    drift: createDriftState(options.drift),
    meta: options.meta ?? {},
    ...(options.combination ? { combination: options.combination } : {}),
  };
}

/**
 * What a model file keeps of a combination: its members that were used (not left out), with
 * spec, coefficients, group, within-group weight and the group's weight across groups.
 * Undefined when no member was used.
 */
export function storedCombination(
  members: readonly Pick<CombinationMember, 'key' | 'spec' | 'theta' | 'group' | 'weight' | 'groupWeight' | 'excluded'>[],
): ModelBody['combination'] {
  const used = members.filter((m) => !m.excluded && m.weight > 0);
  if (used.length === 0) return undefined;
  return {
    members: used.map((m) => ({ key: m.key, structure: m.spec, theta: Array.from(m.theta), group: m.group, weight: m.weight, groupWeight: m.groupWeight })),
  };
}

/**
 * The body fields that describe the structure and its learner: spec, terms, θ, se, P (the RLS
 * matrix of the active terms embedded in the full p×p matrix, zero elsewhere), λ, σ², transform,
 * the effects of the inputs of `series` at the learnt θ, and the learner's entries of `state`. `modelBody` and online updates share it.
 */
export function learnerFields(model: AssertedState, series: Series): {
  model: Pick<ModelBody, 'structure' | 'terms' | 'theta' | 'se' | 'P' | 'lambda' | 'sigma2' | 'transform' | 'effects'>;
  state: Record<string, number | number[]>;
} {
  const { structure, learner } = model;
  const p = structure.terms.length;
  const rls = learner.rls;
  const active = learner.active;
  const cols: number[] = [];
  for (let j = 0; j < active.length; j++) if (active[j]) cols.push(j);
  const k = cols.length;
  const flat = rls.P;
  const P: number[][] = [];
  for (let i = 0; i < p; i++) P.push(new Array<number>(p).fill(0));
  for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) P[cols[a]][cols[b]] = flat[a * k + b];
  const theta: number[] = [];
  const th = learner.theta;
  for (let j = 0; j < th.length; j++) theta.push(th[j]);
  const se: number[] = [];
  for (let j = 0; j < model.se.length; j++) se.push(Number.isFinite(model.se[j]) ? model.se[j] : 0);
  return {
    model: {
      structure: structure.spec,
      terms: [...structure.terms],
      theta,
      se,
      P,
      lambda: rls.lambda,
      sigma2: learner.sigma2,
      transform: structure.transform,
      effects: inputEffects(structure, th, series),
    },
    state: {
      active: active.map((a) => (a ? 1 : 0)),
      rlsRss: rls.rss,
      rlsCount: rls.effectiveCount,
      traceMax: rls.traceMax,
      rlsUpdates: rls.updates,
    },
  };
}

/** The series held in a body's window (with what preceded it), ready to be extended. */
export function windowSeries(body: ModelBody): Series {
  const w = body.window;
  return {
    name: body.series.name,
    frequency: body.series.frequency as Series['frequency'],
    ...(body.series.step !== undefined ? { step: body.series.step } : {}),
    season: body.series.season,
    time: Float64Array.from(w.time),
    values: Float64Array.from(w.values),
    inputs: body.series.inputs.map((name) => ({ name, values: Float64Array.from(w.inputs[name]) })),
    before: { count: Number(body.state.before ?? 0), sum: Number(body.state.beforeSum ?? 0) },
  };
}

/** Rebuilds the structure and the learner of a body; the learner continues after the window. */
export function assertedFromBody(body: ModelBody): AssertedState {
  const structure = structureFromSpec(body.structure);
  const active = (body.state.active as number[]).map((a) => a === 1);
  const cols = active.map((a, j) => (a ? j : -1)).filter((j) => j >= 0);
  const learner = Learner.fromJSON(structure, {
    active,
    next: body.window.values.length,
    rls: {
      theta: cols.map((j) => body.theta[j]),
      P: cols.map((a) => cols.map((b) => body.P[a][b])),
      lambda: body.lambda,
      traceMax: Number(body.state.traceMax),
      rss: Number(body.state.rlsRss),
      count: Number(body.state.rlsCount),
      updates: Number(body.state.rlsUpdates ?? 0),
    },
  });
  return { structure, learner, se: body.se };
}
