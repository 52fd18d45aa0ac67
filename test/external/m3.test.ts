import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { formatTime } from '../../src/data/calendar.js';
import { DataError } from '../../src/data/errors.js';
import { naive2 } from '../../src/evaluate/baselines.js';
import { parseM3, scoreM3, scoreM3Item, seasonalNaiveGaussian, summariseM3ByFrequency, type PointForecaster } from '../../src/evaluate/m3.js';
import { maseScale } from '../../src/evaluate/metrics.js';

const read = (file: string) => readFileSync(new URL(`../../datasets/m3/${file}`, import.meta.url), 'utf8');
const yearly = parseM3(read('M3Year.csv'), 'yearly', 'M3Year.csv');
const quarterly = parseM3(read('M3Quart.csv'), 'quarterly', 'M3Quart.csv');

describe('parseM3 on the competition files (datasets/m3/README.md)', () => {
  it('reads 645 yearly series with horizon 6 and 756 quarterly with horizon 8', () => {
    expect(yearly.length).toBe(645);
    expect(quarterly.length).toBe(756);
    expect(yearly.every((i) => i.horizon === 6 && i.series.season === null && i.series.frequency === 'yearly')).toBe(true);
    expect(quarterly.every((i) => i.horizon === 8 && i.series.season === 4 && i.series.frequency === 'quarterly')).toBe(true);
  });

  it('keeps the first yearly series as the file gives it: N 1, 20 values from 1975, 940.66 first', () => {
    const s = yearly[0].series;
    expect(yearly[0].id).toBe('N 1');
    expect(yearly[0].domain).toBe('MICRO');
    expect(s.values.length).toBe(20);
    expect(s.values[0]).toBe(940.66);
    expect(s.values[19]).toBe(9156.01);
    expect(formatTime(s.time[0], 'yearly')).toBe('1975');
    expect(formatTime(s.time[19], 'yearly')).toBe('1994');
  });

  it('steps quarterly stamps by one quarter from start_year / start_period', () => {
    const s = quarterly[0].series;
    expect(formatTime(s.time[0], 'quarterly')).toBe('1984-Q1');
    expect(formatTime(s.time[5], 'quarterly')).toBe('1985-Q2');
    const odd = quarterly.find((i) => i.id === 'N1071');
    expect(odd && formatTime(odd.series.time[0], 'quarterly')).toBe('1984-Q3');
  });

  it('reads the monthly (714, horizon 18, season 12) and other (87, horizon 8, step counter) development halves', () => {
    const monthly = parseM3(read('M3Month-dev.csv'), 'monthly', 'M3Month-dev.csv');
    const other = parseM3(read('M3Other-dev.csv'), 'other', 'M3Other-dev.csv');
    expect(monthly.length).toBe(714);
    expect(other.length).toBe(87);
    expect(monthly.every((i) => i.horizon === 18 && i.series.season === 12 && i.series.frequency === 'monthly')).toBe(true);
    expect(other.every((i) => i.horizon === 8 && i.series.season === null && i.series.frequency === 'index')).toBe(true);
    expect(formatTime(monthly[0].series.time[1], 'monthly')).toBe('1990-02');
    expect(Array.from(other[0].series.time.subarray(0, 3))).toEqual([1, 2, 3]);
  });

  it('refuses a row whose n disagrees with its values with a DataError naming the row', () => {
    const text = 'series,n,nf,category,start_year,start_period,values\nX,5,2,MICRO,1990,1,1 2 3 4\n';
    expect(() => parseM3(text, 'yearly', 'bad.csv')).toThrow(DataError);
    expect(() => parseM3(text, 'yearly', 'bad.csv')).toThrow(/row 2/);
  });
});

describe('scoreM3Item', () => {
  const item = yearly[0];
  const n = item.series.values.length - item.horizon;

  it('scores a forecaster that throws with the Naive2 forecast and records the failure', () => {
    const broken: PointForecaster = () => {
      throw new Error('no model');
    };
    const r = scoreM3Item(item, broken);
    expect(r.failure).toBe('no model');
    expect(r.model).toBe('naive2');
    expect(r.smape).toBe(r.naive2Smape);
    expect(r.mase).toBe(r.naive2Mase);
  });

  it('treats a non-finite forecast as a failure', () => {
    const r = scoreM3Item(item, (_, h) => ({ forecast: new Float64Array(h).fill(NaN), model: 'nan' }));
    expect(r.failure).toMatch(/non-finite/);
    expect(r.smape).toBe(r.naive2Smape);
  });

  it('hands the forecaster only the training part', () => {
    let seen = -1;
    scoreM3Item(item, (train, h) => {
      seen = train.values.length;
      return { forecast: naive2(train.values, h, train.season), model: 'n2' };
    });
    expect(seen).toBe(n);
  });

  it('gives sMAPE 200·|X−F|/(X+F) averaged over the horizon: a forecast of 2·X scores 200/3', () => {
    const r = scoreM3Item(item, (_, h) => ({ forecast: Float64Array.from({ length: h }, (_, k) => 2 * item.series.values[n + k]), model: 'double' }));
    expect(r.smape).toBeCloseTo(200 / 3, 10);
  });
});

describe('Naive2 on the whole M3 yearly and quarterly sets', () => {
  const n2: PointForecaster = (train, h) => ({ forecast: naive2(train.values, h, train.season), model: 'naive2' });
  const summaries = summariseM3ByFrequency(scoreM3([...yearly, ...quarterly], n2));

  it('reproduces the published yearly Naive2 sMAPE of 17.88 (Makridakis & Hibon 2000)', () => {
    expect(summaries[0].group).toBe('yearly');
    expect(summaries[0].smape).toBeCloseTo(17.88, 2);
  });

  it('comes within 0.1 of the published quarterly Naive2 sMAPE of 9.95', () => {
    expect(summaries[1].group).toBe('quarterly');
    expect(Math.abs(summaries[1].smape - 9.95)).toBeLessThan(0.1);
  });
});

describe('interval scores (M4 definition of MSIS: Makridakis, Spiliotis & Assimakopoulos 2020)', () => {
  it('gives the seasonal random-walk bands F ± z·σ·√(⌊(k−1)/m⌋+1) (Hyndman & Athanasopoulos 2021, §5.5)', () => {
    const { point, bands } = seasonalNaiveGaussian(Float64Array.from([1, 2, 3, 4]), 2, 1, [95]);
    expect(Array.from(point)).toEqual([4, 4]);
    // in-sample naive errors are all 1, so σ = 1; z(0.975) = 1.959964
    expect(bands[0].upper[0] - 4).toBeCloseTo(1.959964, 5);
    expect(bands[0].upper[1] - 4).toBeCloseTo(1.959964 * Math.SQRT2, 5);
    const seasonal = seasonalNaiveGaussian(Float64Array.from([1, 5, 2, 6, 3, 7]), 4, 2, [80]);
    expect(Array.from(seasonal.point)).toEqual([3, 7, 3, 7]);
    const w = (k: number) => seasonal.bands[0].upper[k] - seasonal.point[k];
    expect(w(1)).toBeCloseTo(w(0), 12);
    expect(w(2) / w(0)).toBeCloseTo(Math.SQRT2, 12);
  });

  it('scores a band of half-width 1 around the truth with full coverage and MSIS = 2 / Q', () => {
    const item = yearly[0];
    const n = item.series.values.length - item.horizon;
    const actual = item.series.values.subarray(n);
    const r = scoreM3Item(item, (_, h) => ({
      forecast: actual.slice(0, h),
      model: 'truth',
      bands: [{ level: 95, lower: actual.map((x) => x - 1), upper: actual.map((x) => x + 1) }],
    }));
    expect(r.bands).toHaveLength(1);
    expect(r.bands[0].coverage).toBe(1);
    expect(r.bands[0].first).toBe(1);
    expect(r.bands[0].last).toBe(1);
    expect(r.bands[0].scaledScore).toBeCloseTo(2 / maseScale(item.series.values.subarray(0, n), 1), 12);
  });

  it('charges a miss by d at the 95 % level 2/0.05·d beyond the width (Gneiting & Raftery 2007, eq. 43)', () => {
    const item = yearly[0];
    const n = item.series.values.length - item.horizon;
    const actual = item.series.values.subarray(n);
    const r = scoreM3Item(item, (_, h) => ({
      forecast: actual.slice(0, h),
      model: 'low',
      bands: [{ level: 95, lower: actual.map((x) => x - 3), upper: actual.map((x) => x - 1) }],
    }));
    expect(r.bands[0].coverage).toBe(0);
    expect(r.bands[0].scaledScore).toBeCloseTo((2 + 40 * 1) / maseScale(item.series.values.subarray(0, n), 1), 12);
  });
});
