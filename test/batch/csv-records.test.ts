/**
 * rawRecords: records of RFC 4180 text (section 2: quoted fields may hold commas, doubled quotes
 * and line breaks) come back as the exact text toCsv wrote, so that joining them rebuilds the file.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { rawRecords } from '../../src/batch/csv-records.js';
import { toCsv } from '../../src/report/tables.js';

describe('rawRecords', () => {
  it('splits at line ends outside quotes and keeps the fields as written', () => {
    const text = toCsv(['series', 'note'], [['a,b', 'two\r\nlines'], ['say "hi"', null]]);
    const r = rawRecords(text);
    expect(r.map((x) => x.text).join('')).toBe(text);
    expect(r).toHaveLength(3);
    expect(r[1].fields).toEqual(['"a,b"', '"two\r\nlines"']);
    expect(r[2].fields).toEqual(['"say ""hi"""', '']);
  });

  it('rebuilds any table toCsv wrote, record for record (property)', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.string(), fc.oneof(fc.string(), fc.double(), fc.constant(null))), { maxLength: 20 }), (rows) => {
        const text = toCsv(['a', 'b'], rows);
        const r = rawRecords(text);
        expect(r).toHaveLength(rows.length + 1);
        expect(r.map((x) => x.text).join('')).toBe(text);
        rows.forEach((row, i) => expect(r[i + 1].text).toBe(toCsv(['a', 'b'], [row]).slice('a,b\r\n'.length)));
      }),
      { seed: 5, numRuns: 200 },
    );
  });
});
