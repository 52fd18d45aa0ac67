import { describe, expect, it } from 'vitest';
import { DataError, UsageError } from '../../src/data/errors.js';
import type { Series } from '../../src/data/series.js';
import { createWindow, extendWindow, windowFromSeries } from '../../src/store/window.js';

const row = (time: number, value: number, x: number) => ({ time, value, inputs: [x] });

describe('extendWindow', () => {
  it('appends rows and keeps only the last `capacity`, oldest first, inputs aligned', () => {
    const w0 = createWindow(['x'], 3);
    const w1 = extendWindow(w0, [row(1, 10, 0.1), row(2, 20, 0.2)], ['x']);
    const w2 = extendWindow(w1, [row(3, 30, 0.3), row(4, 40, 0.4), row(5, 50, 0.5)], ['x']);
    expect(w2).toEqual({ capacity: 3, time: [3, 4, 5], values: [30, 40, 50], inputs: { x: [0.3, 0.4, 0.5] } });
    // inputs are not changed
    expect(w1.values).toEqual([10, 20]);
    expect(w0.values).toEqual([]);
  });

  it('refuses a row that is not later than the last, and a wrong number of inputs, with DataError', () => {
    const w = extendWindow(createWindow(['x'], 5), [row(2, 1, 1)], ['x']);
    expect(() => extendWindow(w, [row(2, 1, 1)], ['x'])).toThrow(DataError);
    expect(() => extendWindow(w, [{ time: 3, value: 1, inputs: [] }], ['x'])).toThrow(DataError);
  });

  it('refuses a capacity out of range with UsageError', () => {
    expect(() => createWindow([], 0)).toThrow(UsageError);
  });
});

describe('windowFromSeries', () => {
  it('takes the last capacity rows of each array', () => {
    const series: Series = {
      name: 's',
      frequency: 'index',
      season: null,
      time: Float64Array.from([1, 2, 3, 4]),
      values: Float64Array.from([5, 6, 7, 8]),
      inputs: [{ name: 'x', values: Float64Array.from([9, 10, 11, 12]) }],
    };
    expect(windowFromSeries(series, 2)).toEqual({ capacity: 2, time: [3, 4], values: [7, 8], inputs: { x: [11, 12] } });
    expect(windowFromSeries(series).values).toEqual([5, 6, 7, 8]);
  });
});
