import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  BASELINES,
  BASELINE_NAMES,
  baselineByName,
  centredMovingAverage,
  classicalMultiplicativeIndices,
  averageChange,
  lastValue,
  naive2,
  naive2Details,
  seasonalityTest,
  lastSeason,
} from '../../src/evaluate/baselines.js';
import { sampleAutocorrelations } from '../../src/evaluate/autocorrelation.js';
import { ModelError, UsageError } from '../../src/data/errors.js';

const f64 = (xs: number[]): Float64Array => Float64Array.from(xs);
const list = (xs: Float64Array): number[] => Array.from(xs);

describe('lastValue', () => {
  it('naive(train, 3) repeats the last value', () => {
    expect(list(lastValue(f64([3, 5, 4]), 3, null))).toEqual([4, 4, 4]);
  });
  it('naive with h = 0 returns an empty forecast', () => {
    expect(lastValue(f64([1]), 0, null).length).toBe(0);
  });
  it('naive on an empty training series throws ModelError', () => {
    expect(() => lastValue(f64([]), 2, null)).toThrow(ModelError);
  });
  it('naive rejects a negative or fractional horizon', () => {
    expect(() => lastValue(f64([1]), -1, null)).toThrow(RangeError);
    expect(() => lastValue(f64([1]), 1.5, null)).toThrow(RangeError);
  });
});

describe('lastSeason', () => {
  it('repeats the last season (hand: [1..6], m = 4, h = 5 → 3, 4, 5, 6, 3)', () => {
    expect(list(lastSeason(f64([1, 2, 3, 4, 5, 6]), 5, 4))).toEqual([3, 4, 5, 6, 3]);
  });
  it('with h = 2m repeats the last season twice (hand: m = 3, last season 7, 8, 9)', () => {
    expect(list(lastSeason(f64([1, 7, 8, 9]), 6, 3))).toEqual([7, 8, 9, 7, 8, 9]);
  });
  it('with season null equals lastValue', () => {
    expect(list(lastSeason(f64([1, 2, 9]), 3, null))).toEqual([9, 9, 9]);
  });
  it('throws ModelError when the training series is shorter than a season', () => {
    expect(() => lastSeason(f64([1, 2, 3]), 2, 4)).toThrow(ModelError);
  });
});

describe('averageChange', () => {
  it('extends the line through first and last values (hand: [2, 4, 8], slope (8 − 2)/2 = 3 → 11, 14, 17)', () => {
    expect(list(averageChange(f64([2, 4, 8]), 3, null))).toEqual([11, 14, 17]);
  });
  it('uses only the end points (hand: [10, 0, 0, 16], slope 6/3 = 2 → 18, 20)', () => {
    expect(list(averageChange(f64([10, 0, 0, 16]), 2, 12))).toEqual([18, 20]);
  });
  it('with a single value has slope zero', () => {
    expect(list(averageChange(f64([5]), 2, null))).toEqual([5, 5]);
  });
});

describe('sampleAutocorrelations', () => {
  it('matches a hand computation (x = [1, 3, 1, 3]: mean 2, c0 = 4, c1 = −3, c2 = 2)', () => {
    expect(list(sampleAutocorrelations([1, 3, 1, 3], 2))).toEqual([-0.75, 0.5]);
  });
  it('skips missing values pairwise without shifting lags (hand: [1, NaN, 1, 3, 1, 3])', () => {
    // finite values 1, 1, 3, 1, 3: mean 9/5 = 1.8; deviations −0.8, ·, −0.8, 1.2, −0.8, 1.2
    // c0 = 3·0.64 + 2·1.44 = 4.8
    // lag 1 pairs (t−1, t) with both finite: (2,3) (3,4) (4,5): −0.96 − 0.96 − 0.96 = −2.88
    // lag 2 pairs: (0,2) (2,4) (3,5): 0.64 + 0.64 + 1.44 = 2.72
    const r = sampleAutocorrelations([1, Number.NaN, 1, 3, 1, 3], 2);
    expect(r[0]).toBeCloseTo(-2.88 / 4.8, 12);
    expect(r[1]).toBeCloseTo(2.72 / 4.8, 12);
  });
  it('is NaN for a constant series and for lags ≥ n', () => {
    expect(list(sampleAutocorrelations([2, 2, 2], 1))).toEqual([Number.NaN]);
    expect(sampleAutocorrelations([1, 2], 3)[2]).toBeNaN();
  });
  it('lies in [−1, 1] on random series (Cauchy–Schwarz)', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -100, max: 100, noNaN: true }), { minLength: 3, maxLength: 40 }), (xs) => {
        for (const r of sampleAutocorrelations(xs, 2)) if (!Number.isNaN(r)) expect(Math.abs(r)).toBeLessThanOrEqual(1 + 1e-12);
      }),
    );
  });
});

describe('centredMovingAverage', () => {
  it('odd order 3 is the plain centred mean (hand: [1, 2, 6, 4] → NaN, 3, 4, NaN)', () => {
    expect(list(centredMovingAverage([1, 2, 6, 4], 3))).toEqual([Number.NaN, 3, 4, Number.NaN]);
  });
  it('even order 4 is the 2×4 average with half weights at the ends', () => {
    // t = 2: (½·1 + 2 + 3 + 4 + ½·5)/4 = 12/4 = 3; t = 3: (½·2 + 3 + 4 + 5 + ½·10)/4 = 18/4 = 4.5
    expect(list(centredMovingAverage([1, 2, 3, 4, 5, 10], 4))).toEqual([Number.NaN, Number.NaN, 3, 4.5, Number.NaN, Number.NaN]);
  });
});

describe('classicalMultiplicativeIndices', () => {
  it('recovers known indices exactly from level × season (analytic: the 2×4 average of one full season is the level)', () => {
    const season = [0.8, 1.2, 0.9, 1.1]; // averages 1
    const y: number[] = [];
    for (let t = 0; t < 12; t++) y.push(100 * season[t % 4]);
    const idx = classicalMultiplicativeIndices(y, 4);
    for (let p = 0; p < 4; p++) expect(idx[p]).toBeCloseTo(season[p], 14);
  });
  it('normalises indices to average 1 (analytic: pattern 1, 2, 3 gives ratios 1/2, 1, 3/2)', () => {
    // y = 10·[1, 2, 3] repeated; 3-term centred mean = 20 everywhere it exists → ratios 0.5, 1, 1.5
    const y = [10, 20, 30, 10, 20, 30, 10, 20, 30];
    const idx = list(classicalMultiplicativeIndices(y, 3));
    expect(idx[0]).toBeCloseTo(0.5, 14);
    expect(idx[1]).toBeCloseTo(1, 14);
    expect(idx[2]).toBeCloseTo(1.5, 14);
    expect((idx[0] + idx[1] + idx[2]) / 3).toBeCloseTo(1, 14);
  });
  it('matches a hand computation with m = 2 on y = [2, 4, 3, 5, 4, 6]', () => {
    // 2×2 centred averages at t = 1..4: (1 + 4 + 1.5)/2 = 3.25, (2 + 3 + 2.5)/2 = 3.75,
    //   (1.5 + 5 + 2)/2 = 4.25, (2.5 + 4 + 3)/2 = 4.75
    // ratios: t=1 (pos 1) 4/3.25, t=2 (pos 0) 3/3.75, t=3 (pos 1) 5/4.25, t=4 (pos 0) 4/4.75
    const raw0 = (3 / 3.75 + 4 / 4.75) / 2;
    const raw1 = (4 / 3.25 + 5 / 4.25) / 2;
    const scale = 2 / (raw0 + raw1);
    const idx = classicalMultiplicativeIndices([2, 4, 3, 5, 4, 6], 2);
    expect(idx[0]).toBeCloseTo(raw0 * scale, 14);
    expect(idx[1]).toBeCloseTo(raw1 * scale, 14);
    expect(idx[0]).toBeCloseTo(0.811047, 5); // 78/95 · 2 / (78/95 + 266/221), on paper
  });
  it('rejects fewer than 2m values', () => {
    expect(() => classicalMultiplicativeIndices([1, 2, 3], 2)).toThrow(RangeError);
  });
});

describe('seasonalityTest', () => {
  // y = [80, 120, 90, 110] × 3 (n = 12, m = 4): mean 100, deviations ±20, ±10, c0 = 3000.
  // Worked by hand: lag-1 products sum −2500, lag 2 +2000, lag 3 −2000, lag 4 +2000, so
  // r = (−5/6, 2/3, −2/3, 2/3); threshold 1.645·sqrt((1 + 2(25/36 + 4/9 + 4/9))/12)
  //   = 1.645·sqrt((150/36)/12) = 1.645·sqrt(25/72).
  const three = [80, 120, 90, 110, 80, 120, 90, 110, 80, 120, 90, 110];
  it('on three seasons of a strong pattern: r_4 = 2/3 does not exceed 1.645·sqrt(25/72) ≈ 0.969', () => {
    const r = seasonalityTest(three, 4);
    expect(r.acfAtSeason).toBeCloseTo(2 / 3, 14);
    expect(r.threshold).toBeCloseTo(1.645 * Math.sqrt(25 / 72), 14);
    expect(r.seasonal).toBe(false);
  });
  it('on six seasons of the same pattern it does (analytic: r_4 = (n − 4)/n = 5/6)', () => {
    const six = [...three, ...three];
    const r = seasonalityTest(six, 4);
    expect(r.acfAtSeason).toBeCloseTo(5 / 6, 14);
    expect(r.seasonal).toBe(true);
  });
  it('a constant series is not seasonal', () => {
    expect(seasonalityTest(new Array(20).fill(5), 4).seasonal).toBe(false);
  });
});

describe('naive2', () => {
  const pattern = [80, 120, 90, 110];
  const six: number[] = [];
  for (let t = 0; t < 24; t++) six.push(pattern[t % 4]);

  it('on a seasonal level × season series reproduces the pattern (analytic: adjusted series is the level 100)', () => {
    const d = naive2Details(f64(six), 6, 4);
    expect(d.adjustment).toBe('adjusted');
    const got = list(d.forecast);
    const want = [80, 120, 90, 110, 80, 120];
    got.forEach((v, i) => expect(v).toBeCloseTo(want[i], 10));
  });

  it('adjusts by the last index and reseasonalises by the target index (hand: phase shifted by one)', () => {
    // train ends at position (n − 1) mod 4 = 0 when n = 21: last value 80, index 0.8 → level 100,
    // next targets are positions 1, 2, 3 → 120, 90, 110
    const shifted = six.slice(0, 21);
    const got = list(naive2(f64(shifted), 3, 4));
    [120, 90, 110].forEach((v, i) => expect(got[i]).toBeCloseTo(v, 10));
  });

  it('is the last-value forecast when the test says not seasonal', () => {
    const d = naive2Details(f64(six.slice(0, 12)), 2, 4);
    expect(d.adjustment).toBe('not-seasonal');
    expect(list(d.forecast)).toEqual([110, 110]);
  });

  it('is the last value without a season, with fewer than 2m values, or with non-positive values', () => {
    expect(naive2Details(f64(six), 2, null).adjustment).toBe('no-season');
    expect(naive2Details(f64(six.slice(0, 7)), 2, 4).adjustment).toBe('too-short');
    const withZero = six.slice();
    withZero[3] = 0;
    const d = naive2Details(f64(withZero), 2, 4);
    expect(d.adjustment).toBe('non-positive');
    expect(list(d.forecast)).toEqual([110, 110]);
  });
});

describe('registry', () => {
  it('BASELINES lists every baseline under BASELINE_NAMES, all with the shared signature', () => {
    expect(Object.keys(BASELINES).sort()).toEqual([...BASELINE_NAMES].sort());
    const train = f64([5, 6, 7, 8, 9, 10, 11, 12]);
    for (const name of BASELINE_NAMES) expect(BASELINES[name](train, 3, 4).length).toBe(3);
  });
  it('baselineByName finds a member and throws UsageError for an unknown name', () => {
    expect(baselineByName('average-change')).toBe(averageChange);
    expect(() => baselineByName('toString')).toThrow(UsageError);
    expect(() => baselineByName('mean')).toThrow(UsageError);
  });
});
