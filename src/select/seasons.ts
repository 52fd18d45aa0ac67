/**
 * Which season the data support. The structure search (search.ts) is run with the series' own
 * season; a daily series is searched a second time with the yearly cycle, and the better of the
 * two searches is kept, so daily data can be described by a yearly pattern as well as a weekly
 * one. The evidence reports, for each kind of seasonal description, its best candidate by the
 * search's criterion on one common sample:
 *   - none:   no seasonal terms (no harmonics, seasonal lag or seasonal differences);
 *   - the series' season (weekly for daily data, 12 months for monthly, …): candidates with
 *     harmonics, a seasonal lag or seasonal differences of that season;
 *   - yearly (daily data only): harmonics of the mean Gregorian year, s = 365.25 days, which
 *     the second search fits in place of the weekly terms (one season per candidate).
 * The data support the kind whose best candidate has the lowest criterion value. A series
 * without a season (yearly data) gets no evidence.
 *
 * The yearly search runs when the series is daily with one day per step, its season is the
 * weekly default (7), no season was asked for (`options.season` unset, `options.yearly` not
 * false) and it spans at least two years (⌈2 · 365.25⌉ = 731 observations), so that each
 * yearly phase is seen twice. It uses the first search's common sample (`sampleStart`) and the
 * Ljung–Box lags of the weekly season, so the two rankings are comparable. Cost: up to twice
 * one search on daily data.
 */
import { DAYS_PER_YEAR, seasonPeriod } from '../data/calendar.js';
import { seriesStep, type Series } from '../data/series.js';
import { search, type CandidateResult, type SearchOptions, type SearchResult } from './search.js';
import { criterionLabel } from './criteria.js';
import { defaultLjungBoxLags } from './whiteness.js';

/** Observations a daily series needs before its yearly cycle is searched: two years. */
export const YEARLY_MIN_POINTS = Math.ceil(2 * DAYS_PER_YEAR);

export type SeasonKind = 'none' | 'season' | 'yearly';

export interface SeasonBest {
  kind: SeasonKind;
  /** Season length in observations (null for none). */
  season: number | null;
  key: string;
  label: string;
  score: number;
  /** Distance to the best of the kinds. */
  delta: number;
}

export interface SeasonEvidence {
  /** The best candidate of each kind tried, best first. */
  kinds: SeasonBest[];
  /** The kind the data support (lowest criterion). */
  supported: SeasonKind;
  /** Why the yearly cycle was not searched (daily series only), or null. */
  yearlySkipped: string | null;
  /** E.g. "the data support the weekly season (7 days): its best candidate is 12.4 AICc below the best with no seasonal terms". */
  text: string;
}

/** The search with the series' season and, for daily data, with the yearly cycle (see the module comment). */
export function searchSeasons(series: Series, options: SearchOptions = {}): SearchResult {
  const first = search(series, options);
  const daily = series.frequency === 'daily' && seriesStep(series) === 1;
  const defaultSeason = options.season === undefined && series.season === seasonPeriod('daily') && options.yearly !== false;
  let yearlySkipped: string | null = null;
  let second: SearchResult | null = null;
  if (daily && defaultSeason) {
    if (series.values.length < YEARLY_MIN_POINTS) {
      yearlySkipped = `the yearly cycle needs at least two years (${YEARLY_MIN_POINTS} days); the series has ${series.values.length}`;
    } else {
      second = search(series, {
        ...options,
        season: DAYS_PER_YEAR,
        seasonalLag: 'off',
        differencing: options.differencing === 'seasonal' ? 'none' : options.differencing,
        sampleStart: Math.max(first.sample.from, options.sampleStart ?? 0),
        whitenessLags: options.whitenessLags ?? defaultLjungBoxLags(first.sample.n, series.season),
      });
      if (second.sample.from !== first.sample.from) {
        // The yearly candidates need a later start: score both searches from there.
        const again = search(series, { ...options, sampleStart: second.sample.from });
        return withEvidence(second.winner.result.score < again.winner.result.score ? second : again, again, second, null);
      }
    }
  } else if (daily && series.season === seasonPeriod('daily') && series.values.length >= YEARLY_MIN_POINTS) {
    yearlySkipped = 'a season was set';
  }
  const kept = second !== null && second.winner.result.score < first.winner.result.score ? second : first;
  return withEvidence(kept, first, second, yearlySkipped);
}

function isSeasonal(c: CandidateResult): boolean {
  const spec = c.spec as { harmonics?: number; seasonalLag?: boolean; differencing?: string };
  return (spec.harmonics ?? 0) > 0 || spec.seasonalLag === true || spec.differencing === 'seasonal';
}

function bestOf(ranking: readonly CandidateResult[], keep: (c: CandidateResult) => boolean): CandidateResult | null {
  for (const c of ranking) if (c.status === 'fitted' && keep(c)) return c;
  return null;
}

function withEvidence(kept: SearchResult, own: SearchResult, yearly: SearchResult | null, yearlySkipped: string | null): SearchResult {
  const season = own.bounds.season;
  if (season === null && yearly === null && yearlySkipped === null) return kept; // nothing seasonal was tried
  const found: { kind: SeasonKind; season: number | null; c: CandidateResult | null }[] = [
    { kind: 'none', season: null, c: bestOf(own.ranking, (c) => !isSeasonal(c)) },
  ];
  if (season !== null) found.push({ kind: 'season', season, c: bestOf(own.ranking, isSeasonal) });
  if (yearly !== null) found.push({ kind: 'yearly', season: DAYS_PER_YEAR, c: bestOf(yearly.ranking, isSeasonal) });
  const tried = found.filter((f): f is { kind: SeasonKind; season: number | null; c: CandidateResult } => f.c !== null);
  tried.sort((a, b) => a.c.score - b.c.score || a.kind.localeCompare(b.kind));
  const best = tried.length > 0 ? tried[0].c.score : NaN;
  const kinds: SeasonBest[] = tried.map((f) => ({ kind: f.kind, season: f.season, key: f.c.key, label: f.c.label, score: f.c.score, delta: f.c.score - best }));
  const supported = kinds.length > 0 ? kinds[0].kind : 'none';
  return { ...kept, seasons: { kinds, supported, yearlySkipped, text: evidenceText(kinds, own, yearlySkipped) } };
}

/** Words for a kind of seasonal description, e.g. "the weekly season (7 days)". */
export function seasonKindName(kind: SeasonKind, season: number | null, frequency: string): string {
  if (kind === 'none') return 'no seasonal terms';
  if (kind === 'yearly') return `the yearly cycle (${DAYS_PER_YEAR} days, by harmonics)`;
  return frequency === 'daily' && season === 7 ? 'the weekly season (7 days)' : `the season of ${season} observations`;
}

function evidenceText(kinds: SeasonBest[], own: SearchResult, yearlySkipped: string | null): string {
  const skipped = yearlySkipped ? `; yearly cycle not searched: ${yearlySkipped}` : '';
  if (kinds.length === 0) return `no candidate was fitted${skipped}`;
  const criterion = criterionLabel(own.criterion);
  const f = own.series.frequency;
  const head = kinds[0];
  const others = kinds.slice(1).map((k) => `${formatDelta(k.delta)} ${criterion} below the best with ${seasonKindName(k.kind, k.season, f)}`);
  return `the data support ${seasonKindName(head.kind, head.season, f)}${others.length > 0 ? `: its best candidate is ${others.join(', and ')}` : ''}${skipped}`;
}

function formatDelta(d: number): string {
  return String(Number(d.toPrecision(4)));
}
