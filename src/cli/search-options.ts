/**
 * The structure-search options shared by `certa search` and `certa forecast`, declared once:
 *   addSearchOptions(command)          declares them
 *   parseSearchOptions(command.opts()) checks them → SearchOptions, or a UsageError
 */
import type { Command } from 'commander';
import { UsageError } from '../data/errors.js';
import { familyNames } from '../models/registry.js';
import { SEARCH_DEFAULTS, type SearchOptions } from '../select/search.js';

export function addSearchOptions(command: Command): Command {
  return command
    .option('--max-ar <n>', `largest number of AR lags (default ${SEARCH_DEFAULTS.maxAr})`)
    .option('--max-input-lags <n>', `largest number of lags per input (default ${SEARCH_DEFAULTS.maxInputLags})`)
    .option('--max-delay <n>', `largest input delay in periods (default ${SEARCH_DEFAULTS.maxDelay})`)
    .option('--harmonics <n|auto>', 'largest number of seasonal harmonic pairs (default auto)')
    .option('--season <n>', 'season length in periods (default: from the frequency)')
    .option('--families <list>', `model families to search, comma-separated: ${familyNames().join(', ')} (default: all)`)
    .option('--transform <how>', 'scale of the models: auto, none or log (default auto)')
    .option('--trend <on|off|auto>', 'linear trend term (default auto: with and without)')
    .option('--seasonal-lag <how>', 'seasonal lag y[t-s]: on, off or auto (default off)')
    .option('--differencing <how>', 'none, first, seasonal or auto (default none)')
    .option('--criterion <name>', 'ranking criterion: aicc, aic or bic (default aicc)');
}

function whole(option: string, raw: unknown, min: number, max: number): number {
  const s = String(raw).trim();
  const v = /^\d+$/.test(s) ? Number(s) : NaN;
  if (!(Number.isInteger(v) && v >= min && v <= max)) {
    throw new UsageError('option-invalid', `option ${option} has an unusable value`, { found: String(raw), expected: `a whole number from ${min} to ${max}` });
  }
  return v;
}

function oneOf<T extends string>(option: string, raw: unknown, values: readonly T[]): T {
  const s = String(raw).trim().toLowerCase();
  if (!(values as readonly string[]).includes(s)) {
    throw new UsageError('option-invalid', `option ${option} has an unusable value`, { found: String(raw), expected: `one of ${values.join(', ')}` });
  }
  return s as T;
}

export function parseSearchOptions(opts: Record<string, unknown>): SearchOptions {
  const out: SearchOptions = {};
  if (opts.maxAr !== undefined) out.maxAr = whole('--max-ar', opts.maxAr, 0, 24);
  if (opts.maxInputLags !== undefined) out.maxInputLags = whole('--max-input-lags', opts.maxInputLags, 0, 24);
  if (opts.maxDelay !== undefined) out.maxDelay = whole('--max-delay', opts.maxDelay, 0, 60);
  if (opts.harmonics !== undefined) out.harmonics = String(opts.harmonics).trim() === 'auto' ? 'auto' : whole('--harmonics', opts.harmonics, 0, 26);
  if (opts.season !== undefined) out.season = whole('--season', opts.season, 2, 1000);
  if (opts.families !== undefined) {
    const known = familyNames();
    out.families = String(opts.families)
      .split(',')
      .map((s) => s.trim())
      .filter((s) => s.length > 0)
      .map((s) => oneOf('--families', s, known));
    if (out.families.length === 0) throw new UsageError('option-invalid', 'option --families names no family', { found: String(opts.families), expected: known.join(', ') });
  }
  if (opts.transform !== undefined) out.transform = oneOf('--transform', opts.transform, ['auto', 'none', 'log'] as const);
  if (opts.trend !== undefined) out.trend = oneOf('--trend', opts.trend, ['on', 'off', 'auto'] as const);
  if (opts.seasonalLag !== undefined) out.seasonalLag = oneOf('--seasonal-lag', opts.seasonalLag, ['on', 'off', 'auto'] as const);
  if (opts.differencing !== undefined) out.differencing = oneOf('--differencing', opts.differencing, ['none', 'first', 'seasonal', 'auto'] as const);
  if (opts.criterion !== undefined) out.criterion = oneOf('--criterion', opts.criterion, ['aicc', 'aic', 'bic'] as const);
  return out;
}
