/**
 * Numbers in text tables (terminal summary, HTML tables): six significant digits, so month-to-
 * month movement stays visible (412.37 and 412.91 read differently), trailing zeros dropped;
 * exponent form outside [1e-4, 1e9); no grouping separators, no locale.
 * @example formatTableNumber(1234.5678) === '1234.57'
 */
export function formatTableNumber(x: number): string {
  if (Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-4 && a < 1e9) return String(Number(x.toPrecision(6)));
  return x.toExponential(4);
}
