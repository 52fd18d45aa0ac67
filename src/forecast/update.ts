/**
 * Living models: one online update of a saved model with new observations.
 *
 * `update(body, rows, options)` takes the body of a model file and a regular series of new data
 * (which may repeat rows the model has already seen) and returns the updated body, a fresh
 * forecast and what happened on the way. Nothing here touches files or clocks: the caller
 * passes `now` and writes the result (the CLI holds the model's lock around read → update →
 * write).
 *
 * Procedure.
 * 1. Rows at or before the model's last time stamp are checked against the stored window: the
 *    value and every input the model uses must equal, as raw numbers, what the model saw. A
 *    difference is a revised history and is refused (DataError `revised-history`, naming the
 *    first differing time and column) unless `acceptRevisions`: then the revised values replace
 *    the window's and the same structure is re-estimated on the revised window (a fresh batch
 *    fit of its active terms), from which learning continues. Rows older than the window cannot
 *    be checked and are counted in a warning.
 * 2. Rows after the last time stamp must continue the calendar (the first one period after it,
 *    each next one period later), with finite values and every input the model uses.
 * 3. Each new observation y_t gets one recursive least-squares step of the learner
 *    (online.ts; λ from the body), and its standardised innovation z_t = ε_t / √v_t (ε the
 *    innovation before the step, v its predicted variance σ̂²(1 + φᵀPφ)) one step of the drift
 *    detector (drift.ts: two-sided CUSUM with k = 0.5, h from ARL₀ = 4000 ⇒ h ≈ 7.13, and a
 *    20-observation variance window at α = 1e-4, unless the model was created with others).
 * 4. On a drift alarm the policy `onDrift` applies:
 *    - `warn`: the alarm is reported; learning goes on unchanged.
 *    - `adapt`: the learner forgets faster for a while: λ = ADAPT.lambda (0.9, an effective
 *      memory 1/(1 − λ) = 10 observations) for the next ADAPT.steps (24) observations, and P is
 *      multiplied by ADAPT.inflate (10) at the alarm, so the gain K = Pφ/(λ + φᵀPφ) grows and θ
 *      re-learns within a few observations (the covariance-resetting idea of adaptive control:
 *      Goodwin & Sin, "Adaptive Filtering, Prediction and Control", 1984, §3.4 — section from
 *      memory). The remaining count is saved in the model (`state.adaptRemaining`), so it spans
 *      later updates; afterwards λ returns to the body's λ.
 *    - `research`: after the rows of this update are learnt, a fresh structure search
 *      (select/search.ts, default bounds over the model's inputs) runs on the stored window
 *      with the new rows, and its winner is asserted: new structure, a learner started from its
 *      batch fit on the window, a fresh drift detector with the same thresholds.
 *    The alarm, the policy taken and the equations before and after go into the result and the
 *    update log.
 * 5. Window, fingerprint, state, last time stamp, `updated` and the log (time, rows added,
 *    ‖θ_after − θ_before‖₂, alarms, policy, note) are extended. When a re-search changes the
 *    terms, the parameter change is taken over the union of term names, a term missing from
 *    one side counting as 0. The log note carries the equations before and after only when
 *    something beyond plain learning happened (an alarm, a re-search, accepted revisions), and
 *    the log keeps the last LOG_LIMIT (240) entries, so long runs of single-row updates keep the
 *    file small. After accepted revisions the fingerprint chain is extended by the revised rows
 *    and then the new ones: it covers every row certa was given, in the order given.
 * 6. A forecast from the updated model: horizon from the options, else the model's
 *    `meta.horizon`, else two seasons (8 without a season); levels likewise (default 50, 90);
 *    future inputs by the same default policy as `certa forecast` (future.ts: repeat the last
 *    season for a seasonal series, else hold the last values) or `options.future`; intervals by
 *    forecastWithIntervals (intervals.ts) with the learner's σ̂², σ̂²P and, for simulation
 *    intervals, the one-step residuals of the current θ over the window. When the body holds a
 *    combination (the members of `certa forecast`'s point, model-file.ts), the point is that
 *    combination continued from the window (combine.ts: the same weights and the same checks for
 *    paths to leave out), the asserted member with its learnt θ and the others with the
 *    coefficients they were saved with, and the bands are moved onto it as `certa forecast`
 *    moves them. A re-search replaces the combination by the new search's members, estimated on
 *    the window.
 *
 * No new rows (and no accepted revision): the body is returned unchanged (the same object),
 * `added` is 0 and `changed` false; the caller need not write anything.
 *
 * The structure and learner an update ends with are kept (weakly) beside the body it returns;
 * the next update of that body takes them over, once, when the body still holds exactly that
 * spec and learning state, instead of rebuilding them from the spec and arrays.
 *
 * Cost of a one-row update of an ARX model with a 240-row window: the regression row needs
 * one pass over the window (transform and differencing), one RLS step is O(p²), one SHA-256 for
 * the fingerprint, one drift step, one copy of the window, and the forecast two simulations of
 * h steps (analytic intervals) or `draws` simulations (bootstrap). See bench/update.bench.ts.
 */
import { cadenceName, formatTime, periodName, stepTime } from '../data/calendar.js';
import { DataError, UsageError } from '../data/errors.js';
import { seriesStep, timesAfter, type Series } from '../data/series.js';
import type { Structure } from '../models/structure.js';
import { forward } from '../models/transforms.js';
import { search, type SearchOptions, type SearchResult } from '../select/search.js';
import { structureFromSpec } from '../models/registry.js';
import { assertedFromBody, learnerFields, storedCombination, windowSeries, type AssertedState } from '../store/asserted.js';
import { extendFingerprint, type DataRow } from '../store/fingerprint.js';
import type { ModelBody, UpdateEntry } from '../store/model-file.js';
import { extendWindow } from '../store/window.js';
import { createDriftState, stepDrift, type DriftAlarm, type DriftState } from './drift.js';
import { defaultInputPolicy, futureByPolicy, type FutureInputs } from './future.js';
import { DEFAULT_LEVELS, forecastWithIntervals, isLinearStructure, type ForecastPaths, type IntervalMethod } from './intervals.js';
import { Learner } from './online.js';
import { defaultHorizon, UNCALIBRATED_WARNING } from './pipeline.js';
import { calibratedPaths, type CalibrationOptions } from './calibrate.js';
import { combinationMembers, combineForecasts, combinedPaths, replacesOwn, type Combination, type Member } from './combine.js';

export type DriftPolicy = 'warn' | 'adapt' | 'research';
export const DRIFT_POLICIES: readonly DriftPolicy[] = ['warn', 'adapt', 'research'];

/** The `adapt` policy: λ while adapting, for how many observations, and the factor on P at the alarm. */
export const ADAPT = { lambda: 0.9, steps: 24, inflate: 10 } as const;

/** Most update-log entries a model keeps (the oldest are dropped). */
export const LOG_LIMIT = 240;

export interface UpdateOptions {
  /** ISO 8601 time of this update (the caller's clock), for `updated` and the log. */
  now: string;
  /** What to do on a drift alarm (default 'warn'). */
  onDrift?: DriftPolicy;
  /** Accept revised values of rows the model has seen and re-estimate on the revised window. */
  acceptRevisions?: boolean;
  /** Forecast horizon (default: the model's meta.horizon, else two seasons or 8). */
  horizon?: number;
  /** Interval levels in percent (default: the model's meta.levels, else DEFAULT_LEVELS, 50 and 90). */
  levels?: number[];
  /** Future inputs for the forecast (default: held at their last values). */
  future?: (history: Series, h: number, times: number[]) => FutureInputs;
  /** Options of the simulation intervals. */
  intervals?: { method?: IntervalMethod; draws?: number; seed?: number; parameterUncertainty?: boolean; calibration?: CalibrationOptions };
  /** Search options of the `research` policy (default bounds over the model's inputs). */
  search?: SearchOptions;
  /** Skip the forecast (the result's `forecast` is null). Default false. */
  skipForecast?: boolean;
}

/** One new observation as learnt. */
export interface UpdateStep {
  time: number;
  label: string;
  /** Innovation ε_t (scoring scale), its predicted variance v_t and z_t = ε_t/√v_t. */
  innovation: number;
  variance: number;
  z: number;
  /** λ used for this step. */
  lambda: number;
  alarm: DriftAlarm | null;
}

export interface PolicyOutcome {
  /** 'continue' without alarm, else the policy taken. */
  name: 'continue' | DriftPolicy;
  /** What was done, in words. */
  note: string;
  /** The structure's label and equation before and after the update. */
  before: ModelDescription;
  after: ModelDescription;
  /** Whether the structure itself changed (a re-search picked another one). */
  structureChanged: boolean;
}

export interface ModelDescription {
  key: string;
  label: string;
  equation: string;
}

export interface Revision {
  time: number;
  label: string;
  column: string;
  found: number;
  expected: number;
}

export interface UpdateForecast {
  times: Float64Array;
  paths: ForecastPaths;
  inputs: FutureInputs;
  horizon: number;
  levels: number[];
  /** The combination the point comes from (null: the asserted equation's own path). */
  combination: Combination | null;
}

export interface UpdateResult {
  body: ModelBody;
  /** New observations learnt. */
  added: number;
  /** False when nothing changed (then `body` is the input body). */
  changed: boolean;
  /** The updated model's window as a series (what the forecast starts from). */
  series: Series;
  forecast: UpdateForecast | null;
  alarms: DriftAlarm[];
  steps: UpdateStep[];
  revisions: Revision[];
  /** ‖θ_after − θ_before‖₂ (over the union of term names). */
  parameterChange: number;
  policy: PolicyOutcome;
  warnings: string[];
  /** The log entry appended (null when nothing changed). */
  entry: UpdateEntry | null;
}

const FRESH_HINT = 'fit the model again on the corrected data with a fresh `certa forecast`, or pass --accept-revisions to re-estimate on the revised history';

/** Updates a model with new rows (see the module comment). */
export function update(body: ModelBody, rows: Series, options: UpdateOptions): UpdateResult {
  const policyName = options.onDrift ?? 'warn';
  if (!DRIFT_POLICIES.includes(policyName)) {
    throw new UsageError('bad-drift-policy', 'unknown drift policy', { found: String(policyName), expected: DRIFT_POLICIES.join(', ') });
  }
  const f = body.series.frequency as Series['frequency'];
  const step = body.series.step ?? 1;
  const label = (t: number) => formatTime(t, f);
  // A single new time stamp shows no step of its own: it is taken to follow the model's.
  const rowsStep = rows.time.length > 1 ? seriesStep(rows) : step;
  if (rows.frequency !== f || rowsStep !== step) {
    const found = cadenceName(rows.frequency, rowsStep);
    const model = cadenceName(f, step);
    throw new DataError('frequency-mismatch', `the new data are ${found}, the model is ${model}`, {
      ...(rows.source ? { file: rows.source } : {}),
      found,
      expected: `${model} data (the frequency the model was fitted on)`,
      hint: 'load the new data with the same --freq and --aggregate options as the model',
    });
  }
  const names = body.series.inputs;
  const columns = names.map((name) => {
    const input = rows.inputs.find((i) => i.name === name);
    if (!input) {
      throw new DataError('missing-input', `the new data lack input "${name}", which the model uses`, {
        ...(rows.source ? { file: rows.source } : {}),
        column: name,
        found: rows.inputs.length > 0 ? rows.inputs.map((i) => i.name).join(', ') : 'no inputs',
        expected: `the inputs ${names.join(', ')}`,
        hint: `load the new data with --inputs ${names.join(',')}`,
      });
    }
    return input.values;
  });
  const warnings: string[] = [];
  const extra = rows.inputs.filter((i) => !names.includes(i.name)).map((i) => i.name);
  if (extra.length > 0) warnings.push(`input${extra.length > 1 ? 's' : ''} ${extra.join(', ')} in the new data ${extra.length > 1 ? 'are' : 'is'} not used by the model and ignored`);

  // 1. Overlap with the stored window.
  const w = body.window;
  const lastTime = body.series.lastTime;
  const revisions: Revision[] = [];
  let older = 0;
  let firstNew = rows.time.length;
  let wi = 0;
  for (let i = 0; i < rows.time.length; i++) {
    const t = rows.time[i];
    if (t > lastTime) {
      firstNew = i;
      break;
    }
    if (w.time.length === 0 || t < w.time[0]) {
      older++;
      continue;
    }
    while (wi < w.time.length && w.time[wi] < t) wi++;
    if (wi >= w.time.length || w.time[wi] !== t) {
      throw new DataError('off-calendar', `the new data have a row at ${label(t)}, which is not a period the model has seen`, {
        ...(rows.source ? { file: rows.source } : {}),
        found: label(t),
        expected: `${f} time stamps like the model's (last ${label(lastTime)})`,
      });
    }
    const check = (column: string, found: number, expected: number) => {
      if (found === expected) return;
      if (!options.acceptRevisions) {
        throw new DataError('revised-history', `the new data revise ${label(t)}, which the model has already learnt: column "${column}" is ${found}, the model saw ${expected}`, {
          ...(rows.source ? { file: rows.source } : {}),
          column,
          found: String(found),
          expected: `${expected} (the value the model saw at ${label(t)})`,
          hint: FRESH_HINT,
        });
      }
      revisions.push({ time: t, label: label(t), column, found, expected });
    };
    check(rows.name, rows.values[i], w.values[wi]);
    names.forEach((name, j) => check(name, columns[j][i], w.inputs[name][wi]));
  }
  if (older > 0) warnings.push(`${older} row${older > 1 ? 's' : ''} of the new data precede the model's stored window and could not be checked against what it saw`);

  // 2. The new rows continue the calendar.
  const added = rows.time.length - firstNew;
  const newRows: DataRow[] = [];
  let prev = lastTime;
  for (let i = firstNew; i < rows.time.length; i++) {
    const t = rows.time[i];
    const expected = stepTime(prev, f, step);
    if (t !== expected) {
      throw new DataError('gap-in-new-data', i === firstNew ? `the new data do not continue the model: after ${label(prev)} comes ${label(t)}` : `the new data skip from ${label(prev)} to ${label(t)}`, {
        ...(rows.source ? { file: rows.source } : {}),
        found: label(t),
        expected: `${label(expected)} (${step === 1 ? 'one period' : `one step of ${step} ${periodName(f, step)}`} after ${label(prev)})`,
        hint: i === firstNew ? 'include every period since the model’s last one; fill gaps with --gaps' : 'fill the gap with --gaps interpolate, or supply the missing rows',
      });
    }
    const value = rows.values[i];
    if (!Number.isFinite(value)) throw missing(rows, rows.name, label(t), value);
    const inputs = columns.map((c, j) => {
      if (!Number.isFinite(c[i])) throw missing(rows, names[j], label(t), c[i]);
      return c[i];
    });
    newRows.push({ time: t, value, inputs });
    prev = t;
  }

  if (added === 0 && revisions.length === 0) {
    const unchanged = assertedFromBody(body);
    const series = windowSeries(body);
    const equation = describeModel(unchanged);
    return {
      body,
      added: 0,
      changed: false,
      series,
      forecast: options.skipForecast ? null : forecastFrom(unchanged, series, body, options, warnings),
      alarms: [],
      steps: [],
      revisions,
      parameterChange: 0,
      policy: { name: 'continue', note: '0 new rows: the model is unchanged', before: equation, after: equation, structureChanged: false },
      warnings,
      entry: null,
    };
  }

  // Rebuild the model (or take over the one the previous update left), replaying a revised
  // window when asked.
  const reused = carriedFrom(body);
  let model = reused?.model ?? assertedFromBody(body);
  const structureBefore = model.structure;
  const thetaBefore = model.learner.theta;
  let beforeText: ModelDescription | undefined;
  const describeBefore = () => (beforeText ??= { key: structureBefore.key, label: structureBefore.label, equation: structureBefore.describe(thetaBefore) });
  const seen = revisions.length > 0 ? reviseWindow(w, rows, names, columns, lastTime) : w;
  const notes: string[] = [];
  if (revisions.length > 0) {
    const revised = windowSeries({ ...body, window: seen });
    const learner = Learner.start(model.structure, model.learner.active, revised, model.structure.history, revised.values.length, { lambda: body.lambda });
    model = { structure: model.structure, learner, se: seOf(learner) };
    const first = revisions[0];
    notes.push(`accepted ${revisions.length} revised value${revisions.length > 1 ? 's' : ''} (first ${first.label}, column "${first.column}": ${first.expected} → ${first.found}); re-estimated on the revised window`);
  }
  const window = extendWindow(seen, newRows, names);
  // values dropped from the front: the oldest of the (revised) window, then new rows
  const dropped = seen.values.length + newRows.length - window.values.length;
  let droppedSum = 0;
  for (let i = 0; i < dropped; i++) droppedSum += i < seen.values.length ? seen.values[i] : newRows[i - seen.values.length].value;
  const state: ModelBody['state'] = {
    ...body.state,
    before: Number(body.state.before ?? 0) + dropped,
    beforeSum: Number(body.state.beforeSum ?? 0) + droppedSum,
  };
  const nextBody: ModelBody = { ...body, window, state };
  // The series the learner continues on: the old window (revised) plus the new rows; positions
  // are those of the old window, so the learner's `next` is the first new row.
  const ext = appendRows(body, seen, newRows, names);

  // 3–4. Learn row by row, watching for drift.
  const steps: UpdateStep[] = [];
  const alarms: DriftAlarm[] = [];
  let drift: DriftState = body.drift;
  let adaptRemaining = Number(body.state.adaptRemaining ?? 0);
  const baseLambda = body.lambda;
  const offset = ext.values.length - newRows.length;
  for (let k = 0; k < newRows.length; k++) {
    const lam = adaptRemaining > 0 ? ADAPT.lambda : baseLambda;
    if (model.learner.rls.lambda !== lam) model.learner.rls.lambda = lam;
    const learnt = model.learner.learn(ext, offset + k + 1);
    if (adaptRemaining > 0) adaptRemaining--;
    const t = newRows[k].time;
    for (const s of learnt) {
      const z = s.innovation / Math.sqrt(s.variance);
      const d = stepDrift(drift, z, t);
      drift = d.state;
      steps.push({ time: t, label: label(t), innovation: s.innovation, variance: s.variance, z, lambda: lam, alarm: d.alarm });
      if (d.alarm) {
        alarms.push(d.alarm);
        if (policyName === 'adapt') {
          model = { ...model, learner: inflated(model.learner, ADAPT.inflate) };
          adaptRemaining = ADAPT.steps;
        }
      }
    }
  }
  if (model.learner.rls.lambda !== baseLambda) model.learner.rls.lambda = baseLambda;

  let structureChanged = false;
  let criterion = body.criterion;
  let combination = body.combination;
  let meta = body.meta;
  if (alarms.length > 0 && policyName === 'research') {
    const found = search(ext, { inputs: names, ...options.search });
    warnings.push(...found.warnings);
    const s = found.winner.structure;
    const learner = Learner.start(s, found.winner.estimate.active, ext, found.sample.from, ext.values.length, { lambda: baseLambda });
    structureChanged = s.key !== model.structure.key;
    model = { structure: s, learner, se: found.winner.estimate.se };
    drift = createDriftState({ k: drift.k, h: drift.h, window: drift.window, varianceRate: drift.varianceRate });
    adaptRemaining = 0;
    criterion = { name: found.criterion, value: found.winner.result.score };
    combination = searchedCombination(found.ranking);
    notes.push(
      `re-searched ${found.fitted} structures on the stored window (${found.sample.start} to ${found.sample.end}) after the drift alarm; ` +
        (structureChanged ? `asserted ${s.label}` : 'the same structure won; re-estimated on the window'),
    );
  } else if (alarms.length > 0 && policyName === 'adapt') {
    notes.push(`drift alarm: forgetting with λ = ${ADAPT.lambda} for ${ADAPT.steps} observations and P ×${ADAPT.inflate} at the alarm (${adaptRemaining} observations of fast forgetting left)`);
  } else if (alarms.length > 0) {
    notes.push('drift alarm: warned only; the model keeps learning as before');
  }
  if (adaptRemaining > 0 || state.adaptRemaining !== undefined) state.adaptRemaining = adaptRemaining;

  const seAfter = seOf(model.learner);
  const after: ModelDescription = { key: model.structure.key, label: model.structure.label, equation: model.structure.describe(model.learner.theta) };
  const parameterChange = structureChanged
    ? changeNorm(termMap(structureBefore.terms, thetaBefore), termMap(model.structure.terms, model.learner.theta))
    : euclidean(thetaBefore, model.learner.theta);
  if (body.meta.equation !== undefined || structureChanged) {
    meta = { ...meta, key: model.structure.key, label: model.structure.label, equation: after.equation };
  }
  const fields = learnerFields({ ...model, se: seAfter }, ext);
  const policy: PolicyOutcome = {
    name: alarms.length === 0 ? 'continue' : policyName,
    note: notes.join('; ') || `learnt ${added} new row${added === 1 ? '' : 's'}`,
    get before() {
      return describeBefore();
    },
    after,
    structureChanged,
  };
  // Equations go into the log when something happened beyond plain learning (an alarm, a
  // re-search, accepted revisions), so a long run of single-row updates keeps a small log.
  const remarkable = alarms.length > 0 || structureChanged || revisions.length > 0;
  const entry: UpdateEntry = {
    time: options.now,
    rowsAdded: added,
    parameterChange,
    alarms,
    policy: policy.name,
    note: remarkable ? `${policy.note}; before: ${describeBefore().equation}; after: ${after.equation}` : policy.note,
  };
  const log = body.log.length >= LOG_LIMIT ? body.log.slice(body.log.length - LOG_LIMIT + 1) : body.log.slice();
  log.push(entry);
  const last = newRows.length > 0 ? newRows[newRows.length - 1].time : lastTime;
  Object.assign(nextBody, fields.model, {
    series: { ...body.series, lastTime: last, lastTimeLabel: label(last) },
    state: { ...state, ...fields.state },
    fingerprint: extendFingerprint(body.fingerprint, revisions.length > 0 ? [...overlapRows(rows, columns, lastTime), ...newRows] : newRows),
    criterion,
    updated: options.now,
    log,
    drift,
    meta,
  });
  if (combination) nextBody.combination = combination;
  else delete nextBody.combination;
  // The new window is the tail of `ext`; the learner's positions move with it.
  const series = tailSeries(ext, dropped, { count: Number(state.before), sum: Number(state.beforeSum) });
  model.learner.next = series.values.length;
  const current = model;
  const forecast = options.skipForecast ? null : forecastFrom(current, series, nextBody, options, warnings);
  carry(nextBody, current, reused !== undefined && nextBody.structure === body.structure ? reused.spec : undefined);
  return {
    body: nextBody,
    added,
    changed: true,
    series,
    forecast,
    alarms,
    steps,
    revisions,
    parameterChange,
    policy,
    warnings,
    entry,
  };
}

/**
 * The structure and learner an update ends with, kept (weakly) beside the body it returned, so
 * the next update of that body need not rebuild them from the body's spec and arrays. An entry
 * is taken once (the learner goes on learning) and only when the body still holds exactly the
 * spec and learning state it was written with; otherwise the body is read as usual.
 */
const carried = new WeakMap<ModelBody, { model: AssertedState; spec: unknown }>();

/** Keeps `model` for the next update of `body`; `spec` is a private copy of the body's spec when one is at hand. */
function carry(body: ModelBody, model: AssertedState, spec: unknown = copyJson(body.structure)): void {
  carried.set(body, { model, spec });
}

/** The carried model of `body` when it still matches the body, with the private copy of its spec. */
function carriedFrom(body: ModelBody): { model: AssertedState; spec: unknown } | undefined {
  const entry = carried.get(body);
  if (!entry) return undefined;
  carried.delete(body);
  const { structure, learner } = entry.model;
  if (body.structure !== structure.spec || !sameJson(body.structure, entry.spec) || !holdsLearner(body, learner)) return undefined;
  learner.next = body.window.values.length;
  return { model: { structure, learner, se: body.se }, spec: entry.spec };
}

/** A deep copy of a JSON value (plain objects, arrays, scalars). */
function copyJson(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(copyJson);
  if (value === null || typeof value !== 'object') return value;
  const out: Record<string, unknown> = {};
  for (const key of Object.keys(value)) out[key] = copyJson((value as Record<string, unknown>)[key]);
  return out;
}

/** Whether two JSON values are equal: same scalars (Object.is), same array entries, same keys and members. */
function sameJson(a: unknown, b: unknown): boolean {
  if (Object.is(a, b)) return true;
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') return false;
  if (Array.isArray(a) !== Array.isArray(b)) return false;
  if (Object.getPrototypeOf(a) !== Object.getPrototypeOf(b)) return false;
  const ka = Object.keys(a);
  const kb = Object.keys(b);
  if (ka.length !== kb.length) return false;
  for (let i = 0; i < ka.length; i++) {
    if (ka[i] !== kb[i] || !sameJson((a as Record<string, unknown>)[ka[i]], (b as Record<string, unknown>)[ka[i]])) return false;
  }
  return true;
}

/** True when the body's learning state is, number for number, that of `learner`. */
function holdsLearner(body: ModelBody, learner: Learner): boolean {
  const rls = learner.rls;
  const state = body.state;
  const active = state.active;
  const p = learner.active.length;
  if (!Array.isArray(active) || active.length !== p || body.theta.length !== p || body.P.length !== p) return false;
  if (!(Object.is(body.lambda, rls.lambda) && Object.is(state.traceMax, rls.traceMax) && Object.is(state.rlsRss, rls.rss))) return false;
  if (!(Object.is(state.rlsCount, rls.effectiveCount) && Object.is(state.rlsUpdates, rls.updates))) return false;
  const theta = learner.theta;
  const P = rls.P;
  const k = rls.p;
  const cols: number[] = [];
  for (let j = 0; j < p; j++) {
    if (active[j] !== (learner.active[j] ? 1 : 0) || !Object.is(body.theta[j], theta[j])) return false;
    if (learner.active[j]) cols.push(j);
  }
  if (cols.length !== k) return false;
  for (let a = 0; a < k; a++) {
    const row = body.P[cols[a]];
    if (!Array.isArray(row)) return false;
    for (let b = 0; b < k; b++) if (!Object.is(row[cols[b]], P[a * k + b])) return false;
  }
  return true;
}

function missing(rows: Series, column: string, at: string, found: number): DataError {
  return new DataError('missing-value', `the new data have no usable value of "${column}" at ${at}`, {
    ...(rows.source ? { file: rows.source } : {}),
    column,
    found: String(found),
    expected: 'a finite number in every new row',
    hint: 'fill the gap with --gaps interpolate, or supply the missing value',
  });
}

function describeModel(model: AssertedState): ModelDescription {
  return { key: model.structure.key, label: model.structure.label, equation: model.structure.describe(model.learner.theta) };
}

/** Standard errors √(σ̂²P_jj) of the learner's current θ (0 for inactive terms). */
function seOf(learner: Learner): Float64Array {
  const p = learner.structure.terms.length;
  const cov = learner.cov;
  const out = new Float64Array(p);
  for (let j = 0; j < p; j++) out[j] = Math.sqrt(Math.max(0, cov[j * p + j]));
  return out;
}

function termMap(terms: string[], theta: ArrayLike<number>): Map<string, number> {
  return new Map(terms.map((t, j) => [t, theta[j]]));
}

/** ‖a − b‖₂ of two vectors of the same length. */
function euclidean(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let j = 0; j < a.length; j++) s += (a[j] - b[j]) ** 2;
  return Math.sqrt(s);
}

/** ‖a − b‖₂ over the union of term names, a term missing from one side counting as 0. */
function changeNorm(a: Map<string, number>, b: Map<string, number>): number {
  let s = 0;
  for (const [k, v] of a) s += (v - (b.get(k) ?? 0)) ** 2;
  for (const [k, v] of b) if (!a.has(k)) s += v * v;
  return Math.sqrt(s);
}

/** The learner with P multiplied by `factor` (θ, λ, V and N unchanged). */
function inflated(learner: Learner, factor: number): Learner {
  const json = learner.toJSON();
  return Learner.fromJSON(learner.structure, { ...json, rls: { ...json.rls, P: json.rls.P.map((r) => r.map((v) => v * factor)) } });
}

/** The window with the revised values of the new data's overlapping rows. */
function reviseWindow(w: ModelBody['window'], rows: Series, names: string[], columns: Float64Array[], lastTime: number): ModelBody['window'] {
  const out = { capacity: w.capacity, time: w.time, values: w.values.slice(), inputs: Object.fromEntries(names.map((n) => [n, w.inputs[n].slice()])) };
  const at = new Map(w.time.map((t, i) => [t, i]));
  for (let i = 0; i < rows.time.length && rows.time[i] <= lastTime; i++) {
    const k = at.get(rows.time[i]);
    if (k === undefined) continue;
    out.values[k] = rows.values[i];
    names.forEach((n, j) => (out.inputs[n][k] = columns[j][i]));
  }
  return out;
}

/**
 * The overlapping rows of the new data, for the fingerprint chain after accepted revisions: the
 * chain then covers every row certa was given, revised ones included, in the order given.
 */
function overlapRows(rows: Series, columns: Float64Array[], lastTime: number): DataRow[] {
  const out: DataRow[] = [];
  for (let i = 0; i < rows.time.length && rows.time[i] <= lastTime; i++) out.push({ time: rows.time[i], value: rows.values[i], inputs: columns.map((c) => c[i]) });
  return out;
}

/** The series of the window `seen` (what `windowSeries` gives for it) followed by the new rows. */
function appendRows(body: ModelBody, seen: ModelBody['window'], rows: DataRow[], names: string[]): Series {
  const n = seen.values.length;
  const m = rows.length;
  const time = new Float64Array(n + m);
  const values = new Float64Array(n + m);
  time.set(seen.time);
  values.set(seen.values);
  const inputs = names.map((name, j) => {
    const v = new Float64Array(n + m);
    v.set(seen.inputs[name]);
    for (let k = 0; k < m; k++) v[n + k] = rows[k].inputs[j];
    return { name, values: v };
  });
  for (let k = 0; k < m; k++) {
    time[n + k] = rows[k].time;
    values[n + k] = rows[k].value;
  }
  return {
    name: body.series.name,
    frequency: body.series.frequency as Series['frequency'],
    ...(body.series.step !== undefined ? { step: body.series.step } : {}),
    season: body.series.season,
    time,
    values,
    inputs,
    before: { count: Number(body.state.before ?? 0), sum: Number(body.state.beforeSum ?? 0) },
  };
}

/**
 * Observations [drop, n) of a series, sharing its buffers, with `before` as the body states it
 * (what `sliceSeries` gives, without summing the dropped values it would then replace).
 */
function tailSeries(series: Series, drop: number, before: { count: number; sum: number }): Series {
  const n = series.values.length;
  return {
    ...series,
    time: series.time.subarray(drop, n),
    values: series.values.subarray(drop, n),
    inputs: series.inputs.map((i) => ({ name: i.name, values: i.values.subarray(drop, n) })),
    before,
  };
}

/** The forecast of the model after its window (module comment, step 6). */
function forecastFrom(model: AssertedState, series: Series, body: ModelBody, options: UpdateOptions, warnings: string[]): UpdateForecast {
  const metaHorizon = typeof body.meta.horizon === 'number' ? body.meta.horizon : undefined;
  const horizon = options.horizon ?? metaHorizon ?? defaultHorizon(series);
  if (!(Number.isInteger(horizon) && horizon >= 1 && horizon <= 10_000)) {
    throw new UsageError('bad-horizon', 'the forecast horizon must be a whole number of periods from 1 to 10000', { found: String(horizon), expected: 'e.g. 12' });
  }
  const metaLevels = Array.isArray(body.meta.levels) && body.meta.levels.every((l) => typeof l === 'number') ? (body.meta.levels as number[]) : undefined;
  const levels = options.levels ?? metaLevels ?? [...DEFAULT_LEVELS];
  for (const l of levels) {
    if (!(l > 0 && l < 100)) throw new UsageError('bad-level', 'interval levels must lie strictly between 0 and 100', { found: String(l), expected: 'e.g. 50,90' });
  }
  const { structure, learner } = model;
  const n = series.values.length;
  const times = timesAfter(series, horizon);
  const inputs =
    series.inputs.length === 0 ? { values: [], source: 'no inputs' } : options.future ? options.future(series, horizon, Array.from(times)) : futureByPolicy(series, horizon, defaultInputPolicy(series));
  const wanted = options.intervals?.method ?? (typeof body.meta.intervalMethod === 'string' ? (body.meta.intervalMethod as IntervalMethod) : 'calibrated');
  const method = wanted === 'calibrated' ? (isLinearStructure(structure) ? 'analytic' : 'bootstrap') : wanted;
  const theta = learner.theta;
  // The asserted equation's own bands (analytic, or a bootstrap of 1,000 paths) are made only
  // when they are delivered: asked for, or in place of calibrated bands the window cannot give.
  let own: ForecastPaths | null = null;
  const ownPaths = (): ForecastPaths => {
    const residuals = method === 'bootstrap' ? windowResiduals(structure, theta, series) : new Float64Array(0);
    const estimate = { theta, cov: learner.cov, sigma2: learner.sigma2, active: learner.active };
    return (own ??= forecastWithIntervals(structure, estimate, series, inputs.values, horizon, residuals, { levels, ...options.intervals, method }));
  };
  const members = body.combination ? storedMembers(body.combination, model) : null;
  const combination = members ? combineForecasts(members, horizon, (s, e) => s.simulate(e.theta, series, inputs.values, horizon), series.values) : null;
  const replaced = combination !== null && replacesOwn(combination, structure.key);
  // Calibrated bands on the stored window: the members of the point (or the asserted equation
  // alone) re-run from rolling origins inside it, as `certa forecast` does on the whole series.
  let calibrated: ForecastPaths | null = null;
  if (wanted === 'calibrated') {
    const point = replaced ? Float64Array.from(combination.point) : structure.simulate(theta, series, inputs.values, horizon);
    const shares = new Map((replaced ? combination.members : []).map((m) => [m.key, m.share]));
    const used = replaced && members ? members.filter((m) => (shares.get(m.key) ?? 0) > 0).map((m) => ({ structure: m.structure, estimate: { active: m.key === structure.key ? learner.active : Array.from(m.estimate.theta, (v) => v !== 0) }, share: shares.get(m.key) ?? 0 })) : [{ structure, estimate: { active: learner.active }, share: 1 }];
    const from = Math.max(1, ...used.map((m) => m.structure.history));
    const spread = replaced ? combination.members.filter((m) => !m.excluded && m.share > 0) : [];
    calibrated = calibratedPaths(point, used, spread, series, from, levels, options.intervals?.calibration);
    if (calibrated === null) warnings.push(UNCALIBRATED_WARNING.replace('the series is', "the model's stored window is"));
  }
  const paths = calibrated ?? (replaced ? (combinedPaths(ownPaths(), combination, structure.key) as ForecastPaths) : ownPaths());
  for (let j = 0; j < horizon; j++) {
    if (!Number.isFinite(paths.point[j])) {
      warnings.push(`the forecast is not finite from step ${j + 1} on: the updated equation diverges over this horizon`);
      break;
    }
  }
  return { times, paths, inputs, horizon, levels, combination: replaced ? combination : null };
}

/** Member structures rebuilt from a body's combination, kept while the combination object lives. */
const memberStructures = new WeakMap<NonNullable<ModelBody['combination']>, Structure[]>();

/**
 * The members of a stored combination, ready to forecast: structures rebuilt from their specs
 * (once per stored combination), the saved coefficients, and the asserted structure's member
 * with the learner's current θ. A member whose coefficients do not fit its structure is left out
 * with the reason.
 */
function storedMembers(stored: NonNullable<ModelBody['combination']>, model: AssertedState): Member[] {
  let structures = memberStructures.get(stored);
  if (structures === undefined) {
    structures = stored.members.map((m) => structureFromSpec(m.structure));
    memberStructures.set(stored, structures);
  }
  return stored.members.map((m, i) => {
    const asserted = m.key === model.structure.key;
    const structure = asserted ? model.structure : structures[i];
    const theta = asserted ? model.learner.theta : Float64Array.from(m.theta);
    const estimate = { theta, se: new Float64Array(0), cov: new Float64Array(0), active: structure.terms.map(() => true), sigma2: 0, rank: theta.length, condition: 1, warnings: [] };
    const failure = theta.length !== structure.terms.length ? `member ${m.key}: ${theta.length} saved coefficients for ${structure.terms.length} terms` : undefined;
    return { key: m.key, structure, estimate, group: m.group, weight: m.weight, groupWeight: m.groupWeight ?? 1, ...(failure ? { failure } : {}) };
  });
}

/** The members a re-search hands to the model file: its combination members with their window estimates. */
function searchedCombination(ranking: SearchResult['ranking']): ModelBody['combination'] {
  return storedCombination(
    combinationMembers(ranking).map((m) => ({ key: m.key, spec: m.structure.spec, theta: m.estimate.theta, group: m.group, weight: m.weight, groupWeight: m.groupWeight ?? 1 })),
  );
}

/** One-step residuals z_t − ẑ_t of θ over the window (scoring scale), t ≥ history. */
export function windowResiduals(structure: Structure, theta: Float64Array, series: Series): Float64Array {
  const from = Math.max(structure.history, 1);
  const n = series.values.length;
  if (n <= from) return new Float64Array(0);
  const pred = structure.oneStep(theta, series, from, n);
  const z = forward(structure.transform, series.values);
  const out: number[] = [];
  for (let i = 0; i < pred.length; i++) {
    const e = z[from + i] - pred[i];
    if (Number.isFinite(e)) out.push(e);
  }
  return Float64Array.from(out);
}
