import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { formatTime, stepTime } from '../../src/data/calendar.js';
import { isCertaError } from '../../src/data/errors.js';
import { loadSeries } from '../../src/data/load.js';

/** Writes a wide table as CSV, quoting names that need it (RFC 4180). */
function writeCsv(header: string[], rows: string[][], delimiter: string, crlf: boolean): string {
  const q = (s: string) => (/[",\n\r;\t|]/.test(s) || s !== s.trim() ? `"${s.replace(/"/g, '""')}"` : s);
  const eol = crlf ? '\r\n' : '\n';
  return [header.map(q).join(delimiter), ...rows.map((r) => r.map(q).join(delimiter))].join(eol) + eol;
}

const seriesName = fc
  .string({ minLength: 1, maxLength: 12 })
  .filter((s) => s.trim().length > 0 && !/^(date|time|timestamp|datetime|period|day|week|month|quarter|year|ds|when)$/i.test(s.trim()) && !/(date|time|period|month|year)/i.test(s));

describe('write CSV → loadSeries round trip (fast-check)', () => {
  it('gives back the same values, times and names', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.uniqueArray(seriesName, { minLength: 1, maxLength: 4, selector: (s) => s.trim() }),
        fc.integer({ min: 2, max: 40 }),
        fc.constantFrom('monthly', 'daily', 'quarterly', 'yearly', 'weekly', 'hourly'),
        fc.constantFrom(',', ';', '\t', '|'),
        fc.boolean(),
        fc.integer({ min: 0, max: 1000 }),
        async (names, n, f, delimiter, crlf, seed) => {
          const freq = f as 'monthly' | 'daily' | 'quarterly' | 'yearly' | 'weekly' | 'hourly';
          // 2001-01-01 is a Monday, and the start of a day, month, quarter and year.
          const t0 = Date.UTC(2001, 0, 1);
          const values = names.map((_, j) => Array.from({ length: n }, (_, i) => Math.round(Math.sin(seed + i * 1.7 + j) * 1e6) / 1e3));
          const times = Array.from({ length: n }, (_, i) => stepTime(t0, freq, i));
          const text = (t: number) => (freq === 'hourly' ? new Date(t).toISOString().slice(0, 16) : formatTime(t, freq));
          const rows = times.map((t, i) => [text(t), ...values.map((v) => String(v[i]))]);
          const csv = writeCsv(['when', ...names.map((s) => s.trim())], rows, delimiter, crlf);
          const { series, report } = await loadSeries({ name: 'p.csv', bytes: Buffer.from(csv) }, { time: 'when' });
          expect(report.frequency.frequency).toBe(freq);
          expect(series.map((s) => s.name)).toEqual(names.map((s) => s.trim()));
          series.forEach((s, j) => {
            expect(Array.from(s.values)).toEqual(values[j]);
            expect(Array.from(s.time)).toEqual(times);
          });
        },
      ),
      { numRuns: 150, seed: 42 },
    );
  });
});

describe('loadSeries on arbitrary bytes and strings (fast-check)', () => {
  const ok = async (bytes: Buffer, name: string): Promise<void> => {
    try {
      const { series } = await loadSeries({ name, bytes });
      for (const s of series) {
        expect(s.values.length).toBe(s.time.length);
        expect(s.values.every((v) => Number.isFinite(v))).toBe(true);
      }
    } catch (e) {
      if (!isCertaError(e)) throw e;
    }
  };
  it('random bytes give a typed error or a valid result', async () => {
    await fc.assert(
      fc.asyncProperty(fc.uint8Array({ maxLength: 300 }), fc.constantFrom('r.csv', 'r.json', '-', 'r.tsv'), (b, name) => ok(Buffer.from(b), name)),
      { numRuns: 300, seed: 7 },
    );
  });
  it('random strings from table-like pieces give a typed error or a valid result', async () => {
    const piece = fc.constantFrom('date', 'x', ',', ';', '\n', '\r\n', '"', '2020-01', '2020-02-03', '2020-W05', '1', '-2.5', 'NA', '', '03/04/2020', '1,234', 'Jan 2000', '{', '[', ']', '}', ':', '\t', '2021-Q2', 'id', 'a');
    await fc.assert(
      fc.asyncProperty(fc.array(piece, { maxLength: 60 }), fc.constantFrom('s.csv', '-'), (parts, name) => ok(Buffer.from(parts.join('')), name)),
      { numRuns: 500, seed: 11 },
    );
  });
  it('random unicode strings give a typed error or a valid result', async () => {
    await fc.assert(fc.asyncProperty(fc.string({ maxLength: 200, unit: 'grapheme' }), (s) => ok(Buffer.from(s), 'u.csv')), { numRuns: 300, seed: 3 });
  });
});

describe('formatTime: the texts it keeps', () => {
  it('gives for a stamp the text an independent writer gives, first asked, asked again, and after its store was cleared', () => {
    // independent: the ISO text of the instant (hourly: to the minute; monthly: year and month)
    const hourly = (t: number) => new Date(t).toISOString().slice(0, 16);
    const monthly = (t: number) => new Date(t).toISOString().slice(0, 7);
    const t0 = Date.UTC(1990, 0, 1);
    const hour = 3_600_000;
    const first = Array.from({ length: 50 }, (_, i) => t0 + i * hour);
    for (const t of first) expect(formatTime(t, 'hourly')).toBe(hourly(t));
    // more distinct stamps than the store keeps, so it is cleared on the way
    for (let i = 0; i < 120_000; i++) formatTime(t0 + i * hour, 'hourly');
    for (const t of first) expect(formatTime(t, 'hourly')).toBe(hourly(t));
    // one frequency's texts are never another's
    for (const t of first) expect(formatTime(t, 'monthly')).toBe(monthly(t));
    expect(formatTime(t0 + 13 * hour, 'hourly')).toBe('1990-01-01T13:00');
  });
});
