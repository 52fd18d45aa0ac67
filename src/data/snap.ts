/**
 * Instants near a period boundary → the boundary: time stamps exported as UTC instants of local
 * midnights ("2021-01-01T08:00Z" for a midnight eight hours behind UTC, "…T07:00Z" once daylight
 * saving starts, "2021-01-31T23:00Z" for a midnight one hour ahead) are moved to the UTC
 * midnight nearest to them, so each lands in the day, month, quarter or year it stands for.
 *
 * A column is snapped only when all of these hold, so hourly data, readings taken at a time of
 * day and end-of-period stamps such as "23:59:59" are left alone:
 *   - some stamp has a time of day, and every present stamp lies within SNAP_HOURS of a UTC
 *     midnight, at a whole number of quarter hours from it (time-zone offsets are);
 *   - the offsets from midnight span at most SNAP_SPREAD_HOURS (one zone, with and without
 *     daylight saving time);
 *   - consecutive distinct stamps are at least MIN_GAP_HOURS apart (one stamp per day at most).
 * Cost: one pass, plus a sort of the distinct stamps.
 */

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
const DAY = 24 * HOUR;

/** Largest distance from midnight snapped, in hours (UTC−10 to UTC+10 with daylight saving). */
export const SNAP_HOURS = 10;
/** Largest spread of the offsets from midnight within one column, in hours. */
export const SNAP_SPREAD_HOURS = 3;
const MIN_GAP_HOURS = 20;

export interface SnapReport {
  /** Stamps moved (cells, not distinct values). */
  moved: number;
  /** Smallest and largest offset of a stamp from its midnight, in minutes (stamp − midnight). */
  minOffset: number;
  maxOffset: number;
}

/**
 * Snaps `times` (UTC ms; NaN for missing cells) in place when the column qualifies (see the
 * module comment); returns what was done, or null when nothing was moved.
 */
export function snapToMidnight(times: Float64Array): SnapReport | null {
  let min = Infinity;
  let max = -Infinity;
  let moved = 0;
  for (const t of times) {
    if (t !== t) continue;
    const offset = t - Math.round(t / DAY) * DAY;
    if (Math.abs(offset) > SNAP_HOURS * HOUR || offset % (15 * MINUTE) !== 0) return null;
    if (offset < min) min = offset;
    if (offset > max) max = offset;
    if (offset !== 0) moved++;
  }
  if (moved === 0 || max - min > SNAP_SPREAD_HOURS * HOUR) return null;
  const distinct = Float64Array.from(new Set(times)).filter((t) => t === t).sort();
  for (let i = 1; i < distinct.length; i++) if (distinct[i] - distinct[i - 1] < MIN_GAP_HOURS * HOUR) return null;
  for (let i = 0; i < times.length; i++) if (times[i] === times[i]) times[i] = Math.round(times[i] / DAY) * DAY;
  return { moved, minOffset: min / MINUTE, maxOffset: max / MINUTE };
}

/** "−1:00 to +8:00" style text of a snap's offsets, for reports. */
export function offsetText(minutes: number): string {
  const sign = minutes < 0 ? '−' : '+';
  const m = Math.abs(minutes);
  return `${sign}${Math.floor(m / 60)}:${String(m % 60).padStart(2, '0')}`;
}
