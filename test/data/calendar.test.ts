/**
 * The calendar fields certa reads from time stamps (calendar.ts `utcParts`, remembered between
 * calls) against the JavaScript `Date` object's own UTC getters, the reference they must equal,
 * and the period arithmetic built on them against the same reference and hand-counted cases.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { periodStart, periodsBetween, stepTime, utcParts } from '../../src/data/calendar.js';

const DAY = 86_400_000;
/** Stamps from year 100 to 9999 (Date.UTC maps two-digit years into the 1900s, so earlier ones are not compared). */
const stamp = fc.integer({ min: Date.UTC(100, 0, 1), max: Date.UTC(9999, 11, 31) });

describe('utcParts', () => {
  it('equals the Date getters for any stamp, first seen or remembered', () => {
    fc.assert(
      fc.property(stamp, (t) => {
        const d = new Date(t);
        const want = { year: d.getUTCFullYear(), month: d.getUTCMonth(), date: d.getUTCDate(), hours: d.getUTCHours(), minutes: d.getUTCMinutes(), monthEnd: new Date(t + DAY).getUTCDate() === 1 };
        expect(utcParts(t)).toEqual(want);
        expect(utcParts(t)).toEqual(want);
      }),
      { numRuns: 2000, seed: 7 },
    );
  });

  it('stays right after its memory is emptied (more distinct stamps than it keeps)', () => {
    const start = Date.UTC(1900, 0, 1);
    for (let i = 0; i < 40_000; i++) utcParts(start + i * 3_600_000);
    // 2024 is a leap year: 29 February is the month's last day, 28 February is not.
    expect(utcParts(Date.UTC(2024, 1, 29))).toMatchObject({ year: 2024, month: 1, date: 29, monthEnd: true });
    expect(utcParts(Date.UTC(2024, 1, 28))).toMatchObject({ date: 28, monthEnd: false });
    expect(utcParts(Date.UTC(1900, 1, 28))).toMatchObject({ monthEnd: true }); // 1900 is not a leap year
  });
});

describe('period arithmetic on the remembered fields', () => {
  it('month, quarter and year starts equal those set through Date', () => {
    fc.assert(
      fc.property(stamp, (t) => {
        const d = new Date(t);
        const ref = (month: number) => {
          const s = new Date(0);
          s.setUTCFullYear(d.getUTCFullYear(), month, 1);
          return s.getTime();
        };
        const m = d.getUTCMonth();
        expect(periodStart(t, 'monthly')).toBe(ref(m));
        expect(periodStart(t, 'quarterly')).toBe(ref(m - (m % 3)));
        expect(periodStart(t, 'yearly')).toBe(ref(0));
      }),
      { numRuns: 1000, seed: 11 },
    );
  });

  it('steps by calendar months and counts them back', () => {
    fc.assert(
      fc.property(fc.integer({ min: Date.UTC(1000, 0, 1), max: Date.UTC(9000, 0, 1) }), fc.integer({ min: -600, max: 600 }), (t, k) => {
        const first = periodStart(t, 'monthly');
        const later = stepTime(first, 'monthly', k);
        const d = new Date(first);
        expect(later).toBe(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + k, 1));
        expect(periodsBetween(first, later, 'monthly')).toBe(k);
      }),
      { numRuns: 1000, seed: 13 },
    );
    // Counted by hand: January 2020 + 13 months is February 2021; 2019-Q4 to 2021-Q2 is 6 quarters.
    expect(stepTime(Date.UTC(2020, 0, 1), 'monthly', 13)).toBe(Date.UTC(2021, 1, 1));
    expect(periodsBetween(Date.UTC(2019, 9, 1), Date.UTC(2021, 3, 1), 'quarterly')).toBe(6);
  });
});
