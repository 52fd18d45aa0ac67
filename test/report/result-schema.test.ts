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
