/**
 * The data options every command that reads a file shares, declared once:
 *
 *   addDataOptions(command)            declares them on a commander command
 *   parseDataOptions(command.opts())   checks them (a zod schema) → LoadOptions, or a UsageError
 *   readDataSource(file, io)           reads a path, or standard input for `-`
 *   loadSeriesFromCli(file, opts, io)  all three, then loadSeries
 */
import type { Command } from 'commander';
import { z } from 'zod';
import { FREQUENCIES } from '../data/calendar.js';
import { AGGREGATOR_NAMES } from '../data/aggregators.js';
import { DATE_FORMATS } from '../data/dates.js';
import { UsageError } from '../data/errors.js';
import { GAP_POLICY_NAMES, MAX_INTERPOLATED_RUN } from '../data/gaps.js';
import { loadSeries, type LoadOptions, type LoadReport } from '../data/load.js';
import { DUPLICATE_POLICY_NAMES, PARTIAL_POLICY_NAMES } from '../data/regularise.js';
import type { Series } from '../data/series.js';
import { readSource, type TableSource } from '../data/source.js';
import type { CliIO } from './main.js';

const FORMATS = ['csv', 'tsv', 'xlsx', 'json'] as const;

export function addDataOptions(command: Command): Command {
  return command
    .option('--sheet <name>', 'workbook sheet to read (default: the first)')
    .option('--time <column>', 'the time column (default: detected)')
    .option('--value <column>', 'the value column (long layout), or the one series column to keep (wide layout)')
    .option('--inputs <columns>', 'exogenous input columns, comma-separated, e.g. price,promo')
    .option('--id <column>', 'the series id column: selects long layout')
    .option('--series <list>', 'keep only these series: names (columns, or ids in long layout) and globs, comma-separated, e.g. north*,south-2 (\\, for a comma inside a name)')
    .option('--date-format <form>', `how to read times: ${DATE_FORMATS.join(', ')} (default: auto)`)
    .option('--freq <frequency>', `aggregate to this coarser frequency: ${FREQUENCIES.filter((f) => f !== 'index').join(', ')}`)
    .option('--aggregate <how>', `how --freq combines periods: ${AGGREGATOR_NAMES.join(', ')} (default: sum)`)
    .option('--duplicates <how>', `rows sharing a time stamp: ${DUPLICATE_POLICY_NAMES.join(', ')} (default: error)`)
    .option('--gaps <how>', `missing periods: ${GAP_POLICY_NAMES.join(', ')} (default: interpolate, runs of at most ${MAX_INTERPOLATED_RUN})`)
    .option('--partial <how>', `incomplete periods at either end after --freq: ${PARTIAL_POLICY_NAMES.join(', ')} (default: drop)`)
    .option('--season <n>', 'season length in observations, used by every stage (default: from the frequency)')
    .option('--decimal <mark>', 'decimal mark of numbers: . or , (default: ., or , when detected in a semicolon-delimited file)')
    .option('--delimiter <char>', 'field delimiter for text files (default: sniffed among , ; tab |)')
    .option('--format <format>', `file format when the name does not tell (standard input): ${FORMATS.join(', ')}`);
}

const choice = <T extends string>(option: string, values: readonly T[]) =>
  z.string().refine((v): v is T => (values as readonly string[]).includes(v), { message: `${option}|one of ${values.join(', ')}` });

const columnName = (option: string) => z.string().refine((v) => v.trim().length > 0, { message: `${option}|a column name` });

const schema = z.object({
  sheet: z.string().optional(),
  time: columnName('--time').optional(),
  value: columnName('--value').optional(),
  inputs: z
    .string()
    .refine((v) => v.split(',').every((s) => s.trim().length > 0), { message: '--inputs|column names separated by commas, e.g. price,promo' })
    .optional(),
  id: columnName('--id').optional(),
  series: z.string().optional(),
  dateFormat: choice('--date-format', DATE_FORMATS).optional(),
  freq: choice('--freq', FREQUENCIES.filter((f) => f !== 'index')).optional(),
  aggregate: choice('--aggregate', AGGREGATOR_NAMES).optional(),
  duplicates: choice('--duplicates', DUPLICATE_POLICY_NAMES).optional(),
  gaps: choice('--gaps', GAP_POLICY_NAMES).optional(),
  partial: choice('--partial', PARTIAL_POLICY_NAMES).optional(),
  season: z
    .string()
    .regex(/^\d+$/, { message: '--season|a whole number ≥ 2' })
    .transform(Number)
    .refine((v) => v >= 2, { message: '--season|a whole number ≥ 2' })
    .optional(),
  decimal: choice('--decimal', ['.', ','] as const).optional(),
  delimiter: z
    .string()
    .refine((v) => ['\t', 'tab', '\\t'].includes(v) || v.length === 1, { message: '--delimiter|one character, or "tab"' })
    .optional(),
  format: choice('--format', FORMATS).optional(),
});

/** Checks the parsed commander options (other keys are ignored) and returns LoadOptions. */
export function parseDataOptions(opts: Record<string, unknown>): LoadOptions {
  const picked: Record<string, unknown> = {};
  for (const key of Object.keys(schema.shape)) if (opts[key] !== undefined) picked[key] = opts[key];
  const result = schema.safeParse(picked);
  if (!result.success) {
    const issue = result.error.issues[0];
    const [option, expected] = issue.message.includes('|') ? issue.message.split('|') : [`--${String(issue.path[0])}`, issue.message];
    const key = String(issue.path[0]);
    throw new UsageError('option-invalid', `option ${option} has an unusable value`, {
      found: String(picked[key]),
      expected,
    });
  }
  const o = result.data;
  const out: LoadOptions = {};
  if (o.sheet !== undefined) out.sheet = o.sheet;
  if (o.time !== undefined) out.time = o.time.trim();
  if (o.value !== undefined) out.value = o.value.trim();
  if (o.inputs !== undefined) out.inputs = o.inputs.split(',').map((s) => s.trim());
  if (o.id !== undefined) out.id = o.id.trim();
  if (o.series !== undefined) out.series = o.series;
  if (o.dateFormat !== undefined) out.dateFormat = o.dateFormat;
  if (o.freq !== undefined) out.freq = o.freq;
  if (o.aggregate !== undefined) out.aggregate = o.aggregate;
  if (o.duplicates !== undefined) out.duplicates = o.duplicates;
  if (o.gaps !== undefined) out.gaps = o.gaps;
  if (o.partial !== undefined) out.partial = o.partial;
  if (o.season !== undefined) out.season = o.season;
  if (o.decimal !== undefined) out.decimal = o.decimal;
  if (o.delimiter !== undefined) out.delimiter = o.delimiter.length === 1 ? o.delimiter : '\t';
  if (o.format !== undefined) out.format = o.format;
  return out;
}

/** A path, or standard input for `-`. */
export async function readDataSource(file: string, io: CliIO): Promise<TableSource> {
  if (file === '-') return { name: '-', bytes: await io.stdin() };
  return readSource(file);
}

export async function loadSeriesFromCli(file: string, opts: Record<string, unknown>, io: CliIO, extra: Partial<LoadOptions> = {}): Promise<{ series: Series[]; report: LoadReport }> {
  const options = { ...parseDataOptions(opts), ...extra };
  return loadSeries(await readDataSource(file, io), options);
}
