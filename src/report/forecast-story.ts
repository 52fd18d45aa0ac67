/**
 * What a forecast is, said plainly: which equation or combination makes the point forecast, and
 * where its bands come from. `certa forecast` and `certa update` print and store the same
 * account (text headline, summary.json, chart subtitles), so the headline is always what is
 * drawn.
 */
import { formatTime, type Frequency } from '../data/calendar.js';
import type { ForecastPaths } from '../forecast/intervals.js';
import { replacesOwn, type Combination } from '../forecast/combine.js';

/** One member of the point forecast as reports list it. */
export interface PointMember {
  key: string;
  label: string;
  group: string;
  /** Share of the point forecast (0–1). */
  share: number;
  asserted: boolean;
}

/** What makes the point forecast. */
export interface PointStory {
  /** `combined`: a weighted mean of several structures' forecasts; `asserted`: the asserted equation's own path. */
  kind: 'combined' | 'asserted';
  /** The asserted equation's share of the point (1 when it is the point alone). */
  assertedShare: number;
  /** Groups (family and scale) averaged, when combined (equal weights, or tempered by their evidence). */
  groups: number;
  /** The members used, largest share first (ties by key); the asserted equation alone when not combined. */
  members: PointMember[];
  /** One sentence. */
  text: string;
}

/** Where the bands come from. */
export interface BandStory {
  method: ForecastPaths['method'];
  levels: number[];
  /** For calibrated bands: the rolling origins behind them and the scale of their errors. */
  calibration: { origins: number; firstOrigin: string; scale: 'log' | 'none'; growth: number; multipliers: { level: number; q: number }[] } | null;
  /** One sentence. */
  text: string;
}

/** The point forecast's account from a run's combination (null or not replacing: the asserted equation alone). */
export function pointStory(c: Combination | null, asserted: { key: string; label: string }): PointStory {
  if (!c || !replacesOwn(c, asserted.key)) {
    return {
      kind: 'asserted',
      assertedShare: 1,
      groups: 1,
      members: [{ key: asserted.key, label: asserted.label, group: '', share: 1, asserted: true }],
      text: 'the asserted equation’s own path',
    };
  }
  const members = c.members
    .filter((m) => !m.excluded && m.share > 0)
    .map((m) => ({ key: m.key, label: m.label, group: m.group, share: m.share, asserted: m.key === asserted.key }))
    .sort((a, b) => b.share - a.share || (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
  const own = members.find((m) => m.asserted)?.share ?? 0;
  const used = c.members.filter((m) => !m.excluded && m.share > 0);
  const equal = used.every((m) => m.groupWeight === used[0].groupWeight);
  const between = equal ? 'weighted equally' : 'weighted by their tempered evidence';
  const across = c.groups > 1 && members.every((m) => m.group !== 'all') ? `, ${c.groups} groups (family and scale) ${between}, Akaike weights within each` : ', by Akaike weights';
  return {
    kind: 'combined',
    assertedShare: own,
    groups: c.groups,
    members,
    text: `a combination of ${members.length} structures’ forecasts${across}; the asserted equation’s share is ${percent(own)}`,
  };
}

/** The bands' account. `time` and `f` label the first calibration origin. */
export function bandStory(paths: ForecastPaths, point: PointStory, time: ArrayLike<number>, f: Frequency, hasInputs = false): BandStory {
  const levels = paths.bands.map((b) => b.level);
  const lv = levels.map((l) => `${l} %`).join(' and ');
  const c = paths.calibration;
  if (paths.method === 'calibrated' && c) {
    const first = formatTime(time[c.firstOrigin], f);
    const scale = c.scale === 'log' ? 'relative errors (log scale)' : 'errors on the original scale';
    const members = point.kind === 'combined' ? ', widened where the members disagree' : '';
    return {
      method: paths.method,
      levels,
      calibration: { origins: c.origins, firstOrigin: first, scale: c.scale, growth: c.growth, multipliers: c.multipliers.map((m) => ({ level: m.level, q: m.q })) },
      text: `${lv}, calibrated on this point forecast’s own ${scale} from ${c.origins} rolling origins inside the data (from ${first})${members}${hasInputs ? '; the inputs were as observed at each origin, so doubt about future inputs is not in them' : ''}`,
    };
  }
  const how = paths.method === 'analytic' ? 'analytic' : 'residual bootstrap';
  const moved = point.kind === 'combined' ? ', moved onto the combined point' : '';
  return {
    method: paths.method,
    levels,
    calibration: null,
    text: `${lv}, from the asserted equation alone (${how}, under certainty equivalence: its coefficients and structure taken as known, so they ignore estimation, structure and combination uncertainty)${moved}`,
  };
}

/** The headline of a text summary: what the point is and where the bands come from. */
export function headlineLines(point: PointStory, bands: BandStory): string[] {
  return [`Point forecast: ${point.text}.`, `Bands: ${bands.text}.`];
}

/** The members of a combined point, largest share first, at most `most` (then a count of the rest). */
export function memberLines(point: PointStory, most = 8): string[] {
  if (point.kind !== 'combined') return [];
  const lines = ['Point forecast members (share of the point, group, structure):'];
  for (const m of point.members.slice(0, most)) lines.push(`  ${percent(m.share).padStart(5)}  ${(m.group || '-').padEnd(11)} ${m.label}${m.asserted ? '  [asserted]' : ''}`);
  const rest = point.members.slice(most);
  if (rest.length > 0) lines.push(`  ${percent(rest.reduce((s, m) => s + m.share, 0)).padStart(5)}  ${rest.length} more`);
  return lines;
}

/** A short phrase for chart subtitles. */
export function storySubtitle(point: PointStory, bands: BandStory): string {
  const p = point.kind === 'combined' ? `point: combination of ${point.members.length} structures (asserted ${percent(point.assertedShare)})` : 'point: the asserted equation';
  const b = bands.method === 'calibrated' ? 'bands: calibrated on its own errors' : `bands: the asserted equation’s (${bands.method})`;
  return `${p}; ${b}`;
}

function percent(x: number): string {
  const p = 100 * x;
  return `${p >= 10 || p === 0 ? p.toFixed(0) : p.toFixed(1)} %`;
}
