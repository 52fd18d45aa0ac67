import { describe, expect, it } from 'vitest';
import { decimalYear } from '../../src/data/calendar.js';
import { formatValueTick, timeRange, timeTicks } from '../../src/report/chart-axis.js';

describe('timeTicks', () => {
  it('monthly data over eight years with room for 10 labels: one tick each Jan 1, labelled by year', () => {
    const ticks = timeTicks(Date.UTC(2016, 0, 1), Date.UTC(2023, 11, 1), 'monthly', 10);
    expect(ticks.map((t) => t.label)).toEqual(['2016', '2017', '2018', '2019', '2020', '2021', '2022', '2023']);
    expect(ticks[1].value).toBe(2017); // decimal year of 2017-01-01 is exactly 2017
  });
  it('monthly data over four years with room for 9 labels: six-month steps on Jan and Jul', () => {
    // 2020-01 … 2023-12: one-month steps give 48, two 24, three 16, six 8 ≤ 9
    const ticks = timeTicks(Date.UTC(2020, 0, 1), Date.UTC(2023, 11, 1), 'monthly', 9);
    expect(ticks.map((t) => t.label)).toEqual(['2020-01', '2020-07', '2021-01', '2021-07', '2022-01', '2022-07', '2023-01', '2023-07']);
  });
  it('quarterly data labels quarter steps as quarters', () => {
    const ticks = timeTicks(Date.UTC(2020, 0, 1), Date.UTC(2021, 9, 1), 'quarterly', 10);
    expect(ticks.map((t) => t.label)).toEqual(['2020-Q1', '2020-Q2', '2020-Q3', '2020-Q4', '2021-Q1', '2021-Q2', '2021-Q3', '2021-Q4']);
  });
  it('daily data over March 2021 with room for 6 labels: weekly ticks on Mondays', () => {
    const ticks = timeTicks(Date.UTC(2021, 2, 1), Date.UTC(2021, 2, 31), 'daily', 6);
    expect(ticks.map((t) => t.label)).toEqual(['2021-03-01', '2021-03-08', '2021-03-15', '2021-03-22', '2021-03-29']);
    for (const t of ['2021-03-01', '2021-03-08']) expect(new Date(`${t}T00:00:00Z`).getUTCDay()).toBe(1); // Monday, by the JS calendar
  });
  it('never returns more ticks than asked for, and tick values increase', () => {
    for (const [f, step] of [['hourly', 3_600_000], ['daily', 86_400_000], ['weekly', 7 * 86_400_000]] as const) {
      const from = Date.UTC(2020, 0, 1);
      for (const n of [10, 100, 1000]) {
        const ticks = timeTicks(from, from + n * step, f, 8);
        expect(ticks.length).toBeLessThanOrEqual(8);
        expect(ticks.length).toBeGreaterThan(0);
        for (let i = 1; i < ticks.length; i++) expect(ticks[i].value).toBeGreaterThan(ticks[i - 1].value);
      }
    }
  });
  it('index series get 1-2-5 steps (hand: 0…100 with 6 labels → step 20)', () => {
    expect(timeTicks(0, 100, 'index', 6).map((t) => t.label)).toEqual(['0', '20', '40', '60', '80', '100']);
  });
  it('centuries of yearly data still get a few ticks', () => {
    const ticks = timeTicks(Date.UTC(1700, 0, 1), Date.UTC(2020, 0, 1), 'yearly', 8);
    expect(ticks.map((t) => t.label)).toEqual(['1700', '1750', '1800', '1850', '1900', '1950', '2000']);
  });
});

describe('timeRange', () => {
  it('widens a single point by one period each side', () => {
    const r = timeRange(Date.UTC(2021, 5, 1), Date.UTC(2021, 5, 1), 'monthly');
    expect(r.min).toBe(decimalYear(Date.UTC(2021, 4, 1), 'monthly'));
    expect(r.max).toBe(decimalYear(Date.UTC(2021, 6, 1), 'monthly'));
  });
  it('falls back to [0, 1] without finite time stamps', () => {
    expect(timeRange(Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY, 'monthly')).toMatchObject({ min: 0, max: 1 });
  });
});

describe('formatValueTick', () => {
  it('uses k above 10 000 with the decimals the step needs (hand: 12500 / 1000 = 12.5, step 2.5)', () => {
    expect(formatValueTick(12500, 2500, 30000)).toBe('12.5k');
    expect(formatValueTick(10000, 2000, 30000)).toBe('10k');
  });
  it('keeps plain numbers below 10 000 and decimals for small steps', () => {
    expect(formatValueTick(1500, 500, 3000)).toBe('1500');
    expect(formatValueTick(0.25, 0.05, 0.4)).toBe('0.25');
    expect(formatValueTick(-0.2, 0.2, 0.4)).toBe('-0.2');
  });
  it('writes zero without suffix or sign', () => {
    expect(formatValueTick(0, 2500, 30000)).toBe('0');
    expect(formatValueTick(-0, 0.1, 0.3)).toBe('0');
    expect(formatValueTick(-0.00001, 0.1, 0.3)).toBe('0'); // rounds to zero at one decimal
  });
  it('uses M from 10 million (hand: 2 000 000 / 1e6 with step 0.5 → 2.0M)', () => {
    expect(formatValueTick(2e6, 5e5, 1.2e7)).toBe('2.0M');
  });
});
