/**
 * The ranking of a structure search as a tidy table (`candidates.csv`): one row per candidate,
 * fitted ones by rank, then those that could not be fitted, with the reason.
 */
import type { SearchResult } from '../select/search.js';
import { tableToCsv, type Table } from './tables.js';

export const CANDIDATE_COLUMNS = [
  'rank', 'status', 'key', 'family', 'structure', 'criterion', 'score', 'delta', 'weight',
  'aicc', 'aic', 'bic', 'loglik', 'rss', 'k', 'n', 'first', 'last', 'reason',
];

export function candidatesTable(result: SearchResult): Table {
  const rows = result.ranking.map((c) => [
    c.rank,
    c.status,
    c.key,
    c.family,
    c.label,
    result.criterion,
    c.score,
    c.delta,
    c.weight,
    c.aicc,
    c.aic,
    c.bic,
    c.logLik,
    c.rss,
    c.k,
    c.n,
    result.sample.start,
    result.sample.end,
    c.reason ?? null,
  ]);
  return { columns: [...CANDIDATE_COLUMNS], rows };
}

/** `candidates.csv` of a search. */
export function candidatesCsv(result: SearchResult): string {
  return tableToCsv(candidatesTable(result));
}
