/**
 * Future values of a series' inputs over a forecast horizon.
 *
 * A forecast of a series with inputs is conditional on what the inputs will do. certa takes them
 * either from a file of future rows (the user's scenario) or from a stated policy, and every
 * output names which one was used, so nobody mistakes a scenario for a prediction of the input:
 *  - `hold`:  each input stays at its last observed value;
 *  - `trend`: each input continues the straight line fitted by least squares to its last
 *             `window` observations (default: two seasons, or 8 points, at least 3);
 *  - `seasonal`: each input repeats its last observed season (value s periods earlier), the
 *             default for a seasonal series (a weather index keeps its yearly cycle; a switch
 *             that stayed on all last season stays on). Falls back to `hold` without a season
 *             or with less than one season of data.
 */
import type { Series } from '../data/series.js';
import { UsageError } from '../data/errors.js';

export type InputPolicy = 'hold' | 'trend' | 'seasonal';

export const INPUT_POLICIES: readonly InputPolicy[] = ['hold', 'trend', 'seasonal'];

/** The default policy: `seasonal` for a series with a season, `hold` otherwise. */
export function defaultInputPolicy(series: Series): InputPolicy {
  return series.season && series.values.length >= series.season ? 'seasonal' : 'hold';
}

export interface FutureInputs {
  /** One array of length h per input, in series order. */
  values: Float64Array[];
  /** How they were obtained, in words, for reports. */
  source: string;
}

/** Future inputs by a policy (see module comment). */
export function futureByPolicy(series: Series, h: number, requested: InputPolicy, window?: number): FutureInputs {
  const n = series.values.length;
  const s = series.season;
  const policy: InputPolicy = requested === 'seasonal' && !(s && n >= s) ? 'hold' : requested;
  const w = Math.max(3, Math.min(n, window ?? (series.season ? 2 * series.season : 8)));
  const values = series.inputs.map((input) => {
    const out = new Float64Array(h);
    const u = input.values;
    if (policy === 'hold') {
      out.fill(u[n - 1]);
      return out;
    }
    if (policy === 'seasonal') {
      for (let j = 0; j < h; j++) out[j] = u[n - s! + (j % s!)];
      return out;
    }
    // Least-squares line through the last w points, indexed 0..w-1, extended past the end.
    const x0 = n - w;
    let sx = 0;
    let sy = 0;
    let sxx = 0;
    let sxy = 0;
    for (let i = 0; i < w; i++) {
      const v = u[x0 + i];
      sx += i;
      sy += v;
      sxx += i * i;
      sxy += i * v;
    }
    const denom = w * sxx - sx * sx;
    const slope = denom === 0 ? 0 : (w * sxy - sx * sy) / denom;
    const intercept = (sy - slope * sx) / w;
    for (let j = 0; j < h; j++) out[j] = intercept + slope * (w + j);
    return out;
  });
  const source =
    series.inputs.length === 0
      ? 'no inputs'
      : policy === 'hold'
        ? `inputs held at their last observed values (${series.inputs.map((i) => `${i.name} = ${fmt(i.values[n - 1])}`).join(', ')})`
        : policy === 'seasonal'
          ? `inputs repeat their last observed season (${s} periods)`
          : `inputs continue the straight line through their last ${w} observations`;
  return { values, source };
}

/**
 * Future inputs from a series of future rows (loaded by the data layer): the rows must start one
 * period after the history ends, be consecutive, cover the horizon, and carry every input.
 */
export function futureFromSeries(history: Series, future: Series, h: number, file: string, expectedTimes: number[]): FutureInputs {
  const byName = new Map(future.inputs.map((i) => [i.name, i.values]));
  const missing = history.inputs.filter((i) => !byName.has(i.name)).map((i) => i.name);
  if (missing.length > 0) {
    throw new UsageError('future-inputs-missing-column', 'the future-inputs file lacks input columns', {
      file,
      found: future.inputs.map((i) => i.name).join(', ') || '(no input columns)',
      expected: `columns ${history.inputs.map((i) => i.name).join(', ')}`,
    });
  }
  const index = new Map<number, number>();
  future.time.forEach((t, i) => index.set(t, i));
  const values = history.inputs.map((input) => {
    const src = byName.get(input.name)!;
    const out = new Float64Array(h);
    for (let j = 0; j < h; j++) {
      const i = index.get(expectedTimes[j]);
      if (i === undefined) {
        throw new UsageError('future-inputs-missing-date', 'the future-inputs file does not cover the forecast horizon', {
          file,
          found: `no row for period ${j + 1} of ${h}`,
          expected: `one row per future period, starting right after the last observation`,
          hint: 'add the missing rows, shorten --horizon, or use --input-policy hold|trend',
        });
      }
      out[j] = src[i];
    }
    return out;
  });
  return { values, source: `inputs from ${file}` };
}

function fmt(v: number): string {
  return Number.isInteger(v) ? String(v) : v.toPrecision(4);
}
