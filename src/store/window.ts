/**
 * The bounded history window a model file keeps: the last `capacity` raw observations with their
 * time stamps and inputs, enough to rebuild lags, restart a simulation or refit after drift
 * without the original data file. Oldest first; appending drops the oldest rows beyond capacity.
 */
import { DataError, UsageError } from '../data/errors.js';
import type { Series } from '../data/series.js';
import type { DataRow } from './fingerprint.js';

export interface HistoryWindow {
  /** Most rows kept. */
  capacity: number;
  time: number[];
  values: number[];
  /** Input name → raw values aligned with `values`. */
  inputs: Record<string, number[]>;
}

export const DEFAULT_WINDOW_CAPACITY = 240;

/** An empty window for a series with the given inputs. */
export function createWindow(inputNames: readonly string[], capacity = DEFAULT_WINDOW_CAPACITY): HistoryWindow {
  checkCapacity(capacity);
  return { capacity, time: [], values: [], inputs: Object.fromEntries(inputNames.map((name) => [name, []])) };
}

/** The last `capacity` rows of a series. */
export function windowFromSeries(series: Series, capacity = DEFAULT_WINDOW_CAPACITY): HistoryWindow {
  checkCapacity(capacity);
  const from = Math.max(0, series.values.length - capacity);
  return {
    capacity,
    time: Array.from(series.time.subarray(from)),
    values: Array.from(series.values.subarray(from)),
    inputs: Object.fromEntries(series.inputs.map((input) => [input.name, Array.from(input.values.subarray(from))])),
  };
}

/**
 * A new window with `rows` appended (inputs in `inputNames` order) and the oldest rows beyond
 * capacity dropped. Refuses a row that is not later than the window's last time stamp.
 */
export function extendWindow(window: HistoryWindow, rows: Iterable<DataRow>, inputNames: readonly string[]): HistoryWindow {
  const added = Array.isArray(rows) ? (rows as readonly DataRow[]) : Array.from(rows);
  let last = window.time.length > 0 ? window.time[window.time.length - 1] : -Infinity;
  for (const row of added) {
    if (!(row.time > last)) {
      throw new DataError('row-not-newer', 'a new row is not later than the last row the model has seen', {
        found: String(row.time),
        expected: `a time stamp after ${last}`,
        hint: 'pass only rows after the model’s last time stamp',
      });
    }
    if (row.inputs.length !== inputNames.length) {
      throw new DataError('input-count', 'a new row has a different number of inputs than the model', {
        found: String(row.inputs.length),
        expected: `${inputNames.length} (${inputNames.join(', ')})`,
      });
    }
    last = row.time;
  }
  // Each column: its old entries then the new ones, less the `drop` oldest (as many as appending
  // would push the time column beyond capacity).
  const drop = Math.max(0, window.time.length + added.length - window.capacity);
  const time = appended(window.time, added, drop, (row) => row.time);
  const values = appended(window.values, added, drop, (row) => row.value);
  const inputs: Record<string, number[]> = {};
  inputNames.forEach((name, j) => (inputs[name] = appended(window.inputs[name] ?? [], added, drop, (row) => row.inputs[j])));
  return { capacity: window.capacity, time, values, inputs };
}

/** `old` then `fresh` of each row, less the `drop` oldest entries. */
function appended(old: readonly number[], rows: readonly DataRow[], drop: number, fresh: (row: DataRow) => number): number[] {
  const fromOld = Math.min(drop, old.length);
  const out = old.slice(fromOld);
  for (let k = drop - fromOld; k < rows.length; k++) out.push(fresh(rows[k]));
  return out;
}

function checkCapacity(capacity: number): void {
  if (!(Number.isInteger(capacity) && capacity >= 1 && capacity <= 1_000_000)) {
    throw new UsageError('bad-option', 'the history window size is out of range', {
      found: String(capacity),
      expected: 'a whole number of rows from 1 to 1000000',
    });
  }
}
