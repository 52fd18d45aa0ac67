import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { formatTime } from '../../src/data/calendar.js';
import { DataError } from '../../src/data/errors.js';
import { naive2 } from '../../src/evaluate/baselines.js';
import { parseM3, scoreM3, scoreM3Item, summariseM3ByFrequency, type PointForecaster } from '../../src/evaluate/m3.js';

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
