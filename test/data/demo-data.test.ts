import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { generate } from '../../datasets/demo/generate.js';

describe('demo dataset', () => {
  it('the committed CSV is exactly what its seeded generator writes', () => {
    const committed = readFileSync(join(process.cwd(), 'datasets/demo/vallmark-heatpumps.csv'), 'utf8');
    expect(generate()).toBe(committed);
  });
});
