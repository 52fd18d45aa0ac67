import { describe, expect, it } from 'vitest';
import { excelSerialToTime, isoWeekMonday, isoWeeksInYear, parseTimeText, inferDayMonthOrder } from '../../src/data/dates.js';
import { DataError } from '../../src/data/errors.js';

const day = (s: string): number => Date.parse(`${s}T00:00:00Z`);

describe('isoWeeksInYear / isoWeekMonday (ISO 8601 week dates)', () => {
  // ISO 8601 rule: a year has week 53 when 1 January is a Thursday, or a Wednesday in a leap year.
  // 2020-01-01 was a Wednesday and 2020 is a leap year; 2021-01-01 was a Friday; 2015-01-01 a Thursday.
  it('gives 2020 and 2015 a week 53 and 2021 none', () => {
    expect(isoWeeksInYear(2020)).toBe(53);
    expect(isoWeeksInYear(2015)).toBe(53);
    expect(isoWeeksInYear(2021)).toBe(52);
    expect(isoWeeksInYear(2019)).toBe(52);
  });
  it('puts 2020-W01 on Monday 2019-12-30 (the week holding 4 January)', () => {
    expect(isoWeekMonday(2020, 1)).toBe(day('2019-12-30'));
    expect(new Date(isoWeekMonday(2020, 1)).getUTCDay()).toBe(1);
  });
  it('puts 2020-W53 on Monday 2020-12-28 and refuses 2021-W53', () => {
    expect(parseTimeText('2020-W53')).toEqual({ t: day('2020-12-28'), kind: 'week' });
    expect(parseTimeText('2021-W53')).toBeNull();
    expect(parseTimeText('2021W01')).toEqual({ t: day('2021-01-04'), kind: 'week' });
  });
  it('every week 1 Monday is the Monday on or before 4 January (invariant over 1990–2040)', () => {
    for (let y = 1990; y <= 2040; y++) {
      const monday = isoWeekMonday(y, 1);
      const jan4 = Date.UTC(y, 0, 4);
      expect(new Date(monday).getUTCDay()).toBe(1);
      expect(jan4 - monday).toBeGreaterThanOrEqual(0);
      expect(jan4 - monday).toBeLessThan(7 * 86_400_000);
      // The last week ends right before the next year's week 1.
      expect(isoWeekMonday(y, isoWeeksInYear(y)) + 7 * 86_400_000).toBe(isoWeekMonday(y + 1, 1));
    }
  });
});

describe('excelSerialToTime (ECMA-376 Part 1, 18.17.4.1, 1900 and 1904 date systems)', () => {
  it('maps serial 1 to 1900-01-01 and 61 to 1900-03-01', () => {
    expect(excelSerialToTime(1)).toBe(day('1900-01-01'));
    expect(excelSerialToTime(59)).toBe(day('1900-02-28'));
    expect(excelSerialToTime(61)).toBe(day('1900-03-01'));
  });
  it('refuses serial 60, the 1900-02-29 that never existed, and serials below 1', () => {
    expect(excelSerialToTime(60)).toBeNaN();
    expect(excelSerialToTime(0)).toBeNaN();
    expect(excelSerialToTime(-3)).toBeNaN();
  });
  it('maps 25569 to 1970-01-01 and keeps the time of day (0.5 = noon)', () => {
    // 25569 = days from 1899-12-30 to 1970-01-01 (from memory, checked: 70 years × 365 + 17 leap days + 2).
    expect(70 * 365 + 17 + 2).toBe(25569);
    expect(excelSerialToTime(25569)).toBe(0);
    expect(excelSerialToTime(25569.5)).toBe(43_200_000);
  });
  it('1904 system: serial 0 is 1904-01-01', () => {
    expect(excelSerialToTime(0, true)).toBe(day('1904-01-01'));
    expect(excelSerialToTime(1, true)).toBe(day('1904-01-02'));
  });
});

describe('parseTimeText', () => {
  it('reads ISO dates and date-times, converting offsets to UTC', () => {
    expect(parseTimeText('2021-03-05')).toEqual({ t: day('2021-03-05'), kind: 'date' });
    expect(parseTimeText('2021/3/5')).toEqual({ t: day('2021-03-05'), kind: 'date' });
    expect(parseTimeText('2021-03-05T14:30')).toEqual({ t: Date.parse('2021-03-05T14:30:00Z'), kind: 'datetime' });
    expect(parseTimeText('2021-03-05 14:30:15Z')?.t).toBe(Date.parse('2021-03-05T14:30:15Z'));
    expect(parseTimeText('2021-03-05T14:30+02:00')?.t).toBe(Date.parse('2021-03-05T12:30:00Z'));
  });
  it('reads years, months and quarters as period starts', () => {
    expect(parseTimeText('2021')).toEqual({ t: day('2021-01-01'), kind: 'year' });
    expect(parseTimeText('2021-03')).toEqual({ t: day('2021-03-01'), kind: 'month' });
    expect(parseTimeText('2021-Q3')).toEqual({ t: day('2021-07-01'), kind: 'quarter' });
    expect(parseTimeText('2021q4')).toEqual({ t: day('2021-10-01'), kind: 'quarter' });
  });
  it('reads English month names in the usual orders', () => {
    expect(parseTimeText('Jan 1 2000')).toEqual({ t: day('2000-01-01'), kind: 'date' });
    expect(parseTimeText('Jan 1, 2000')?.t).toBe(day('2000-01-01'));
    expect(parseTimeText('1 Jan 2000')?.t).toBe(day('2000-01-01'));
    expect(parseTimeText('15-Sep-2012')?.t).toBe(day('2012-09-15'));
    expect(parseTimeText('January 2000')).toEqual({ t: day('2000-01-01'), kind: 'month' });
    expect(parseTimeText('sept 2001')?.t).toBe(day('2001-09-01'));
  });
  it('reads other integers as an index', () => {
    expect(parseTimeText('17')).toEqual({ t: 17, kind: 'index' });
    expect(parseTimeText('-3')).toEqual({ t: -3, kind: 'index' });
  });
  it('refuses impossible dates and times', () => {
    for (const s of ['2021-02-29', '2021-13', '2021-Q5', '2020-01-05T25:00', 'Feb 30 2020', 'yesterday', '2021-00-10']) {
      expect(parseTimeText(s), s).toBeNull();
    }
    expect(parseTimeText('2020-02-29')?.t).toBe(day('2020-02-29'));
  });
  it('reads NN/NN/YYYY only with an order', () => {
    expect(parseTimeText('03/04/2020')).toBeNull();
    expect(parseTimeText('03/04/2020', 'DMY')?.t).toBe(day('2020-04-03'));
    expect(parseTimeText('03/04/2020', 'MDY')?.t).toBe(day('2020-03-04'));
  });
});

describe('inferDayMonthOrder', () => {
  const where = { file: 'f.csv', column: 'date' };
  it('is day-first when a first field exceeds 12, month-first when a second does, null otherwise', () => {
    expect(inferDayMonthOrder([{ text: '03/04/2020', row: 2 }, { text: '25/04/2020', row: 3 }], where)).toBe('DMY');
    expect(inferDayMonthOrder([{ text: '03/04/2020', row: 2 }, { text: '04/25/2020', row: 3 }], where)).toBe('MDY');
    expect(inferDayMonthOrder([{ text: '03/04/2020', row: 2 }], where)).toBeNull();
  });
  it('throws when the column mixes both orders', () => {
    expect(() => inferDayMonthOrder([{ text: '25/04/2020', row: 2 }, { text: '04/25/2020', row: 3 }], where)).toThrow(DataError);
  });
});

describe('utcTime (civil date arithmetic)', () => {
  it('agrees with Date.UTC on every day from 1890 to 2110', async () => {
    const { utcTime } = await import('../../src/data/dates.js');
    for (let t = Date.UTC(1890, 0, 1); t <= Date.UTC(2110, 11, 31); t += 86_400_000) {
      const d = new Date(t);
      if (utcTime(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate()) !== t) expect.unreachable(d.toISOString());
    }
    expect(utcTime(2021, 2, 5, 14, 30)).toBe(Date.UTC(2021, 2, 5, 14, 30));
  });
});
