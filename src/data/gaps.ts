/**
 * Gap policies: what to do with an interior run of missing periods (`--gaps`). One signature
 * for all: `(values, gap)` fills `values[gap.start .. gap.start + gap.length)` in place and
 * returns true, or returns false to refuse the gap. The values just before and just after the
 * gap are present (leading and trailing missing values are trimmed before policies run).
 *
 *   interpolate (default) — linear between the neighbours, for runs of at most
 *                           MAX_INTERPOLATED_RUN periods; longer runs are refused
 *   zero                  — 0 for every missing period (counts of events that did not occur)
 *   carry                 — the last value before the gap (levels that hold until changed)
 *   error                 — every gap is refused
 */

export interface Gap {
  /** Index of the first missing period. */
  start: number;
  /** Number of consecutive missing periods. */
  length: number;
}

export type GapPolicy = (values: Float64Array, gap: Gap) => boolean;

export type GapPolicyName = 'interpolate' | 'zero' | 'carry' | 'error';

export const GAP_POLICY_NAMES: readonly GapPolicyName[] = ['interpolate', 'zero', 'carry', 'error'];

/** Longest run of missing periods the default policy fills. */
export const MAX_INTERPOLATED_RUN = 3;

export const gapPolicies: Record<GapPolicyName, GapPolicy> = {
  interpolate(values, gap) {
    if (gap.length > MAX_INTERPOLATED_RUN) return false;
    const before = values[gap.start - 1];
    const after = values[gap.start + gap.length];
    const span = gap.length + 1;
    for (let k = 1; k <= gap.length; k++) values[gap.start + k - 1] = before + ((after - before) * k) / span;
    return true;
  },
  zero(values, gap) {
    values.fill(0, gap.start, gap.start + gap.length);
    return true;
  },
  carry(values, gap) {
    values.fill(values[gap.start - 1], gap.start, gap.start + gap.length);
    return true;
  },
  error() {
    return false;
  },
};

/** The interior runs of NaN in values[from..to] (inclusive bounds are present values). */
export function findGaps(values: Float64Array, from: number, to: number): Gap[] {
  const gaps: Gap[] = [];
  let i = from;
  while (i <= to) {
    if (values[i] !== values[i]) {
      const start = i;
      while (i <= to && values[i] !== values[i]) i++;
      gaps.push({ start, length: i - start });
    } else i++;
  }
  return gaps;
}
