/**
 * Accuracy guard: the default pipeline on a fixed tenth of the M3 yearly and quarterly series
 * (every 10th series of each file, datasets/m3), scored exactly as `npm run bench:accuracy`
 * scores the whole set (src/evaluate/m3.ts). The ceilings are the subset's measured sMAPE plus
 * a margin of 0.3, so a change that makes the default forecasts worse fails here.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { certaForecaster, parseM3, scoreM3, summariseM3ByFrequency, type M3Item } from '../../src/evaluate/m3.js';

const read = (file: string, f: 'yearly' | 'quarterly'): M3Item[] =>
  parseM3(readFileSync(new URL(`../../datasets/m3/${file}`, import.meta.url), 'utf8'), f, file).filter((_, i) => i % 10 === 0);

/** Measured sMAPE of this subset + 0.3, and the failures allowed (scored with Naive2). */
const CEILING = {
  yearly: { smape: 14.31 + 0.3, failures: 0 },
  quarterly: { smape: 9.83 + 0.3, failures: 0 },
};

describe('M3 accuracy guard (every 10th yearly and quarterly series)', () => {
  const items = [...read('M3Year.csv', 'yearly'), ...read('M3Quart.csv', 'quarterly')];
  const results = scoreM3(items, certaForecaster());
  const [y, q] = summariseM3ByFrequency(results);

  it('scores 65 yearly and 76 quarterly series', () => {
    expect(y.group).toBe('yearly');
    expect(y.series).toBe(65);
    expect(q.group).toBe('quarterly');
    expect(q.series).toBe(76);
  });

  it(`yearly sMAPE stays at or below ${CEILING.yearly.smape.toFixed(2)}`, () => {
    expect(y.smape).toBeLessThanOrEqual(CEILING.yearly.smape);
    expect(y.failures).toBeLessThanOrEqual(CEILING.yearly.failures);
  });

  it(`quarterly sMAPE stays at or below ${CEILING.quarterly.smape.toFixed(2)}`, () => {
    expect(q.smape).toBeLessThanOrEqual(CEILING.quarterly.smape);
    expect(q.failures).toBeLessThanOrEqual(CEILING.quarterly.failures);
  });
});
