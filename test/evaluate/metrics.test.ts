import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { abs, mean, sqrt, subtract, dotMultiply } from 'mathjs';
import {
  intervalCoverage,
  intervalScore,
  mae,
  mape,
  mase,
  maseScale,
  meanError,
  metricTable,
  rmse,
  smape,
} from '../../src/evaluate/metrics.js';

// Small example used throughout, worked by hand:
//   actual   X = [10, 12, 8, 15]
//   forecast F = [11, 10, 8, 18]
//   error    e = X − F = [−1, 2, 0, −3]
const X = [10, 12, 8, 15];
const F = [11, 10, 8, 18];

describe('mae', () => {
  it('mae(X, F) is the mean absolute error (hand: (1 + 2 + 0 + 3) / 4 = 1.5)', () => {
    expect(mae(X, F)).toBe(1.5);
  });
  it('mae of empty arrays is NaN', () => {
    expect(mae([], [])).toBeNaN();
  });
  it('mae throws RangeError on arrays of different lengths', () => {
    expect(() => mae([1, 2], [1])).toThrow(RangeError);
  });
  it('mae propagates NaN instead of skipping the point', () => {
    expect(mae([1, Number.NaN], [1, 2])).toBeNaN();
  });
});

describe('rmse', () => {
  it('rmse(X, F) (hand: sqrt((1 + 4 + 0 + 9) / 4) = sqrt(3.5))', () => {
    expect(rmse(X, F)).toBe(Math.sqrt(3.5));
  });
  it('rmse accepts Float64Array', () => {
    expect(rmse(Float64Array.from(X), Float64Array.from(F))).toBe(Math.sqrt(3.5));
  });
});

describe('meanError', () => {
  it('meanError(X, F) is actual − forecast averaged (hand: (−1 + 2 + 0 − 3) / 4 = −0.5)', () => {
    expect(meanError(X, F)).toBe(-0.5);
  });
  it('meanError is positive when the forecasts are too low', () => {
    expect(meanError([5, 5], [4, 3])).toBe(1.5); // (1 + 2) / 2
  });
});

describe('mape', () => {
  it('mape(X, F) in percent (hand: 100·(1/10 + 2/12 + 0/8 + 3/15)/4 = 100·0.4666…/4 = 11.666…)', () => {
    const r = mape(X, F);
    // 1/10 + 2/12 + 0 + 3/15 = 0.1 + 0.1666… + 0.2 = 0.4666…; ×100/4 = 11.6666…
    expect(r.value).toBeCloseTo(35 / 3, 12);
    expect(r.excluded).toBe(0);
  });
  it('mape excludes zero actuals and counts them (hand: [100, 0, 50] vs [110, 3, 40] → (10 + 20)/2 = 15, 1 excluded)', () => {
    const r = mape([100, 0, 50], [110, 3, 40]);
    expect(r.value).toBeCloseTo(15, 12);
    expect(r.excluded).toBe(1);
  });
  it('mape of all-zero actuals is NaN with every point excluded', () => {
    const r = mape([0, 0], [1, 2]);
    expect(r.value).toBeNaN();
    expect(r.excluded).toBe(2);
  });
});

describe('smape (M3 form, denominator X + F)', () => {
  it('smape(X, F) (hand: 200·(1/21 + 2/22 + 0/16 + 3/33)/4)', () => {
    // terms: 200·1/21 = 9.5238…, 200·2/22 = 18.1818…, 0, 200·3/33 = 18.1818…
    const expected = (200 / 21 + 400 / 22 + 0 + 600 / 33) / 4;
    const r = smape(X, F);
    expect(r.value).toBeCloseTo(expected, 12);
    expect(r.value).toBeCloseTo(11.4718614718, 9); // 45.887445…/4, same sum worked on paper
    expect(r.excluded).toBe(0);
  });
  it('smape uses the signed sum X + F, not |X| + |F| (hand: X = 4, F = −2 → 200·6/2 = 600)', () => {
    expect(smape([4], [-2]).value).toBe(600);
  });
  it('smape excludes points with X + F = 0, including X = F = 0, and counts them', () => {
    // kept: 200·|10 − 30|/40 = 100; excluded: (0, 0) and (1, −1)
    expect(smape([10, 0, 1], [30, 0, -1])).toEqual({ value: 100, excluded: 2 });
  });
  it('smape is 200 for a zero forecast of a positive actual (analytic: 200·X/X)', () => {
    expect(smape([7, 3], [0, 0]).value).toBe(200);
  });
});

describe('maseScale and mase', () => {
  it('maseScale with m = 1 is the mean absolute first difference (hand: [1, 3, 2, 5] → (2 + 1 + 3)/3 = 2)', () => {
    expect(maseScale([1, 3, 2, 5], 1)).toBe(2);
  });
  it('maseScale with m = 4 uses lag-4 differences (hand: y = [1,2,3,4, 2,4,3,8] → (1 + 2 + 0 + 4)/4 = 1.75)', () => {
    expect(maseScale([1, 2, 3, 4, 2, 4, 3, 8], 4)).toBe(1.75);
  });
  it('maseScale is NaN when the training series has n ≤ m points', () => {
    expect(maseScale([1, 2, 3, 4], 4)).toBeNaN();
  });
  it('maseScale rejects m < 1 or non-integer m', () => {
    expect(() => maseScale([1, 2, 3], 0)).toThrow(RangeError);
    expect(() => maseScale([1, 2, 3], 1.5)).toThrow(RangeError);
  });
  it('mase = MAE / scale (hand: MAE([6, 4], [5, 5]) = 1, scale 2 → 0.5)', () => {
    expect(mase([6, 4], [5, 5], [1, 3, 2, 5], 1)).toBe(0.5);
  });
  it('mase with a seasonal scale (hand: MAE(X, F) = 1.5, scale 1.75 → 6/7)', () => {
    expect(mase(X, F, [1, 2, 3, 4, 2, 4, 3, 8], 4)).toBeCloseTo(6 / 7, 14);
  });
  it('mase of the in-sample naive forecast on its own training data is exactly 1 (analytic identity)', () => {
    const train = [5, 7, 6, 9, 12, 10];
    const actual = train.slice(1);
    const naive = train.slice(0, -1);
    expect(mase(actual, naive, train, 1)).toBe(1);
  });
  it('mase is Infinity when the training series is constant and the errors are not zero', () => {
    expect(mase([3], [2], [4, 4, 4], 1)).toBe(Number.POSITIVE_INFINITY);
  });
});

describe('intervalCoverage', () => {
  it('counts actuals inside inclusive bounds (hand: 1 ∈ [0,4], 5 ∉ [0,4], 4 ∈ [0,4] boundary → 2/3)', () => {
    expect(intervalCoverage([1, 5, 4], [0, 0, 0], [4, 4, 4])).toBe(2 / 3);
  });
  it('is NaN when a bound is NaN', () => {
    expect(intervalCoverage([1], [Number.NaN], [2])).toBeNaN();
  });
});

describe('intervalScore (Gneiting & Raftery 2007, eq. 43, as a loss)', () => {
  it('a point inside scores the width only (hand: [2, 6], x = 3 → 4)', () => {
    expect(intervalScore([3], [2], [6], 0.05)).toBe(4);
  });
  it('a point below adds (2/α)(l − x) (hand: α = 0.2, [2, 6], x = 1 → 4 + 10·1 = 14)', () => {
    expect(intervalScore([1], [2], [6], 0.2)).toBe(14);
  });
  it('a point above adds (2/α)(x − u) (hand: α = 0.05, [2, 6], x = 7 → 4 + 40·1 = 44)', () => {
    expect(intervalScore([7], [2], [6], 0.05)).toBe(44);
  });
  it('averages over points (hand: (4 + 14 + 4)/3 with α = 0.2)', () => {
    expect(intervalScore([3, 1, 6], [2, 2, 2], [6, 6, 6], 0.2)).toBeCloseTo(22 / 3, 14);
  });
  it('rejects α outside (0, 1)', () => {
    expect(() => intervalScore([1], [0], [2], 0)).toThrow(RangeError);
    expect(() => intervalScore([1], [0], [2], 1)).toThrow(RangeError);
  });
  it('a NaN actual makes the score NaN', () => {
    expect(intervalScore([Number.NaN], [0], [2], 0.1)).toBeNaN();
  });
});

describe('metricTable', () => {
  it('collects every metric with the same values as the single functions', () => {
    const train = [1, 2, 3, 4, 2, 4, 3, 8];
    const lower = [9, 9, 9, 9];
    const upper = [12, 12, 12, 12];
    const t = metricTable(X, F, { train, season: 4, intervals: { lower, upper, alpha: 0.2 } });
    expect(t).toEqual({
      n: 4,
      mae: 1.5,
      rmse: Math.sqrt(3.5),
      mape: mape(X, F).value,
      mapeExcluded: 0,
      smape: smape(X, F).value,
      smapeExcluded: 0,
      mase: mase(X, F, train, 4),
      meanError: -0.5,
      // inside: 10, 12 (boundary); outside: 8, 15 → 2/4
      coverage: 0.5,
      // widths 3 each; 8 is 1 below → +10; 15 is 3 above → +30; (3 + 3 + 13 + 33)/4 = 13
      intervalScore: 13,
      nominalCoverage: 0.8,
    });
  });
  it('without training data or intervals, mase is NaN and interval fields are null', () => {
    const t = metricTable(X, F);
    expect(t.mase).toBeNaN();
    expect(t.coverage).toBeNull();
    expect(t.intervalScore).toBeNull();
    expect(t.nominalCoverage).toBeNull();
  });
});

describe('invariants on random data', () => {
  const pair = fc
    .integer({ min: 1, max: 30 })
    .chain((n) =>
      fc.tuple(
        fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: n, maxLength: n }),
        fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: n, maxLength: n }),
      ),
    );

  it('mae and rmse agree with an independent computation by mathjs', () => {
    fc.assert(
      fc.property(pair, ([a, f]) => {
        const e = subtract(a, f) as number[];
        const refMae = mean(abs(e) as number[]) as number;
        const refRmse = sqrt(mean(dotMultiply(e, e) as number[]) as number) as number;
        expect(mae(a, f)).toBeCloseTo(refMae, 8);
        expect(rmse(a, f)).toBeCloseTo(refRmse, 8);
      }),
    );
  });

  it('|mean error| ≤ MAE ≤ RMSE (triangle and power-mean inequalities)', () => {
    fc.assert(
      fc.property(pair, ([a, f]) => {
        const slack = 1e-9 * (1 + mae(a, f));
        expect(Math.abs(meanError(a, f))).toBeLessThanOrEqual(mae(a, f) + slack);
        expect(mae(a, f)).toBeLessThanOrEqual(rmse(a, f) + slack);
      }),
    );
  });

  it('intervalScore ≥ mean width, with equality when coverage is 1', () => {
    fc.assert(
      fc.property(pair, fc.double({ min: 0.01, max: 0.99, noNaN: true }), ([a, f], alpha) => {
        const lower = f.map((v) => v - 1);
        const upper = f.map((v) => v + 1);
        const s = intervalScore(a, lower, upper, alpha);
        expect(s).toBeGreaterThanOrEqual(2 - 1e-9);
        if (intervalCoverage(a, lower, upper) === 1) expect(s).toBeCloseTo(2, 9);
      }),
    );
  });
});
