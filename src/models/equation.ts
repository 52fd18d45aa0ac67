/**
 * Text of fitted linear equations, shared by the families whose structure is one regression
 * row: `lhs = c₁·term₁ + c₂·term₂ … + e[t]`, each coefficient with its standard error in
 * parentheses when given, the constant term written without a factor.
 */

/** A coefficient in four significant digits, or in exponent form outside [1e-3, 1e6). */
export function formatCoefficient(x: number): string {
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e6) return String(Number(x.toPrecision(4)));
  return x.toExponential(3);
}

/**
 * `lhs = … + e[t]` with one summand per term; `constName` names the term written as a bare
 * number. No terms: `lhs = e[t]`.
 * @example linearEquation('Δy[t]', ['const', 'Δy[t-1]'], [2, -0.5]) === 'Δy[t] = 2 − 0.5·Δy[t-1] + e[t]'
 */
export function linearEquation(lhs: string, terms: readonly string[], theta: ArrayLike<number>, se?: ArrayLike<number>, constName = 'const'): string {
  if (terms.length === 0) return `${lhs} = e[t]`;
  const parts: string[] = [];
  for (let j = 0; j < terms.length; j++) {
    const c = theta[j];
    const mag = formatCoefficient(Math.abs(c)) + (se ? ` (±${formatCoefficient(se[j])})` : '');
    const body = terms[j] === constName ? mag : `${mag}·${terms[j]}`;
    parts.push(j === 0 ? (c < 0 ? `−${body}` : body) : `${c < 0 ? '−' : '+'} ${body}`);
  }
  return `${lhs} = ${parts.join(' ')} + e[t]`;
}
