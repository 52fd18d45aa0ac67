import { describe, expect, it } from 'vitest';
import { cellNumber, isMissingText, parseNumberText } from '../../src/data/numbers.js';

describe('parseNumberText', () => {
  it('reads plain decimals, signs and exponents', () => {
    expect(parseNumberText('12')).toBe(12);
    expect(parseNumberText('-3.5')).toBe(-3.5);
    expect(parseNumberText('+.5')).toBe(0.5);
    expect(parseNumberText('1.2e-3')).toBe(0.0012);
    expect(parseNumberText(' 7 ')).toBe(7);
  });
  it('reads thousands separators only where they cannot be a decimal comma', () => {
    expect(parseNumberText('1,234.5')).toBe(1234.5);
    expect(parseNumberText('1,234,567')).toBe(1234567);
    expect(parseNumberText('1,234')).toBeNaN();
    expect(parseNumberText('3,5')).toBeNaN();
    expect(parseNumberText('12,34.5')).toBeNaN();
  });
  it('refuses hexadecimal, infinities and text', () => {
    for (const s of ['0x10', '0b1', 'Infinity', '-Infinity', '1e400', 'abc', '', '  ', '1.2.3']) expect(parseNumberText(s), s).toBeNaN();
  });
});

describe('isMissingText / cellNumber', () => {
  it('knows the missing markers: empty, NA, NaN, null, -, ..', () => {
    for (const s of ['', ' ', 'NA', 'na', 'NaN', 'null', 'NULL', '-', '..']) expect(isMissingText(s), s).toBe(true);
    expect(isMissingText('0')).toBe(false);
    expect(cellNumber('NA')).toBeNaN();
    expect(cellNumber(null)).toBeNaN();
    expect(cellNumber('x')).toBeUndefined();
    expect(cellNumber(true)).toBe(1);
  });
});
