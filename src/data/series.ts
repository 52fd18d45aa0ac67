import { stepTime, type Frequency } from './calendar.js';

/**
 * A regular series: what every stage after loading works on.
 *
 * `time[i]` is the time stamp of observation i (see calendar.ts for units), strictly increasing
 * by exactly `step` periods of `frequency` (one period unless the data come every few periods:
 * a decennial census is yearly with step 10). `values` has no NaN once regularised (gaps are either
 * filled, and listed in the report, or refused). Inputs are aligned one-to-one with `values`.
 */
export interface Series {
  /** Series name (column name in wide layout, id in long layout). */
  name: string;
  frequency: Frequency;
  /** Periods of `frequency` between consecutive observations; absent means 1. */
  step?: number;
  /** Season length in observations, or null (from the frequency unless the user set one). */
  season: number | null;
  time: Float64Array;
  values: Float64Array;
  /** Exogenous inputs, same length as `values`, in the order the user listed them. */
  inputs: SeriesInput[];
  /** Where the series came from, for messages. */
  source?: string;
  /**
   * What precedes observation 0 when the series is a later part of a longer one (a model's
   * stored window, a slice): how many observations came before and their sum. Time-indexed
   * terms count t from the very first observation and cumulative states start from the sum,
   * so a structure continues exactly where it was. Absent means nothing came before.
   */
  before?: { count: number; sum: number };
}

export interface SeriesInput {
  name: string;
  values: Float64Array;
}

/** Observations [from, to) of a series as a new Series sharing the same buffers (no copy). */
export function sliceSeries(series: Series, from: number, to: number): Series {
  let sum = series.before?.sum ?? 0;
  for (let i = 0; i < from; i++) sum += series.values[i];
  return {
    ...series,
    before: from === 0 ? series.before : { count: (series.before?.count ?? 0) + from, sum },
    time: series.time.subarray(from, to),
    values: series.values.subarray(from, to),
    inputs: series.inputs.map((i) => ({ name: i.name, values: i.values.subarray(from, to) })),
  };
}

/** Periods of the series' frequency between consecutive observations (1 unless set). */
export function seriesStep(series: Pick<Series, 'step'>): number {
  return series.step ?? 1;
}

/** The time stamps of the `horizon` observations after the last one, one step apart. */
export function timesAfter(series: Pick<Series, 'frequency' | 'step' | 'time'>, horizon: number): Float64Array {
  const times = new Float64Array(horizon);
  const last = series.time[series.time.length - 1];
  const step = seriesStep(series);
  for (let j = 0; j < horizon; j++) times[j] = stepTime(last, series.frequency, (j + 1) * step);
  return times;
}
