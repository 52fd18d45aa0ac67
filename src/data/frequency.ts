/**
 * Frequency inference from the steps between consecutive distinct time stamps.
 *
 * Each step is read in its natural unit: whole months when both stamps fall on the same day of
 * the month and time of day (or both on a month's last day), otherwise whole weeks, days or
 * hours of elapsed time. The most common step names the base period: 12·k months → yearly,
 * 3·k months → quarterly, other months → monthly, 7·k days → weekly, days → daily, hours →
 * hourly; an index steps by 1. Every step must then be a whole number of base periods, else
 * the data mix frequencies and are refused.
 *
 * The step: the most common step, in base periods, is the series' step k (a decennial census
 * is yearly with k = 10, a fortnightly series weekly with k = 2). Every step must be a multiple
 * of k (a longer step is k·m periods: m − 1 missing observations); a step that is not, such as
 * a 5-year step among 10-year ones, is refused with its row. The evidence (how many steps of
 * each length) is returned for the report. Series with a single point take the frequency their
 * time form implies (a `YYYY-MM` cell is monthly).
 *
 * With a target frequency (`--freq`), stamps that are not whole base periods apart are allowed:
 * they are folded into the target's periods later (regularise.ts), and the step is 1.
 */
import { cadenceName, periodName, periodStart, periodsBetween, utcParts, type Frequency } from './calendar.js';
import { kindFrequency, type TimeKind } from './dates.js';
import { DataError } from './errors.js';

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const WEEK = 7 * DAY;

/** Sorted distinct time stamps of one series, with the file row of each (for messages). */
export interface StampRun {
  name: string;
  times: Float64Array;
  rows: ArrayLike<number>;
}

export interface FrequencyEvidence {
  frequency: Frequency;
  /** Base periods between consecutive observations (the most common step; 1 for most data). */
  step: number;
  /** Number of steps examined (between consecutive distinct stamps, within each series). */
  steps: number;
  /** How many steps were k base periods long, by k ascending (0: less than one period). */
  counts: { periods: number; count: number }[];
  /** E.g. "monthly: 737 of 740 steps are 1 month; 2 steps of 2 months; 1 step of 4 months". */
  text: string;
}

/** What the inference may take for granted. */
export interface InferOptions {
  /** The frequency the data will be folded into (`--freq`): irregular steps are then allowed. */
  target?: Frequency;
  /**
   * The frequency to take when every series holds a single time stamp (no step to read) and each
   * stamp is the start of its period of this frequency: the new rows of a saved model, one month
   * written as a date such as `2025-01-01`, are that model's month. Only a frequency at least as
   * coarse as the stamps' form is taken; otherwise the form decides, as without it.
   */
  single?: Frequency;
}

/** Calendar frequencies from the finest to the coarsest (for `InferOptions.single`). */
const COARSENESS: readonly Frequency[] = ['hourly', 'daily', 'weekly', 'monthly', 'quarterly', 'yearly'];

/** A step: a positive number of elapsed milliseconds, or minus a number of whole months. */
type Step = number;

function classify(a: number, b: number): Step {
  // No month is shorter than 28 days: shorter steps are elapsed time (the common daily case).
  if (b - a < 28 * DAY) return b - a;
  const da = utcParts(a);
  const db = utcParts(b);
  if ((a - b) % DAY === 0 && (da.date === db.date || (da.monthEnd && db.monthEnd))) {
    const months = (db.year - da.year) * 12 + db.month - da.month;
    if (months > 0) return -months;
  }
  return b - a;
}

function baseOf(step: Step): Frequency | null {
  if (step < 0) return -step % 12 === 0 ? 'yearly' : -step % 3 === 0 ? 'quarterly' : 'monthly';
  if (step % WEEK === 0) return 'weekly';
  if (step % DAY === 0) return 'daily';
  if (step % HOUR === 0) return 'hourly';
  return null;
}

const MONTHS_PER: Partial<Record<Frequency, number>> = { monthly: 1, quarterly: 3, yearly: 12 };
const MS_PER: Partial<Record<Frequency, number>> = { hourly: HOUR, daily: DAY, weekly: WEEK };

/** Whole periods of f in the step a→b, or 0 if the step is not a whole number of them. */
function wholePeriods(a: number, b: number, step: Step, f: Frequency): number {
  const months = MONTHS_PER[f];
  if (months !== undefined) return step < 0 && -step % months === 0 ? -step / months : 0;
  const ms = MS_PER[f] as number;
  return (b - a) % ms === 0 ? (b - a) / ms : 0;
}

export function inferFrequency(runs: readonly StampRun[], kind: TimeKind, where: { file: string; column: string }, options: InferOptions = {}): FrequencyEvidence {
  if (kind === 'index') return withStep('index', runs, (a, b) => b - a, options.target === undefined, where);
  const tally = new Map<Step, number>();
  let steps = 0;
  for (const run of runs) {
    const t = run.times;
    let last = NaN;
    let lastCount = 0;
    for (let i = 1; i < t.length; i++) {
      const s = classify(t[i - 1], t[i]);
      if (s === last) lastCount++;
      else {
        if (lastCount > 0) tally.set(last, (tally.get(last) ?? 0) + lastCount);
        last = s;
        lastCount = 1;
      }
      steps++;
    }
    if (lastCount > 0) tally.set(last, (tally.get(last) ?? 0) + lastCount);
  }
  if (steps === 0) {
    const f = kindFrequency(kind);
    const single = options.single;
    if (single !== undefined && single !== f && COARSENESS.indexOf(single) > COARSENESS.indexOf(f) && COARSENESS.indexOf(f) >= 0) {
      const fits = runs.every((run) => Array.from(run.times).every((t) => periodStart(t, single) === t));
      if (fits) return { frequency: single, step: 1, steps: 0, counts: [], text: `${single}: a single time stamp, on the start of a ${periodName(single)}, as asked` };
    }
    return { frequency: f, step: 1, steps: 0, counts: [], text: `${f}: a single time stamp, frequency taken from its form` };
  }
  let mode: Step = 0;
  let modeCount = 0;
  for (const [step, count] of tally) if (count > modeCount) [mode, modeCount] = [step, count];
  const base = baseOf(mode);
  if (base === null) {
    throw new DataError('frequency-unsupported', 'the time stamps are closer than certa supports', {
      file: where.file,
      column: where.column,
      found: `most steps are ${formatMs(mode)}`,
      expected: 'hourly, daily, weekly, monthly, quarterly or yearly stamps',
    });
  }
  if (options.target === undefined) return strictEvidence(runs, base, mode, where);
  try {
    return strictEvidence(runs, base, mode, where);
  } catch (e) {
    if (!(e instanceof DataError)) throw e;
  }
  // Folded into the target's periods later: steps between period starts, and a step of 1.
  const periods = (a: number, b: number) => periodsBetween(periodStart(a, base), periodStart(b, base), base);
  const evidence = evidenceFor(base, 1, runs, periods);
  const irregular = countIrregular(runs, base);
  if (irregular > 0) evidence.text += `; ${irregular} step${irregular === 1 ? ' is' : 's are'} not whole ${periodName(base, 2)} (folded by --freq)`;
  return evidence;
}

/** Every step a whole number of base periods, and a multiple of the step; else a DataError. */
function strictEvidence(runs: readonly StampRun[], base: Frequency, mode: Step, where: { file: string; column: string }): FrequencyEvidence {
  for (const run of runs) {
    const t = run.times;
    for (let i = 1; i < t.length; i++) {
      if (wholePeriods(t[i - 1], t[i], classify(t[i - 1], t[i]), base) === 0) {
        throw new DataError('frequency-mixed', `the time stamps mix frequencies: most steps are ${describeStep(mode)}, this one is not a whole number of ${periodName(base, 2)}`, {
          file: where.file,
          row: run.rows[i],
          column: where.column,
          found: `${isoText(t[i - 1])} → ${isoText(t[i])}`,
          expected: `steps of whole ${periodName(base, 2)} (${base})`,
          hint: `correct the stray time stamps, or pass --freq ${base} to combine the rows within each ${periodName(base)} (by --aggregate, default sum)`,
        });
      }
    }
  }
  return withStep(base, runs, (a, b) => wholePeriods(a, b, classify(a, b), base), true, where);
}

/**
 * Evidence with the step: the most common step in periods (`periodsOf`) is the step k, and with
 * `strict` every step must be a multiple of it.
 */
function withStep(f: Frequency, runs: readonly StampRun[], periodsOf: (a: number, b: number) => number, strict: boolean, where: { file: string; column: string }): FrequencyEvidence {
  const ones = evidenceFor(f, 1, runs, periodsOf);
  if (!strict || ones.steps === 0) return ones;
  let step = 1;
  let best = 0;
  for (const c of ones.counts) if (c.count > best) [step, best] = [c.periods, c.count];
  if (step <= 1) return ones;
  for (const run of runs) {
    const t = run.times;
    for (let i = 1; i < t.length; i++) {
      const k = periodsOf(t[i - 1], t[i]);
      if (k % step === 0) continue;
      throw new DataError('step-irregular', `the time stamps come every ${step} ${periodName(f, step)}, but this step is ${k} ${periodName(f, k)}`, {
        file: where.file,
        row: run.rows[i],
        column: where.column,
        found: `${stampText(f, t[i - 1])} → ${stampText(f, t[i])}`,
        expected: `steps of ${step} ${periodName(f, step)} or a multiple of ${step} (missing observations)`,
        hint: `correct or remove the time stamp at row ${run.rows[i]}: the other steps are multiples of ${step} ${periodName(f, step)}`,
      });
    }
  }
  return evidenceFor(f, step, runs, periodsOf);
}

/** Steps that are not a whole number of base periods. */
function countIrregular(runs: readonly StampRun[], base: Frequency): number {
  let n = 0;
  for (const run of runs) {
    const t = run.times;
    for (let i = 1; i < t.length; i++) if (wholePeriods(t[i - 1], t[i], classify(t[i - 1], t[i]), base) === 0) n++;
  }
  return n;
}

/**
 * Evidence for a frequency and step, counting the length of each step in periods with
 * `periodsOf`.
 */
function evidenceFor(f: Frequency, step: number, runs: readonly StampRun[], periodsOf: (a: number, b: number) => number): FrequencyEvidence {
  const counts = new Map<number, number>();
  let steps = 0;
  for (const run of runs) {
    const t = run.times;
    for (let i = 1; i < t.length; i++) {
      const k = periodsOf(t[i - 1], t[i]);
      counts.set(k, (counts.get(k) ?? 0) + 1);
      steps++;
    }
  }
  const sorted = [...counts.entries()].sort((a, b) => a[0] - b[0]).map(([periods, count]) => ({ periods, count }));
  return { frequency: f, step, steps, counts: sorted, text: evidenceText(f, step, steps, sorted) };
}

function evidenceText(f: Frequency, step: number, steps: number, counts: { periods: number; count: number }[]): string {
  if (steps === 0) return `${f}: a single time stamp`;
  const regular = counts.find((c) => c.periods === step)?.count ?? 0;
  const parts = [`${cadenceName(f, step)}: ${regular} of ${steps} step${steps === 1 ? '' : 's'} ${steps === 1 ? 'is' : 'are'} ${step} ${periodName(f, step)}`];
  for (const c of counts) {
    if (c.periods === step) continue;
    if (c.periods === 0) parts.push(`${c.count} step${c.count === 1 ? '' : 's'} within one ${periodName(f)}`);
    else parts.push(`${c.count} step${c.count === 1 ? '' : 's'} of ${c.periods} ${periodName(f, c.periods)}`);
  }
  return parts.join('; ');
}

function describeStep(s: Step): string {
  if (s < 0) return s === -1 ? '1 month' : `${-s} months`;
  return formatMs(s);
}

function formatMs(ms: number): string {
  if (ms % WEEK === 0) return `${ms / WEEK} week${ms === WEEK ? '' : 's'}`;
  if (ms % DAY === 0) return `${ms / DAY} day${ms === DAY ? '' : 's'}`;
  if (ms % HOUR === 0) return `${ms / HOUR} hour${ms === HOUR ? '' : 's'}`;
  if (ms % 60_000 === 0) return `${ms / 60_000} minute${ms === 60_000 ? '' : 's'}`;
  return `${ms / 1000} seconds`;
}

function stampText(f: Frequency, t: number): string {
  return f === 'index' ? String(t) : isoText(t);
}

function isoText(t: number): string {
  const s = new Date(t).toISOString();
  return s.endsWith('T00:00:00.000Z') ? s.slice(0, 10) : s.slice(0, 16);
}

