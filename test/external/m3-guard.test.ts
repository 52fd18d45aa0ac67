/**
 * Accuracy guard: the default pipeline on a fixed part of the M3 series (datasets/m3): every
 * 10th yearly, quarterly and monthly series and every 3rd "other" series (that file's
 * development half has 87, so a tenth would be 9), scored exactly as `npm run bench:accuracy`
 * scores the whole set (src/evaluate/m3.ts). The ceilings are the subset's measured sMAPE plus a
 * margin of 0.3, so a change that makes the default forecasts worse fails here.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { certaForecaster, parseM3, scoreM3, summariseM3ByFrequency, type M3Category, type M3Item } from '../../src/evaluate/m3.js';

const read = (file: string, f: M3Category, every: number): M3Item[] =>
  parseM3(readFileSync(new URL(`../../datasets/m3/${file}`, import.meta.url), 'utf8'), f, file).filter((_, i) => i % every === 0);

/** Series in the subset, measured sMAPE of this subset + 0.3, and the failures allowed (scored with Naive2). */
const CEILING: Record<M3Category, { series: number; smape: number; failures: number }> = {
  yearly: { series: 65, smape: 14.36 + 0.3, failures: 0 },
  quarterly: { series: 76, smape: 9.16 + 0.3, failures: 0 },
  monthly: { series: 72, smape: 12.53 + 0.3, failures: 0 },
  other: { series: 29, smape: 4.24 + 0.3, failures: 0 },
};

describe('M3 accuracy guard (every 10th yearly, quarterly and monthly series, every 3rd other series)', () => {
  const items = [
    ...read('M3Year.csv', 'yearly', 10),
    ...read('M3Quart.csv', 'quarterly', 10),
    ...read('M3Month-dev.csv', 'monthly', 10),
    ...read('M3Other-dev.csv', 'other', 3),
  ];
  const results = scoreM3(items, certaForecaster());
  const summaries = summariseM3ByFrequency(results);

  for (const [category, ceiling] of Object.entries(CEILING) as [M3Category, (typeof CEILING)[M3Category]][]) {
    it(`${category}: ${ceiling.series} series, sMAPE at or below ${ceiling.smape.toFixed(2)}`, () => {
      const s = summaries.find((x) => x.group === category);
      expect(s?.series).toBe(ceiling.series);
      expect(s?.smape).toBeLessThanOrEqual(ceiling.smape);
      expect(s?.failures).toBeLessThanOrEqual(ceiling.failures);
    });
  }
});
