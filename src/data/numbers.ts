/**
 * Number cells and missing markers.
 *
 * A number is a plain decimal with optional sign and exponent (`12`, `-3.5`, `.5`, `1.2e-3`).
 * Thousands separators (`,`) are accepted only where they cannot be a decimal comma: with a
 * decimal point after them (`1,234.5`) or with two or more groups (`1,234,567`). A single group
 * and no point (`1,234`) could mean 1234 or 1.234, so it is refused with a message. Decimal
 * commas (`3,5`) are not read. Hexadecimal, `Infinity` and numbers out of double range are not
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

/** Why a non-missing text is not a number, for the "expected" part of a message. */
export function numberExpectation(s: string): string {
  const t = s.trim();
  if (/^[+-]?\d{1,3},\d{3}$/.test(t)) return `a number; "${t}" could be thousands or a decimal comma, write it without the comma`;
  if (/^[+-]?\d+,\d+$/.test(t)) return 'a number with "." as the decimal point';
  return 'a number (or a missing marker: empty, NA, NaN, null, -, ..)';
}

/** Number from any cell kind; NaN for missing; `undefined` when the cell is not a number. */
export function cellNumber(cell: unknown): number | undefined {
  if (cell === null || cell === undefined) return NaN;
  if (typeof cell === 'number') return Number.isFinite(cell) ? cell : undefined;
  if (typeof cell === 'boolean') return cell ? 1 : 0;
  if (typeof cell === 'string') {
    const v = parseNumberText(cell);
    if (v === v) return v;
    return isMissingText(cell) ? NaN : undefined;
  }
  return undefined;
}
