/**
 * The guided search over the ARX family's input choices: each input its own delay
 * d = 0…maxDelay and number of lags q = 0…maxInputLags (q = 0: the input is left out).
 *
 * With J inputs the full product has (maxInputLags·(maxDelay + 1) + 1)^J choices per base
 * structure (49 with two inputs at the default bounds, 343 with three), too many to fit for
 * every base. The search is guided instead, every candidate scored by the ranking criterion on
 * the search's one common sample:
 * 1. Start. For each scale (transform and differencing) the delay of each input is read off the
 *    prewhitened cross-correlation of the input with the target on that scale
 *    (select/prewhiten.ts: Box & Jenkins transfer-function identification): one lag at the
 *    first significant delay, or the input left out when no lag is significant. Every base is
 *    scored with this start (the bases without inputs are in the static grid already).
 * 2. Stepwise. From the better of the start and no inputs, for the `STEPWISE_BASES` best bases
 *    so far: a steepest-descent search that tries, for every input, each change of one term —
 *    one lag more at either end, one fewer at either end (the last one leaving the input out),
 *    the whole window shifted one period either way, and for a left-out input one lag at each
 *    allowed delay — and moves to the best of them while it lowers the criterion (stepwise
 *    selection, e.g. Miller, "Subset Selection in Regression", 2nd ed. 2002, §3.2, where the
 *    score is an information criterion instead of an F test).
 * 3. Crossing. The input configurations the stepwise runs ended at are scored with every base,
 *    so each AR order, trend and harmonic choice is ranked with the inputs found.
 * A final stepwise run starts from the best structure overall when its base was not among
 * those of step 2, and its end point is crossed with every base as well.
 *
 * Cost at the default bounds on a monthly series with two inputs: about 2·bases + 60 + 2·bases
 * fits instead of 49·bases (bench/search.bench.ts prints the figures).
 */
import type { Series } from '../data/series.js';
import { prewhitenedCrossCorrelation, firstSignificantLag } from '../select/prewhiten.js';
import { forward, isStrictlyPositive } from './transforms.js';
import type { CandidateBounds, CandidateScorer } from './registry.js';
import type { ArxInputSpec, ArxSpec } from './arx.js';
import { difference, diffOrder } from './arx.js';
import type { Structure } from './structure.js';

/** Lag count and delay of every input in bounds order; lags 0 = left out. */
export type InputChoice = { name: string; lags: number; delay: number }[];

/** How many of the best bases get a stepwise run of their own (step 2). */
export const STEPWISE_BASES = 4;
/** Most moves of one stepwise run (a bound; runs end far sooner on real data). */
const MAX_MOVES = 30;

/** The spec's input list for a choice: the inputs with at least one lag, in bounds order. */
export function choiceInputs(choice: InputChoice): ArxInputSpec[] {
  return choice.filter((c) => c.lags > 0).map((c) => ({ name: c.name, lags: c.lags, delay: c.delay }));
}

function choiceKey(choice: InputChoice): string {
  return choice.map((c) => (c.lags > 0 ? `${c.lags}:${c.delay}` : '-')).join('|');
}

/**
 * The start of step 1 on one scale: for each input, one lag at the first significant lag of
 * its prewhitened cross-correlation with the target w (both on the base's scale), or left out.
 */
export function startChoice(series: Series, bounds: CandidateBounds, base: Pick<ArxSpec, 'transform' | 'differencing' | 'season'>): InputChoice {
  const D = diffOrder(base);
  const z = base.transform === 'log' && isStrictlyPositive(series.values) ? forward('log', series.values) : series.values;
  const w = difference(z, D);
  const maxLag = bounds.maxDelay + bounds.maxInputLags - 1;
  return bounds.inputs.map((name) => {
    const u = series.inputs.find((i) => i.name === name)?.values;
    if (u === undefined) return { name, lags: 0, delay: 0 };
    const cc = prewhitenedCrossCorrelation(difference(u, D), w, maxLag);
    const d = firstSignificantLag(cc, bounds.maxDelay);
    return d === null ? { name, lags: 0, delay: 0 } : { name, lags: 1, delay: d };
  });
}

/** Every choice one term away from `choice` (see step 2 of the module comment), in a fixed order. */
export function neighbours(choice: InputChoice, bounds: CandidateBounds): InputChoice[] {
  const out: InputChoice[] = [];
  const seen = new Set<string>([choiceKey(choice)]);
  const push = (j: number, lags: number, delay: number) => {
    if (lags < 0 || lags > bounds.maxInputLags) return;
    if (lags > 0 && (delay < 0 || delay > bounds.maxDelay)) return;
    const next = choice.map((c, i) => (i === j ? { name: c.name, lags, delay: lags > 0 ? delay : 0 } : c));
    const key = choiceKey(next);
    if (seen.has(key)) return;
    seen.add(key);
    out.push(next);
  };
  choice.forEach((c, j) => {
    if (c.lags === 0) {
      for (let d = 0; d <= bounds.maxDelay; d++) push(j, 1, d);
      return;
    }
    push(j, c.lags + 1, c.delay);
    push(j, c.lags + 1, c.delay - 1);
    push(j, c.lags - 1, c.delay);
    push(j, c.lags - 1, c.delay + 1);
    push(j, c.lags, c.delay + 1);
    push(j, c.lags, c.delay - 1);
  });
  return out;
}

/** Steepest descent over `neighbours` from `start` on one base; returns the choice it ends at. */
export function stepwise(start: InputChoice, score: (choice: InputChoice) => number, bounds: CandidateBounds): InputChoice {
  let at = start;
  let best = score(at);
  for (let move = 0; move < MAX_MOVES; move++) {
    let next: InputChoice | null = null;
    let nextScore = best;
    for (const c of neighbours(at, bounds)) {
      const s = score(c);
      if (s < nextScore) {
        next = c;
        nextScore = s;
      }
    }
    if (next === null) break;
    at = next;
    best = nextScore;
  }
  return at;
}

/** The guided search of the module comment; every structure it tries is scored by `scorer`. */
export function exploreInputs(
  series: Series,
  bounds: CandidateBounds,
  bases: ArxSpec[],
  scorer: CandidateScorer,
  make: (spec: ArxSpec) => Structure,
): void {
  if (bases.length === 0) return;
  const none: InputChoice = bounds.inputs.map((name) => ({ name, lags: 0, delay: 0 }));
  // Scores by base and choice, so a pair met again builds no structure.
  const known = bases.map(() => new Map<string, number>());
  const scoreOf = (base: ArxSpec, choice: InputChoice) => {
    const memo = known[bases.indexOf(base)];
    const key = choiceKey(choice);
    let s = memo.get(key);
    if (s === undefined) {
      s = scorer.score(make({ ...base, inputs: choiceInputs(choice) }));
      memo.set(key, s);
    }
    return s;
  };
  // 1. Start, one per scale.
  const starts = new Map<string, InputChoice>();
  const startOf = (base: ArxSpec): InputChoice => {
    const scale = `${base.transform}|${base.differencing}`;
    let c = starts.get(scale);
    if (c === undefined) {
      c = startChoice(series, bounds, base);
      starts.set(scale, c);
    }
    return c;
  };
  const ranked = bases.map((base, i) => {
    const start = startOf(base);
    const withStart = scoreOf(base, start);
    const without = scoreOf(base, none);
    return { i, base, from: withStart <= without ? start : none, score: Math.min(withStart, without) };
  });
  // 2. Stepwise from the best base of each AR order (ties by grid order).
  const order = ranked.filter((r) => Number.isFinite(r.score)).sort((a, b) => a.score - b.score || a.i - b.i);
  const ends = new Map<string, InputChoice>();
  const stepped = new Set<number>();
  const orders = new Set<number>();
  for (const r of order) {
    if (orders.has(r.base.ar)) continue;
    orders.add(r.base.ar);
    const end = stepwise(r.from, (c) => scoreOf(r.base, c), bounds);
    ends.set(choiceKey(end), end);
    stepped.add(r.i);
  }
  // 3. Crossing.
  const cross = (choices: Iterable<InputChoice>) => {
    for (const c of choices) for (const base of bases) scoreOf(base, c);
  };
  cross(ends.values());
  // The best structure overall, searched once more when its base had no stepwise run.
  let best = { i: -1, choice: none, score: Infinity };
  for (const c of ends.values()) {
    for (let i = 0; i < bases.length; i++) {
      const s = scoreOf(bases[i], c);
      if (s < best.score) best = { i, choice: c, score: s };
    }
  }
  if (best.i >= 0 && !stepped.has(best.i)) {
    const end = stepwise(best.choice, (c) => scoreOf(bases[best.i], c), bounds);
    if (!ends.has(choiceKey(end))) cross([end]);
  }
}
