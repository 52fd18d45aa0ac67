/**
 * The schema of the one result shape (result-json.ts), as a zod schema; docs/result.schema.json
 * is its JSON Schema (draft 2020-12), made by `z.toJSONSchema` (`npm run schema` writes it, a
 * test checks the file is current). The envelope is strict; each command's `detail` names the
 * keys it always has and may hold more.
 */
import { z } from 'zod';

const snake = z.string().regex(/^[a-z0-9]+(_[a-z0-9]+)*$/);
const looseSnake = (shape: z.ZodRawShape) => z.looseObject(shape).and(z.record(snake, z.unknown()));

const seriesInfo = z.looseObject({ name: z.string(), frequency: z.string(), length: z.number().int(), start: z.string(), end: z.string() });

/** One row of the coefficient table: the interval bounds are null where the table leaves them blank. */
const term = z.looseObject({
  name: z.string(),
  estimate: z.number().nullable(),
  se: z.number().nullable(),
  lower: z.number().nullable(),
  upper: z.number().nullable(),
  active: z.boolean(),
});
/** The asserted model with its coefficient table at `coefficient_level` percent. */
const model = z.looseObject({ key: z.string(), label: z.string(), equation: z.string(), coefficient_level: z.number(), terms: z.array(term) });

const forecastDetail = looseSnake({
  format: z.literal('certa-summary'),
  version: z.number().int(),
  command: z.literal('forecast'),
  caution: z.string(),
  series: seriesInfo,
  options: z.looseObject({ horizon: z.number().int(), holdout: z.number().int(), levels: z.array(z.number()) }),
  model,
  evaluation: z.union([z.null(), z.looseObject({ holdout: z.number().int(), model_mase: z.number().nullable() })]),
  forecast: z.looseObject({ rows: z.array(z.looseObject({ time: z.string(), point: z.number().nullable() })) }),
  warnings: z.array(z.string()),
  files: z.array(z.string()),
  out_dir: z.string(),
});

const updateDetail = looseSnake({
  format: z.literal('certa-summary'),
  version: z.number().int(),
  command: z.literal('update'),
  model,
  warnings: z.array(z.string()),
  files: z.array(z.string()),
  out_dir: z.string(),
});

const searchDetail = looseSnake({
  series: z.looseObject({ name: z.string() }),
  criterion: z.string(),
  ranking: z.array(z.looseObject({ structure: z.string(), key: z.string() })),
  winner: z.looseObject({
    structure: z.string(),
    key: z.string(),
    equation: z.string(),
    terms: z.array(z.string()),
    theta: z.array(z.number().nullable()),
    se: z.array(z.number().nullable()),
    coefficient_level: z.number(),
    lower: z.array(z.number().nullable()),
    upper: z.array(z.number().nullable()),
  }),
  warnings: z.array(z.string()),
  files: z.looseObject({ candidates: z.string(), model: z.string() }),
});

const inspectDetail = looseSnake({ name: z.string(), start: z.string(), end: z.string(), length: z.number().int(), stats: z.looseObject({}) });

const entry = (detail: z.ZodType) =>
  z.strictObject({
    series: z.string(),
    status: z.enum(['ok', 'failed']),
    folder: z.string().nullable(),
    reason: z.string().nullable(),
    detail: detail.nullable(),
  });

const totals = z.strictObject({ series: z.number().int().min(0), succeeded: z.number().int().min(0), failed: z.number().int().min(0) });
const head = { format: z.literal('certa-result'), version: z.literal(1), totals };

export const resultSchema = z.union([
  z.strictObject({ ...head, command: z.literal('inspect'), file: looseSnake({ file: z.string(), format: z.string(), layout: z.looseObject({}), frequency: z.looseObject({}) }), results: z.array(entry(inspectDetail)) }),
  z.strictObject({ ...head, command: z.literal('search'), results: z.array(entry(searchDetail)) }),
  z.strictObject({ ...head, command: z.literal('forecast'), caution: z.string(), results: z.array(entry(forecastDetail)) }),
  z.strictObject({ ...head, command: z.literal('update'), caution: z.string(), results: z.array(entry(updateDetail)) }),
]);

/** The JSON Schema text of docs/result.schema.json. */
export function resultJsonSchema(): string {
  const schema = z.toJSONSchema(resultSchema) as Record<string, unknown>;
  const doc = { ...schema, $id: 'https://certa.invalid/docs/result.schema.json', title: 'certa --json result', description: 'What certa inspect, search, forecast and update print with --json: one envelope whatever the number of series, snake_case keys throughout.' };
  return `${JSON.stringify(doc, null, 2)}\n`;
}
