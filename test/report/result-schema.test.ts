/**
 * docs/result.schema.json is the JSON Schema (draft 2020-12) that z.toJSONSchema makes of the
 * zod schema in src/report/result-schema.ts; `npm run schema` rewrites it.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { resultJsonSchema, resultSchema } from '../../src/report/result-schema.js';
import { resultDocument, snakeCase, snakeKeys } from '../../src/report/result-json.js';

describe('the result schema', () => {
  it('docs/result.schema.json is current (run npm run schema after changing the zod schema)', () => {
    expect(readFileSync('docs/result.schema.json', 'utf8')).toBe(resultJsonSchema());
  });

  it('refuses an envelope with a camelCase key, a wrong version or a missing totals', () => {
    const ok = resultDocument('search', []);
    expect(resultSchema.safeParse(ok).success).toBe(true);
    expect(resultSchema.safeParse({ ...ok, version: 2 }).success).toBe(false);
    expect(resultSchema.safeParse({ ...ok, totals: undefined }).success).toBe(false);
    expect(resultSchema.safeParse({ ...ok, outDir: 'x' }).success).toBe(false);
  });
});

describe('the coefficient table in the result', () => {
  const term = { name: 'K', estimate: 428.44, se: 6.68, lower: 417.45, upper: 439.43, active: true };
  const forecastDetail = (terms: unknown[]) => ({
    format: 'certa-summary',
    version: 2,
    command: 'forecast',
    caution: 'c',
    series: { name: 's', frequency: 'monthly', length: 3, start: '2024-01', end: '2024-03' },
    options: { horizon: 1, holdout: 0, levels: [50, 90] },
    model: { key: 'k', label: 'l', equation: 'y[t] = e[t]', coefficient_level: 90, terms },
    evaluation: null,
    forecast: { rows: [{ time: '2024-04', point: 1 }] },
    warnings: [],
    files: [],
    out_dir: 'o',
  });
  const doc = (terms: unknown[]) => ({ ...resultDocument('forecast', []), results: [{ series: 's', status: 'ok', folder: 'o', reason: null, detail: forecastDetail(terms) }] });

  it('accepts terms with interval bounds, null bounds for a term left out', () => {
    expect(resultSchema.safeParse(doc([term, { ...term, name: 'r', active: false, lower: null, upper: null }])).success).toBe(true);
  });
  it('refuses a term without its bounds, and a model without the coefficient level', () => {
    const { lower: _lower, upper: _upper, ...bare } = term;
    expect(resultSchema.safeParse(doc([bare])).success).toBe(false);
    const noLevel = doc([term]);
    delete (noLevel.results[0].detail.model as { coefficient_level?: number }).coefficient_level;
    expect(resultSchema.safeParse(noLevel).success).toBe(false);
  });
});

describe('snakeKeys', () => {
  it('turns camelCase keys into snake_case at every depth and leaves values alone', () => {
    expect(snakeCase('beatenByBaseline')).toBe('beaten_by_baseline');
    expect(snakeCase('pValue')).toBe('p_value');
    expect(snakeCase('lower_80')).toBe('lower_80');
    expect(snakeKeys({ fittedOn: { startTime: 'outDir' }, rows: [{ meanError: 1 }], v: new Float64Array([1, 2]) })).toEqual({
      fitted_on: { start_time: 'outDir' },
      rows: [{ mean_error: 1 }],
      v: [1, 2],
    });
  });
});
