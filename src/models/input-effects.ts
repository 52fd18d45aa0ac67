/**
 * Input effects: what a fitted structure says about each input of its series, in one shape for
 * every family — how the input enters, its delay and number of lags, and its gain (the
 * steady-state change of y per unit of the input) or, for an input that scales a law's rate,
 * its rate effect.
 *
 * Read off the structure's derived quantities (Structure.derived), which name per-input
 * quantities `gain <input>`, `delay <input>` and `rate effect <input>`, and off its spec for the
 * lag counts of the ARX family (`inputs: [{name, lags, delay}]`). An input of the series the
 * structure does not use is listed with role 'unused'.
 */
import type { Series } from '../data/series.js';
import type { Derived, Structure } from './structure.js';

export interface InputEffect {
  input: string;
  /** 'lags': lagged regressors of a difference equation; 'level': added to the level; 'rate': scales the law's rate; 'forcing': drives the rate of change; 'unused'. */
  role: 'lags' | 'level' | 'rate' | 'forcing' | 'unused';
  /** Periods before the input first acts (null when unused). */
  delay: number | null;
  /** Number of lags (null when the structure has no lag count for it). */
  lags: number | null;
  /** Steady-state change of y per unit of the input (null when undefined, e.g. unstable, or not given). */
  gain: number | null;
  /** Relative change of the law's rate per unit of the input (role 'rate' only). */
  rateEffect: number | null;
  unit: string | null;
}

function numberOf(d: Derived | undefined): number | null {
  return d !== undefined && typeof d.value === 'number' && Number.isFinite(d.value) ? d.value : null;
}

/** The effects of every input of `series` under `structure` with coefficients θ (module comment). */
export function inputEffects(structure: Structure, theta: Float64Array, series: Series, derived: Derived[] = structure.derived(theta, series)): InputEffect[] {
  const spec = structure.spec as { inputs?: unknown; rateInputs?: unknown };
  const listed = Array.isArray(spec.inputs) ? spec.inputs : [];
  const rates = Array.isArray(spec.rateInputs) ? (spec.rateInputs as string[]) : [];
  return series.inputs.map(({ name }) => {
    const byName = (what: string) => derived.find((d) => d.name === `${what} ${name}`);
    const lagged = listed.find((i): i is { name: string; lags: number; delay: number } => typeof i === 'object' && i !== null && (i as { name?: unknown }).name === name);
    const plain = listed.includes(name);
    const rate = rates.includes(name);
    const role: InputEffect['role'] = lagged ? 'lags' : rate ? 'rate' : plain ? (structure.family === 'path' ? 'level' : 'forcing') : 'unused';
    if (role === 'unused') return { input: name, role, delay: null, lags: null, gain: null, rateEffect: null, unit: null };
    const gain = byName('gain');
    const effect = byName('rate effect');
    return {
      input: name,
      role,
      delay: lagged ? lagged.delay : (numberOf(byName('delay')) ?? 0),
      lags: lagged ? lagged.lags : null,
      gain: numberOf(gain),
      rateEffect: numberOf(effect),
      unit: (gain ?? effect)?.unit ?? null,
    };
  });
}
