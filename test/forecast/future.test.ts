import { describe, expect, it } from 'vitest';
import { defaultInputPolicy, futureByPolicy, futureFromSeries } from '../../src/forecast/future.js';
import type { Series } from '../../src/data/series.js';
import { UsageError } from '../../src/data/errors.js';

const monthly = (n: number): Float64Array => Float64Array.from({ length: n }, (_, i) => Date.UTC(2020, i, 1));

function series(season: number | null, u: number[]): Series {
  return { name: 'y', frequency: 'monthly', season, time: monthly(u.length), values: Float64Array.from(u, (_, i) => i), inputs: [{ name: 'u', values: Float64Array.from(u) }] };
}

describe('futureByPolicy', () => {
  const u = [1, 2, 3, 4, 5, 6, 7, 8];
  it('hold repeats the last value', () => {
    expect(Array.from(futureByPolicy(series(null, u), 3, 'hold').values[0])).toEqual([8, 8, 8]);
  });
  it('trend continues the least-squares line (exact for a straight line)', () => {
    // Analytic identity: the line through u_i = i + 1 continues as 9, 10, 11.
    const f = futureByPolicy(series(null, u), 3, 'trend', 8).values[0];
    [9, 10, 11].forEach((v, j) => expect(f[j]).toBeCloseTo(v, 12));
  });
  it('seasonal repeats the last season, and falls back to hold without one', () => {
    const s = series(4, u);
    expect(Array.from(futureByPolicy(s, 6, 'seasonal').values[0])).toEqual([5, 6, 7, 8, 5, 6]);
    expect(futureByPolicy(s, 6, 'seasonal').source).toMatch(/last observed season/);
    expect(Array.from(futureByPolicy(series(null, u), 2, 'seasonal').values[0])).toEqual([8, 8]);
    expect(defaultInputPolicy(s)).toBe('seasonal');
    expect(defaultInputPolicy(series(null, u))).toBe('hold');
  });
});

describe('futureFromSeries', () => {
  it('takes the rows at the expected times and refuses a horizon the file does not cover', () => {
    const hist = series(null, [1, 2, 3]);
    const fut: Series = { ...series(null, [10, 11]), time: Float64Array.of(Date.UTC(2020, 3, 1), Date.UTC(2020, 4, 1)) };
    const times = [Date.UTC(2020, 3, 1), Date.UTC(2020, 4, 1), Date.UTC(2020, 5, 1)];
    expect(Array.from(futureFromSeries(hist, fut, 2, 'f.csv', times).values[0])).toEqual([10, 11]);
    expect(() => futureFromSeries(hist, fut, 3, 'f.csv', times)).toThrow(UsageError);
  });
});
