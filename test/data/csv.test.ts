import { describe, expect, it } from 'vitest';
import { parseDelimited, sniffDelimiter } from '../../src/data/csv.js';
import { decodeText } from '../../src/data/source.js';
import { DataError } from '../../src/data/errors.js';

describe('parseDelimited (RFC 4180 quoting)', () => {
  it('splits plain records and numbers rows by file line', () => {
    const t = parseDelimited('a,b\n1,2\n\n3,4\n', ',', 'f.csv', 'csv');
    expect(t.header).toEqual(['a', 'b']);
    expect(t.columns).toEqual([['1', '3'], ['2', '4']]);
    expect(Array.from(t.rows)).toEqual([2, 4]);
  });
  it('reads quoted fields with delimiters, "" escapes and embedded newlines', () => {
    const t = parseDelimited('name,note\n"x, y","he said ""hi"""\n"multi\nline",z\nlast,"a\r\nb"\r\n', ',', 'f.csv', 'csv');
    expect(t.columns[0]).toEqual(['x, y', 'multi\nline', 'last']);
    expect(t.columns[1]).toEqual(['he said "hi"', 'z', 'a\r\nb']);
    // The record after a two-line field starts on line 5.
    expect(Array.from(t.rows)).toEqual([2, 3, 5]);
  });
  it('accepts CRLF line ends and a final line without newline', () => {
    const t = parseDelimited('a;b\r\n1;2\r\n3;4', ';', 'f.csv', 'csv');
    expect(t.columns).toEqual([['1', '3'], ['2', '4']]);
  });
  it('keeps empty fields, including a trailing one', () => {
    const t = parseDelimited('a,b,c\n1,,\n', ',', 'f.csv', 'csv');
    expect(t.columns).toEqual([['1'], [''], ['']]);
  });
  it('refuses a row with too many fields, naming its line', () => {
    try {
      parseDelimited('a,b\n1,2\n3,4,5\n', ',', 'f.csv', 'csv');
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(DataError);
      expect((e as DataError).context.row).toBe(3);
    }
  });
  it('refuses an unterminated quote', () => {
    expect(() => parseDelimited('a,b\n"1,2\n', ',', 'f.csv', 'csv')).toThrow(/never closed/);
  });
});

describe('sniffDelimiter', () => {
  it('finds comma, semicolon, tab and pipe, ignoring delimiters inside quotes', () => {
    expect(sniffDelimiter('a,b\n1,2\n')).toBe(',');
    expect(sniffDelimiter('a;b;c\n"1,5";2;3\n')).toBe(';');
    expect(sniffDelimiter('a\tb\n1\t2\n')).toBe('\t');
    expect(sniffDelimiter('a|b\n1|2\n')).toBe('|');
    expect(sniffDelimiter('only\n1\n')).toBe(',');
  });
});

describe('decodeText', () => {
  it('drops a UTF-8 byte-order mark', () => {
    const bytes = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from('date,x\n')]);
    expect(decodeText({ name: 'f.csv', bytes })).toBe('date,x\n');
  });
  it('refuses invalid UTF-8 naming the line', () => {
    const bytes = Buffer.concat([Buffer.from('date,x\n2020,'), Buffer.from([0xe9]), Buffer.from('\n')]);
    try {
      decodeText({ name: 'f.csv', bytes });
      expect.unreachable();
    } catch (e) {
      expect((e as DataError).context.row).toBe(2);
    }
  });
});

describe('parseDelimited on long files (repeated cells share one text)', () => {
  it('gives every cell as written, in columns that repeat, that never repeat, and that change character midway', () => {
    // 6,000 rows: more than the 4,096 cells after which a mostly distinct column stops pooling.
    const lines = ['id,stamp,value,mixed'];
    const want: string[][] = [[], [], [], []];
    for (let r = 0; r < 6000; r++) {
      const cells = [`S-${r % 37}`, `2020-${String((r % 12) + 1).padStart(2, '0')}`, (r * 1.25).toFixed(2), r < 3000 ? 'same' : `v${r}`];
      lines.push(cells.join(','));
      cells.forEach((c, j) => want[j].push(c));
    }
    // a quoted record goes through the other reader, and pools the same way
    lines.push('"S-1","2020-01","7.5","same"');
    want.forEach((col, j) => col.push(['S-1', '2020-01', '7.5', 'same'][j]));
    const t = parseDelimited(`${lines.join('\n')}\n`, ',', 'long.csv', 'csv');
    expect(t.columns).toEqual(want);
    expect(t.rows.length).toBe(6001);
  });
});
