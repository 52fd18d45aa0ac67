/**
 * Frequency inference from the steps between consecutive distinct time stamps.
 *
 * Each step is read in its natural unit: whole months when both stamps fall on the same day of
 * the month and time of day (or both on a month's last day), otherwise whole weeks, days or
 * hours of elapsed time. The most common step names the base period: 12·k months → yearly,
 * 3·k months → quarterly, other months → monthly, 7·k days → weekly, days → daily, hours →
 * hourly; an index steps by 1. Every step must then be a whole number of base periods, else
 * the data mix frequencies and are refused. The evidence (how many steps of each length) is
 * returned for the report. Series with a single point take the frequency their time form
 * implies (a `YYYY-MM` cell is monthly).
 */
import { periodName, periodStart, periodsBetween, type Frequency } from './calendar.js';
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
  /** Number of steps examined (between consecutive distinct stamps, within each series). */
  steps: number;
  /** How many steps were k periods long, by k ascending. */
  counts: { periods: number; count: number }[];
  /** E.g. "monthly: 737 of 740 steps are 1 month; 2 steps of 2 months; 1 step of 4 months". */
  text: string;
}

/** A step: a positive number of elapsed milliseconds, or minus a number of whole months. */
type Step = number;

function isMonthEnd(t: number): boolean {
  return new Date(t + DAY).getUTCDate() === 1;
}

function classify(a: number, b: number): Step {
  // No month is shorter than 28 days: shorter steps are elapsed time (the common daily case).
  if (b - a < 28 * DAY) return b - a;
  const da = new Date(a);
  const db = new Date(b);
  if ((a - b) % DAY === 0 && (da.getUTCDate() === db.getUTCDate() || (isMonthEnd(a) && isMonthEnd(b)))) {
    const months = (db.getUTCFullYear() - da.getUTCFullYear()) * 12 + db.getUTCMonth() - da.getUTCMonth();
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

export function inferFrequency(runs: readonly StampRun[], kind: TimeKind, where: { file: string; column: string }): FrequencyEvidence {
  if (kind === 'index') return evidenceFor('index', runs, (a, b) => b - a);
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
    return { frequency: f, steps: 0, counts: [], text: `${f}: a single time stamp, frequency taken from its form` };
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
  // Every step must be a whole number of base periods.
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
          hint: 'fix the stray time stamps, or pass --freq to aggregate to a coarser frequency',
        });
      }
    }
  }
  return evidenceFor(base, runs, (a, b) => wholePeriods(a, b, classify(a, b), base));
}

/**
 * Evidence for a given (e.g. user-chosen) frequency, counting steps between period starts.
 * `periodsOf` measures one step in periods.
 */
function evidenceFor(f: Frequency, runs: readonly StampRun[], periodsOf: (a: number, b: number) => number): FrequencyEvidence {
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
  return { frequency: f, steps, counts: sorted, text: evidenceText(f, steps, sorted) };
}

function evidenceText(f: Frequency, steps: number, counts: { periods: number; count: number }[]): string {
  if (steps === 0) return `${f}: a single time stamp`;
  const ones = counts.find((c) => c.periods === 1)?.count ?? 0;
  const parts = [`${f}: ${ones} of ${steps} step${steps === 1 ? '' : 's'} ${steps === 1 ? 'is' : 'are'} 1 ${periodName(f)}`];
  for (const c of counts) {
    if (c.periods === 1) continue;
    parts.push(`${c.count} step${c.count === 1 ? '' : 's'} of ${c.periods} ${periodName(f, c.periods)}`);
  }
  return parts.join('; ');
}

/** Evidence of the steps, measured in periods of f, between the period starts of the stamps. */
export function evidenceAt(f: Frequency, runs: readonly StampRun[]): FrequencyEvidence {
  return evidenceFor(f, runs, (a, b) => periodsBetween(periodStart(a, f), periodStart(b, f), f));
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

function isoText(t: number): string {
  const s = new Date(t).toISOString();
  return s.endsWith('T00:00:00.000Z') ? s.slice(0, 10) : s.slice(0, 16);
}

