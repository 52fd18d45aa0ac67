/**
 * What a user reads off a fitted polynomial ODE: the equation in words and numbers, and the
 * quantities of the classical model it reduces to.
 *
 * Interpretation is decided by which polynomial coefficients c_k of dx/dτ = Σ c_k x^k + (inputs,
 * harmonics) are non-zero (sparse selection may switch some off):
 * - level, only c1:               exponential growth, rate r = c1, doubling time ln 2 / r;
 * - level, c2 = c3 = 0:           forced linear relaxation dy/dτ = a + b·y + Σ c_j u_j:
 *                                 equilibrium −(a + Σ c_j u_j)/b, time constant −1/b, gain −c_j/b
 *                                 (first-order lag; Ljung, "System Identification", 2nd ed. 1999,
 *                                 §2.1, section from memory);
 * - level, c0 = c3 = 0, c2 ≠ 0:   logistic dy/dτ = r·y − (r/K)·y²: r = c1, K = −c1/c2 (Verhulst
 *                                 1838; Pearl & Reed 1920); inflection when y = K/2, at
 *                                 τ* = τ_0 + ln((K − y_0)/y_0)/r from the closed form
 *                                 y(τ) = K / (1 + ((K − y_0)/y_0)·e^{−r(τ−τ_0)});
 * - level, otherwise:             equilibria (real roots) with linear stability f'(x*) < 0;
 *                                 capacity K = the largest stable equilibrium, rate −f'(K);
 * - cumulative, c3 = 0:           Bass diffusion dX/dτ = p·m + (q − p)·X − (q/m)·X² (Bass 1969):
 *                                 m = the positive root of c0 + c1·m + c2·m² = 0, p = c0/m,
 *                                 q = −c2·m; peak of per-period adoption at
 *                                 t* = ln(q/p)/(p + q) after launch, peak rate m(p + q)²/(4q)
 *                                 (Bass 1969, eqs. for t* and S(t*));
 * - cumulative, otherwise:        equilibria with stability.
 * Rates are per base period; with `periodsPerYear` known they are also given per year.
 * Equilibria are those of the state polynomial with inputs and seasonal terms at zero.
 */
import { decimalYear, formatTime, stepTime } from '../data/calendar.js';
import type { Series } from '../data/series.js';
import type { OdeSpec } from './ode.js';
import { equilibria } from './ode-roots.js';
import type { Derived } from './structure.js';

/** The classical reading of a fitted ODE, from θ alone. */
export interface OdeReading {
  kind: 'exponential' | 'linear' | 'logistic' | 'polynomial' | 'bass' | 'cumulative-polynomial' | 'none';
  /** Polynomial coefficients c0…c3 of the state. */
  poly: number[];
  quantities: Derived[];
  warnings: string[];
  /** Short parenthetical for `describe`. */
  headline: string;
}

/** Context from the series for date- and data-dependent quantities. */
export interface OdeContext {
  series: Series;
  /** State x_t at each observation. */
  state: Float64Array;
  dt: number;
}

/** 3 significant digits, exponent form outside [1e-3, 1e6). */
export function formatNumber(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e6) return String(Number(v.toPrecision(3)));
  return v.toExponential(2).replace('e+', 'e');
}

/** A size in words for large numbers: `197 million`, `1.2 billion`. */
export function formatQuantity(v: number): string {
  const a = Math.abs(v);
  if (a >= 1e9 && a < 1e15) return `${Number((v / 1e9).toPrecision(3))} billion`;
  if (a >= 1e6 && a < 1e9) return `${Number((v / 1e6).toPrecision(3))} million`;
  return formatNumber(v);
}

function perYear(spec: OdeSpec, ratePerPeriod: number): string {
  const ppy = spec.periodsPerYear;
  if (ppy === null) return `${formatNumber(ratePerPeriod)} per period`;
  if (ppy === 1) return `${formatNumber(ratePerPeriod)} per year`;
  return `${formatNumber(ratePerPeriod)} per period (${formatNumber(ratePerPeriod * ppy)} per year)`;
}

function rateItems(spec: OdeSpec, name: string, rate: number, note?: string): Derived[] {
  const items: Derived[] = [{ name, value: rate, unit: 'per period', ...(note ? { note } : {}) }];
  if (spec.periodsPerYear !== null) items.push({ name: `${name} per year`, value: rate * spec.periodsPerYear, unit: 'per year' });
  return items;
}

function durationItems(spec: OdeSpec, name: string, periods: number, note?: string): Derived[] {
  const items: Derived[] = [{ name, value: periods, unit: 'periods', ...(note ? { note } : {}) }];
  if (spec.periodsPerYear !== null && spec.periodsPerYear !== 1) items.push({ name: `${name} in years`, value: periods / spec.periodsPerYear, unit: 'years' });
  return items;
}

/** Interprets θ (see module comment). */
export function readOde(spec: OdeSpec, terms: string[], theta: Float64Array): OdeReading {
  const poly = [0, 0, 0, 0];
  spec.powers.forEach((p, k) => (poly[p] = theta[k]));
  const [c0, c1, c2, c3] = poly;
  const np = spec.powers.length;
  const inputCoef = spec.inputs.map((_, j) => theta[np + j]);
  const forced = inputCoef.some((c) => c !== 0) || theta.slice(np + spec.inputs.length).some((c) => c !== 0);
  const atZero = forced ? 'with inputs and seasonal terms at zero' : undefined;
  const q: Derived[] = [];
  const warnings: string[] = [];
  if (poly.every((c) => c === 0) && !forced) return { kind: 'none', poly, quantities: [], warnings: ['every coefficient is zero: the state does not move'], headline: '' };

  if (spec.state === 'level') {
    if (c0 === 0 && c2 === 0 && c3 === 0 && c1 !== 0 && !forced) {
      q.push(...rateItems(spec, 'growth rate r', c1));
      q.push(...durationItems(spec, c1 > 0 ? 'doubling time' : 'half-life', Math.LN2 / Math.abs(c1), 'ln 2 / |r|'));
      q.push({ name: 'stable', value: c1 < 0 });
      return { kind: 'exponential', poly, quantities: q, warnings, headline: `r = ${perYear(spec, c1)}` };
    }
    if (c2 === 0 && c3 === 0 && c1 !== 0) {
      const b = c1;
      q.push({ name: 'equilibrium', value: -c0 / b, ...(spec.inputs.length > 0 ? { note: 'inputs at zero' } : {}) });
      q.push(...durationItems(spec, 'time constant', -1 / b, '−1/b'));
      spec.inputs.forEach((name, j) => q.push({ name: `gain ${name}`, value: -inputCoef[j] / b, note: 'steady-state change of y per unit of the input, −c/b' }));
      q.push({ name: 'stable', value: b < 0 });
      if (b >= 0) warnings.push(`no stable equilibrium: the coefficient of y is ${formatNumber(b)} ≥ 0, so the level runs away instead of relaxing`);
      const gains = spec.inputs.map((name, j) => `gain(${name}) = ${formatNumber(-inputCoef[j] / b)}`);
      const headline = [`equilibrium = ${formatQuantity(-c0 / b)}`, `time constant = ${formatNumber(-1 / b)} periods`, ...gains].join(', ');
      return { kind: 'linear', poly, quantities: q, warnings, headline };
    }
    if (c0 === 0 && c3 === 0 && c2 !== 0) {
      const r = c1;
      const K = -c1 / c2;
      q.push({ name: 'capacity K', value: K, ...(atZero ? { note: atZero } : {}) });
      q.push(...rateItems(spec, 'rate r', r));
      q.push({ name: 'inflection level', value: K / 2, note: 'K/2' });
      q.push({ name: 'stable', value: r > 0 && K > 0, note: 'capacity attracts when r > 0 and K > 0' });
      if (!(K > 0)) warnings.push(`implausible capacity: K = ${formatNumber(K)} is not positive`);
      if (!(r > 0)) warnings.push(`implausible rate: r = ${formatNumber(r)} is not positive, so the level does not grow towards K`);
      return { kind: 'logistic', poly, quantities: q, warnings, headline: `K = ${formatQuantity(K)}, r = ${perYear(spec, r)}` };
    }
    const eq = equilibria(poly);
    eq.forEach((e, i) => q.push({ name: `equilibrium ${i + 1}`, value: e.value, note: `${e.stable ? 'stable' : 'unstable'} (slope ${formatNumber(e.slope)})${atZero ? `, ${atZero}` : ''}` }));
    const stable = eq.filter((e) => e.stable);
    const cap = stable.length > 0 ? stable[stable.length - 1] : undefined;
    if (cap) {
      q.push({ name: 'capacity K', value: cap.value, note: 'largest stable equilibrium' });
      q.push(...rateItems(spec, 'rate at capacity', -cap.slope, '−f′(K)'));
      if (!(cap.value > 0)) warnings.push(`implausible capacity: the largest stable equilibrium is ${formatNumber(cap.value)}`);
    } else {
      warnings.push('no stable equilibrium: the fitted level grows or falls without bound');
    }
    q.push({ name: 'stable', value: cap !== undefined });
    const headline = eq.length > 0 ? `equilibria ${eq.map((e) => `${formatQuantity(e.value)} (${e.stable ? 'stable' : 'unstable'})`).join(', ')}` : 'no equilibrium';
    return { kind: 'polynomial', poly, quantities: q, warnings, headline };
  }

  // Cumulative state.
  if (c3 === 0 && (c2 < 0 || (c2 === 0 && c1 < 0))) {
    let m: number;
    if (c2 === 0) m = -c0 / c1;
    else {
      const roots = equilibria(poly).map((e) => e.value);
      m = roots.length > 0 ? roots[roots.length - 1] : Number.NaN;
    }
    if (Number.isFinite(m) && m > 0) {
      const p = c0 / m;
      const qq = -c2 * m;
      q.push({ name: 'market size m', value: m, ...(atZero ? { note: atZero } : {}) });
      q.push(...rateItems(spec, 'innovation p', p));
      q.push(...rateItems(spec, 'imitation q', qq));
      const peak = qq > p && p > 0 ? Math.log(qq / p) / (p + qq) : 0;
      q.push(...durationItems(spec, 'peak time since launch', peak, qq > p ? 'ln(q/p)/(p+q)' : 'q ≤ p: adoption is largest at launch'));
      const peakRate = qq > p ? (m * (p + qq) ** 2) / (4 * qq) : p * m;
      q.push({ name: 'peak adoption per period', value: peakRate, note: qq > p ? 'm(p+q)²/(4q)' : 'p·m at launch' });
      if (!(p > 0)) warnings.push(`implausible innovation coefficient: p = ${formatNumber(p)} is not positive`);
      if (qq < 0) warnings.push(`implausible imitation coefficient: q = ${formatNumber(qq)} is negative`);
      return { kind: 'bass', poly, quantities: q, warnings, headline: `X = cumulative y; p = ${formatNumber(p)}, q = ${formatNumber(qq)}, m = ${formatQuantity(m)}` };
    }
    warnings.push('no positive market size: c0 + c1·m + c2·m² = 0 has no positive root, so this is not a diffusion curve');
  } else if (c3 === 0 && c2 >= 0 && !(c2 === 0 && c1 === 0 && c0 === 0)) {
    warnings.push('no saturation: the X² coefficient is not negative, so cumulative adoption never levels off');
  }
  const eq = equilibria(poly);
  eq.forEach((e, i) => q.push({ name: `equilibrium ${i + 1}`, value: e.value, note: `${e.stable ? 'stable' : 'unstable'} (slope ${formatNumber(e.slope)})` }));
  const headline = eq.length > 0 ? `X = cumulative y; equilibria ${eq.map((e) => formatQuantity(e.value)).join(', ')}` : 'X = cumulative y';
  return { kind: 'cumulative-polynomial', poly, quantities: q, warnings, headline };
}

/** The fitted equation, e.g. `dy/dt = 0.0313·y − 1.59e-10·y²   (K = 197 million, r = 0.0313 per year)`. */
export function odeSummary(spec: OdeSpec, terms: string[], theta: Float64Array, se?: Float64Array): string {
  const symbol = spec.state === 'level' ? 'y' : 'X';
  const rates = spec.rateInputs ?? [];
  const rateAt = terms.length - rates.length;
  const sum = (from: number, to: number, name: (k: number) => string): string => {
    const pieces: string[] = [];
    for (let k = from; k < to; k++) {
      const c = theta[k];
      if (c === 0) continue;
      const pretty = name(k).replace('^2', '²').replace('^3', '³');
      const mag = se ? `(${formatNumber(Math.abs(c))} ± ${formatNumber(se[k])})` : formatNumber(Math.abs(c));
      const term = pretty === '1' ? mag : `${mag}·${pretty}`;
      pieces.push(pieces.length === 0 ? (c < 0 ? `−${term}` : term) : `${c < 0 ? '−' : '+'} ${term}`);
    }
    return pieces.join(' ');
  };
  let rhs: string;
  if (rates.length === 0) {
    rhs = sum(0, terms.length, (k) => terms[k]) || '0';
  } else {
    // The law scaled by the rate inputs: (1 + Σ β_j·w_j)·(Σ c_p x^p) + the rest.
    const np = spec.powers.length;
    // A sum continued after a first summand: `+ a…` or `− a…`.
    const then = (text: string) => (text.startsWith('−') ? `− ${text.slice(1)}` : `+ ${text}`);
    const beta = sum(rateAt, terms.length, (k) => rates[k - rateAt]);
    const law = sum(0, np, (k) => terms[k]) || '0';
    const rest = sum(np, rateAt, (k) => terms[k]);
    rhs = `(1${beta ? ` ${then(beta)}` : ''})·(${law})${rest ? ` ${then(rest)}` : ''}`;
  }
  const reading = readOde(spec, terms, theta);
  const note = reading.headline ? `   (${reading.headline})` : '';
  return `d${symbol}/dt = ${rhs}${note}`;
}

/** A time τ base periods after the first time stamp, as a readable date and a decimal year. */
export function dateAt(series: Series, periods: number): { label: string; decimal: number } | null {
  if (!Number.isFinite(periods) || Math.abs(periods) > 1e6) return null;
  const f = series.frequency;
  const t0 = series.time[0];
  if (f === 'index') return { label: formatNumber(t0 + periods), decimal: t0 + periods };
  const lo = Math.floor(periods);
  const a = stepTime(t0, f, lo);
  const b = stepTime(t0, f, lo + 1);
  const decimal = decimalYear(a, f) + (periods - lo) * (decimalYear(b, f) - decimalYear(a, f));
  return { label: formatTime(stepTime(t0, f, Math.round(periods)), f), decimal };
}

/** Derived quantities of a fitted ODE on its series (see module comment). */
export function odeDerived(spec: OdeSpec, terms: string[], theta: Float64Array, ctx: OdeContext): Derived[] {
  const reading = readOde(spec, terms, theta);
  const out: Derived[] = [
    { name: 'state', value: spec.state === 'level' ? 'level' : 'cumulative sum' },
    { name: 'sampling interval', value: ctx.dt, unit: 'periods' },
    ...reading.quantities,
  ];
  const warnings = [...reading.warnings];
  (spec.rateInputs ?? []).forEach((name, j) => {
    out.push({
      name: `rate effect ${name}`,
      value: theta[theta.length - (spec.rateInputs as string[]).length + j],
      unit: `relative change of the rate per unit of ${name}`,
      note: 'the law is scaled by 1 + β·input (generalized Bass model mapping function)',
    });
    out.push({ name: `delay ${name}`, value: 0, unit: 'periods' });
  });
  const x = ctx.state;
  const n = x.length;
  const xMax = x.reduce((a, b) => Math.max(a, b), -Infinity);
  const get = (name: string) => reading.quantities.find((d) => d.name === name)?.value as number | undefined;
  if (reading.kind === 'logistic') {
    const K = get('capacity K') as number;
    const r = get('rate r') as number;
    if (K > 0 && xMax > K) warnings.push(`implausible capacity: K = ${formatNumber(K)} is below the largest observed level ${formatNumber(xMax)}`);
    const y0 = x[0];
    if (K > 0 && r > 0 && y0 > 0 && y0 < K) {
      const tau = Math.log((K - y0) / y0) / r;
      const at = dateAt(ctx.series, tau);
      if (at) out.push({ name: 'inflection time', value: at.label, note: `decimal year ${at.decimal.toFixed(1)}; closed-form logistic through the first observation` });
    }
  }
  if (reading.kind === 'linear' && spec.inputs.length > 0) {
    const b = reading.poly[1];
    let level = reading.poly[0];
    spec.inputs.forEach((name, j) => {
      const u = ctx.series.inputs.find((s) => s.name === name)?.values;
      if (u && u.length > 0) level += theta[spec.powers.length + j] * (u.reduce((a, c) => a + c, 0) / u.length);
    });
    out.push({ name: 'equilibrium at mean inputs', value: -level / b });
  }
  if (reading.kind === 'bass') {
    const m = get('market size m') as number;
    const p = get('innovation p') as number;
    const q = get('imitation q') as number;
    const peak = get('peak time since launch') as number;
    if (n > 0 && x[n - 1] > 1.02 * m) warnings.push(`implausible market size: m = ${formatNumber(m)} is more than 2 % below the ${formatNumber(x[n - 1])} already adopted`);
    out.push({ name: 'share adopted', value: n > 0 ? x[n - 1] / m : 0, note: 'cumulative so far / m' });
    // Launch time: where the Bass curve F(t) = (1 − e^{−(p+q)t})/(1 + (q/p)e^{−(p+q)t}) equals
    // X_0/m, i.e. t_0 = −ln((1 − F)/(1 + F·q/p))/(p + q) before the start of the first period.
    // On a later window of the series the cumulative level at its start includes what came before.
    const F0 = (spec.initialCumulative + (ctx.series.before?.sum ?? 0)) / m;
    if (p > 0 && q >= 0 && F0 >= 0 && F0 < 1) {
      const elapsed = -Math.log((1 - F0) / (1 + (F0 * q) / p)) / (p + q);
      const at = dateAt(ctx.series, peak - elapsed);
      if (at) out.push({ name: 'peak date', value: at.label, note: `decimal year ${at.decimal.toFixed(2)}; launch ${formatNumber(elapsed)} periods before the first period` });
    }
  }
  for (const w of warnings) out.push({ name: 'warning', value: w });
  return out;
}
