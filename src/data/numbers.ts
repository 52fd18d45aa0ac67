/**
 * Number cells and missing markers.
 *
 * A number is a plain decimal with optional sign and exponent (`12`, `-3.5`, `.5`, `1.2e-3`).
 * Thousands separators (`,`) are accepted only where they cannot be a decimal comma: with a
 * decimal point after them (`1,234.5`) or with two or more groups (`1,234,567`). A single group
 * and no point (`1,234`) could mean 1234 or 1.234, so it is refused with a message. Decimal
 * commas (`3,5`) are read only in decimal-comma mode (`--decimal ,`, or detected by
 * decimal-comma.ts); there `.` or a space groups thousands by the same rule mirrored
 * (`1.234,5`, `1.234.567`, `1 234,5`; `1.234` alone is refused) and `3.5` is not a number.
 * Hexadecimal, `Infinity` and numbers out of double range are not
 * numbers. Missing markers: an empty cell, `NA`, `NaN`, `null` (any letter case), `-`, `..`.
 */

const MISSING = new Set(['', 'na', 'nan', 'null', '-', '..']);

/** True if the text is one of the missing markers (surrounding spaces ignored). */
export function isMissingText(s: string): boolean {
  return MISSING.has(s.trim().toLowerCase());
}

const GROUPED = /^([+-]?)(\d{1,3}(?:,\d{3})+)(\.\d+)?$/;

/** The number a text cell holds, or NaN when it holds none (missing marker or not a number). */
export function parseNumberText(s: string): number {
  const c0 = s.charCodeAt(0);
  // Digits, '+', '-', '.', or a space (Number trims spaces).
  if (!((c0 >= 48 && c0 <= 57) || c0 === 45 || c0 === 43 || c0 === 46 || c0 === 32 || c0 === 9)) return NaN;
  if (s.length > 1) {
    const c1 = s.charCodeAt(1) | 32; // lower case
    if (c1 === 120 || c1 === 98 || c1 === 111) return NaN; // 0x, 0b, 0o
  }
  const v = Number(s);
  if (v === v && v !== Infinity && v !== -Infinity) {
    return s.trim().length === 0 ? NaN : v;
  }
  if (s.indexOf(',') >= 0) {
    const m = GROUPED.exec(s.trim());
    if (m && (m[3] !== undefined || m[2].length > 7)) return Number(m[1] + m[2].replace(/,/g, '') + (m[3] ?? ''));
  }
  return NaN;
}

/** The decimal separator of number cells: `.` (the default) or `,`. */
export type DecimalMark = '.' | ',';

const COMMA_PLAIN = /^([+-]?)(\d*),?(\d*)(?:[eE]([+-]?\d+))?$/;
const COMMA_GROUPED = /^([+-]?)(\d{1,3}(?:([. \u00a0\u202f])\d{3})(?:\3\d{3})*)(?:,(\d+))?$/;

/** The number a text cell holds in decimal-comma mode, or NaN (see the module comment). */
export function parseCommaNumberText(s: string): number {
  const t = s.trim();
  let m = COMMA_PLAIN.exec(t);
  if (m && (m[2].length > 0 || m[3].length > 0) && !(t.includes(',') && m[3].length === 0)) {
    const v = Number(`${m[1]}${m[2] || '0'}.${m[3] || '0'}${m[4] !== undefined ? `e${m[4]}` : ''}`);
    return Number.isFinite(v) ? v : NaN;
  }
  m = COMMA_GROUPED.exec(t);
  if (m && (m[4] !== undefined || m[2].length > 7)) {
    const v = Number(`${m[1]}${m[2].split(m[3]).join('')}${m[4] !== undefined ? `.${m[4]}` : ''}`);
    return Number.isFinite(v) ? v : NaN;
  }
  return NaN;
}

/** A decimal-comma number such as `3,5` or `-12,75` (one comma, digits on both sides). */
export const DECIMAL_COMMA_NUMBER = /^[+-]?\d+,\d+$/;

/** Why a non-missing text is not a number, for the "expected" part of a message. */
export function numberExpectation(s: string, decimal: DecimalMark = '.'): string {
  const t = s.trim();
  if (decimal === ',') {
    if (/^[+-]?\d{1,3}\.\d{3}$/.test(t)) return `a number; "${t}" could be thousands or a decimal point, write it without the point`;
    if (/^[+-]?\d*\.\d+$/.test(t)) return 'a number with "," as the decimal point (--decimal ,)';
    return 'a number (or a missing marker: empty, NA, NaN, null, -, ..)';
  }
  if (/^[+-]?\d{1,3},\d{3}$/.test(t)) return `a number; "${t}" could be thousands or a decimal comma`;
  if (DECIMAL_COMMA_NUMBER.test(t)) return 'a number with "." as the decimal point';
  return 'a number (or a missing marker: empty, NA, NaN, null, -, ..)';
}

/** What to do about a text that is not a number, when the cause is the decimal mark. */
export function numberHint(s: string, decimal: DecimalMark = '.'): string | undefined {
  const t = s.trim();
  if (decimal === ',') return /^[+-]?\d*\.\d+$/.test(t) ? 'the file uses "." as the decimal point: drop --decimal ,' : undefined;
  if (/^[+-]?\d{1,3},\d{3}$/.test(t)) return `if "${t}" means ${t.replace(',', '.')}, pass --decimal , (decimal commas); if it means ${t.replace(',', '')}, write it without the comma`;
  if (DECIMAL_COMMA_NUMBER.test(t)) return 'the numbers have decimal commas: pass --decimal , to read them';
  return undefined;
}

/** Number from any cell kind; NaN for missing; `undefined` when the cell is not a number. */
export function cellNumber(cell: unknown, decimal: DecimalMark = '.'): number | undefined {
  if (cell === null || cell === undefined) return NaN;
  if (typeof cell === 'number') return Number.isFinite(cell) ? cell : undefined;
  if (typeof cell === 'boolean') return cell ? 1 : 0;
  if (typeof cell === 'string') {
    const v = decimal === ',' ? parseCommaNumberText(cell) : parseNumberText(cell);
    if (v === v) return v;
    return isMissingText(cell) ? NaN : undefined;
  }
  return undefined;
}
