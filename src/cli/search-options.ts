/**
 * The structure-search options shared by `certa search` and `certa forecast`, declared once:
 *   addSearchOptions(command)          declares them on a commander command
 *   parseSearchOptions(command.opts()) checks them (a zod schema) → SearchOptions, or a UsageError
 */
import type { Command } from 'commander';
import { z } from 'zod';
import { UsageError } from '../data/errors.js';
import { familyNames } from '../models/registry.js';
import { SEARCH_DEFAULTS, type SearchOptions } from '../select/search.js';

export function addSearchOptions(command: Command): Command {
  const d = SEARCH_DEFAULTS;
  return command
    .option('--max-ar <n>', `largest number of AR lags (default: min(${d.maxAr}, n/10), at least 1, for a series of n points; 0 also drops damping from the change family)`)
    .option('--max-input-lags <n>', `largest number of lags per input, 0 = no inputs (default ${d.maxInputLags})`)
    .option('--max-delay <n>', `largest input delay in periods (default ${d.maxDelay})`)
    .option('--harmonics <n|auto>', `largest number of seasonal harmonic pairs (default auto: up to ${d.autoHarmonicsCap}; for structures of the change 0, 1 and the full set s/2 for seasons up to ${d.autoFullSeasonCap} periods)`)
    .option('--families <list>', `model families to search, comma-separated (default ${familyNames().join(',')})`)
    .option('--transform <how>', 'auto, none or log (default auto: log also tried for positive series)')
    .option('--criterion <name>', 'ranking criterion: aicc, aic or bic (default aicc)')
    .option('--trend <how>', 'linear trend term (in the change families: drift): on, off or auto (default auto: with and without; on the log scale a level structure has no trend unless on)')
    .option('--seasonal-lag <how>', 'seasonal lag y[t-s]: on, off or auto (default off)')
    .option('--differencing <how>', 'none, first, seasonal or auto (default none)');
}

const switchValue = (option: string) => z.enum(['on', 'off', 'auto'], { message: `${option}|on, off or auto` });
const wholeNumber = (option: string) =>
  z
    .string()
    .regex(/^\d+$/, { message: `${option}|a whole number ≥ 0` })
    .transform(Number);

const schema = z.object({
  maxAr: wholeNumber('--max-ar').optional(),
  maxInputLags: wholeNumber('--max-input-lags').optional(),
  maxDelay: wholeNumber('--max-delay').optional(),
  harmonics: z
    .string()
    .regex(/^(\d+|auto)$/, { message: '--harmonics|a whole number or auto' })
    .transform((v) => (v === 'auto' ? ('auto' as const) : Number(v)))
    .optional(),
  families: z
    .string()
    .transform((v) => v.split(',').map((s) => s.trim()))
    .refine((list) => list.every((f) => familyNames().includes(f)), { message: `--families|a comma-separated list of ${familyNames().join(', ')}` })
    .optional(),
  transform: z.enum(['auto', 'none', 'log'], { message: '--transform|auto, none or log' }).optional(),
  criterion: z.enum(['aicc', 'aic', 'bic'], { message: '--criterion|aicc, aic or bic' }).optional(),
  trend: switchValue('--trend').optional(),
  seasonalLag: switchValue('--seasonal-lag').optional(),
  differencing: z.enum(['none', 'first', 'seasonal', 'auto'], { message: '--differencing|none, first, seasonal or auto' }).optional(),
});

/** Checks the search options of a command line; UsageError naming the option. */
export function parseSearchOptions(opts: Record<string, unknown>): SearchOptions {
  const picked: Record<string, unknown> = {};
  for (const key of Object.keys(schema.shape)) if (opts[key] !== undefined) picked[key] = opts[key];
  const result = schema.safeParse(picked);
  if (!result.success) {
    const issue = result.error.issues[0];
    const key = String(issue.path[0]);
    const [option, expected] = issue.message.includes('|') ? issue.message.split('|') : [`--${key}`, issue.message];
    throw new UsageError('option-invalid', `option ${option} has an unusable value`, { found: String(picked[key]), expected });
  }
  const out: SearchOptions = {};
  for (const [k, v] of Object.entries(result.data)) if (v !== undefined) (out as Record<string, unknown>)[k] = v;
  // --season (a data option, data-options.ts) sets the one season: no yearly cycle beside it.
  if (opts.season !== undefined) out.yearly = false;
  return out;
}
