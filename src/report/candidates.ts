/**
 * The ranking of a structure search as a tidy table (`candidates.csv`): one row per candidate,
 * fitted ones best first, then those that could not be fitted, with the reason.
 */
import type { SearchResult } from '../select/search.js';
import type { Table } from './tables.js';

export function candidatesTable(result: SearchResult): Table {
  const columns = ['rank', 'key', 'label', 'family', 'status', 'criterion', 'score', 'delta', 'weight', 'aicc', 'aic', 'bic', 'log_lik', 'rss', 'k', 'n', 'sample_start', 'sample_end', 'reason'];
  const rows = result.ranking.map((c) => [
    c.rank,
    c.key,
    c.label,
    c.family,
    c.status,
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
  return { columns, rows };
}
