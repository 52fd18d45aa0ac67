/**
 * Checks a `--json` result document (src/report/result-json.ts) against the published schema
 * (docs/result.schema.json, through its zod source) and for snake_case keys at every depth;
 * returns it parsed.
 */
import { expect } from 'vitest';
import { resultSchema } from '../../src/report/result-schema.js';

const SNAKE = /^[a-z0-9]+(_[a-z0-9]+)*$/;

/** Every object key under `value` that is not snake_case, with its path. */
export function nonSnakeKeys(value: unknown, path = '$'): string[] {
  if (value === null || typeof value !== 'object') return [];
  if (Array.isArray(value)) return value.flatMap((v, i) => nonSnakeKeys(v, `${path}[${i}]`));
  return Object.entries(value as Record<string, unknown>).flatMap(([k, v]) => [...(SNAKE.test(k) ? [] : [`${path}.${k}`]), ...nonSnakeKeys(v, `${path}.${k}`)]);
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export function parseResult(stdout: string): Record<string, any> {
  const doc = JSON.parse(stdout) as unknown;
  const checked = resultSchema.safeParse(doc);
  expect(checked.success, checked.success ? '' : JSON.stringify(checked.error.issues.slice(0, 3))).toBe(true);
  expect(nonSnakeKeys(doc)).toEqual([]);
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  return doc as Record<string, any>;
}
