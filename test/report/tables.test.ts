import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { csvField, formatNumber, readsAsFormula, tableFromColumns, tableFromRecords, tableToCsv, toCsv, toJson } from '../../src/report/tables.js';

describe('formatNumber', () => {
  it('writes the shortest round-trip decimal, no locale grouping', () => {
    expect(formatNumber(1234567.5)).toBe('1234567.5');
    expect(formatNumber(0.1 + 0.2)).toBe('0.30000000000000004'); // the double nearest 0.3 is 0.299999999999999988898
    expect(formatNumber(1e-7)).toBe('1e-7');
    expect(formatNumber(2 ** 70)).toBe('1.1805916207174113e+21'); // 2^70 = 1180591620717411303424, 17 significant digits needed
  });
  it('writes −0 as 0, NaN as empty, infinities by name', () => {
    expect(formatNumber(-0)).toBe('0');
    expect(formatNumber(Number.NaN)).toBe('');
    expect(formatNumber(Number.POSITIVE_INFINITY)).toBe('Infinity');
    expect(formatNumber(Number.NEGATIVE_INFINITY)).toBe('-Infinity');
  });
  it('round-trips every finite double through Number()', () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => {
        expect(Number(formatNumber(x))).toBe(x === 0 ? 0 : x);
      }),
    );
  });
});

describe('csvField (RFC 4180 section 2)', () => {
  it('leaves plain text alone', () => {
    expect(csvField('Lumo kettles')).toBe('Lumo kettles');
  });
  it('quotes fields with commas, quotes, CR or LF and doubles inner quotes', () => {
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(csvField('cr\rhere')).toBe('"cr\rhere"');
  });
  it('writes missing (null, NaN) as the empty field and the empty string as ""', () => {
    expect(csvField(null)).toBe('');
    expect(csvField(Number.NaN)).toBe('');
    expect(csvField('')).toBe('""');
  });
});

describe('toCsv', () => {
  it('writes header and records with CRLF after every record', () => {
    const csv = toCsv(['period', 'note', 'units'], [
      ['2021-01', 'launch, "promo"', 1200],
      ['2021-02', null, Number.NaN],
      ['2021-03', 'line\nbreak', 0.5],
    ]);
    expect(csv).toBe('period,note,units\r\n2021-01,"launch, ""promo""",1200\r\n2021-02,,\r\n2021-03,"line\nbreak",0.5\r\n');
  });
  it('can use LF record separators', () => {
    expect(toCsv(['a'], [[1], [2]], { newline: '\n' })).toBe('a\n1\n2\n');
  });
  it('quotes header names that need it', () => {
    expect(toCsv(['sales, units'], [])).toBe('"sales, units"\r\n');
  });
  it('rejects rows of the wrong length', () => {
    expect(() => toCsv(['a', 'b'], [[1]])).toThrow(RangeError);
  });
  it('parses back to the same cells with a minimal RFC 4180 reader (quoted fields, doubled quotes, formula starts neutralised)', () => {
    const cell = fc.oneof(fc.string({ unit: fc.constantFrom('a', ',', '"', '\n', '\r', ' ', 'é') }), fc.integer());
    fc.assert(
      fc.property(fc.array(fc.array(cell, { minLength: 2, maxLength: 2 }), { maxLength: 5 }), (rows) => {
        const back = parseCsv(toCsv(['x', 'y'], rows));
        expect(back[0]).toEqual(['x', 'y']);
        expect(back.slice(1)).toEqual(rows.map((r) => r.map((c) => (typeof c === 'number' ? String(c) : readsAsFormula(c) ? `'${c}` : c))));
      }),
    );
  });
});

describe('toCsv against its definition', () => {
  it('property: each record is its cells through csvField joined by commas (fast-check, seed 17)', () => {
    const text = fc.oneof(fc.string(), fc.constantFrom('', '=x', '-1.5', '+3e4', '@a', '\tb', 'a,b', 'q"q', 'l\nm'));
    const cell = fc.oneof(fc.constant(null), fc.double(), fc.integer(), text);
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5 }), fc.array(fc.array(cell, { minLength: 5, maxLength: 5 }), { maxLength: 12 }), (width, wide) => {
        const rows = wide.map((r) => r.slice(0, width));
        // repeated texts down a column take the remembered field
        if (rows.length > 1) rows[1][0] = rows[0][0];
        const columns = Array.from({ length: width }, (_, j) => `c${j}`);
        const expected = [columns, ...rows].map((r) => r.map(csvField).join(',')).join('\r\n') + '\r\n';
        expect(toCsv(columns, rows)).toBe(expected);
      }),
      { seed: 17, numRuns: 400 },
    );
  });
});

describe('tableFromRecords / tableFromColumns', () => {
  it('tableFromRecords takes columns in first-seen key order and fills missing keys with null', () => {
    const t = tableFromRecords([{ model: 'naive', mae: 3 }, { model: 'drift', rmse: 4 }]);
    expect(t).toEqual({ columns: ['model', 'mae', 'rmse'], rows: [['naive', 3, null], ['drift', null, 4]] });
  });
  it('tableFromRecords honours an explicit column list', () => {
    expect(tableFromRecords([{ a: 1, b: 2 }], ['b']).rows).toEqual([[2]]);
  });
  it('tableFromColumns zips aligned arrays, typed arrays included', () => {
    const t = tableFromColumns({ period: ['2021-01', '2021-02'], forecast: Float64Array.from([1.5, Number.NaN]) });
    expect(tableToCsv(t)).toBe('period,forecast\r\n2021-01,1.5\r\n2021-02,\r\n');
  });
  it('tableFromColumns rejects columns of different lengths', () => {
    expect(() => tableFromColumns({ a: [1], b: [1, 2] })).toThrow(RangeError);
  });
});

describe('toJson', () => {
  it('sorts keys at every depth, so construction order does not change the bytes', () => {
    expect(toJson({ b: 1, a: { d: [1, 2], c: null } })).toBe(toJson({ a: { c: null, d: [1, 2] }, b: 1 }));
    expect(toJson({ b: 1, a: 2 })).toBe('{\n  "a": 2,\n  "b": 1\n}\n');
  });
  it('writes typed arrays as arrays, non-finite numbers as null, −0 as 0, drops undefined', () => {
    const text = toJson({ v: Float64Array.from([1, Number.NaN, Number.POSITIVE_INFINITY, -0]), u: undefined });
    expect(JSON.parse(text)).toEqual({ v: [1, null, null, 0] });
  });
});

/** Minimal RFC 4180 reader, independent of the writer, for the round-trip test. */
function parseCsv(text: string): string[][] {
  const records: string[][] = [];
  let record: string[] = [];
  let field = '';
  let i = 0;
  let quoted = false;
  while (i < text.length) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        field += '"';
        i += 2;
      } else if (ch === '"') {
        quoted = false;
        i++;
      } else {
        field += ch;
        i++;
      }
    } else if (ch === '"') {
      quoted = true;
      i++;
    } else if (ch === ',') {
      record.push(field);
      field = '';
      i++;
    } else if (ch === '\r' && text[i + 1] === '\n') {
      record.push(field);
      records.push(record);
      record = [];
      field = '';
      i += 2;
    } else {
      field += ch;
      i++;
    }
  }
  return records;
}
