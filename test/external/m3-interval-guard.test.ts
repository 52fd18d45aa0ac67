/**
 * Interval guard: the default pipeline's prediction bands on a fixed tenth of the M3 series
 * (every 10th series of the yearly, quarterly and the monthly and "other" development files,
 * datasets/m3), scored as `npm run bench:accuracy` scores the whole set (src/evaluate/m3.ts).
 * Coverage must stay inside a band around its nominal level, and the 95 % band's mean scaled
 * interval score (MSIS; Makridakis, Spiliotis & Assimakopoulos 2020, IJF 36(1)) must stay below
 * the seasonal-naive Gaussian reference's, so a change that makes the bands over-confident (or
 * uselessly wide) fails here. The bands are wide enough to allow for the subset's sampling
 * error (222 series; the whole benchmark's figures are in the README).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { certaForecaster, parseM3, scoreM3, summariseM3, type M3Category } from '../../src/evaluate/m3.js';

const FILES: Record<M3Category, string> = { yearly: 'M3Year.csv', quarterly: 'M3Quart.csv', monthly: 'M3Month-dev.csv', other: 'M3Other-dev.csv' };
const items = (Object.keys(FILES) as M3Category[]).flatMap((c) =>
  parseM3(readFileSync(new URL(`../../datasets/m3/${FILES[c]}`, import.meta.url), 'utf8'), c, FILES[c]).filter((_, i) => i % 10 === 0),
);

/** Allowed coverage (percent) on the pooled subset, per level: nominal −6 … +3 at 80 %, −5 … +2.5 at 95 %. */
const BAND = { 80: [74, 83], 95: [90, 97.5] } as const;

describe('M3 interval guard (every 10th series of the four files)', () => {
  const results = scoreM3(items, certaForecaster());
  const all = summariseM3('all', results);
  const band = (level: number) => all.bands.find((b) => b.level === level)!;

  it('scores 222 series, each with both bands', () => {
    expect(all.series).toBe(222);
    expect(band(80).series).toBe(222);
    expect(band(95).series).toBe(222);
  });

  for (const level of [80, 95] as const) {
    it(`keeps the ${level} % band's coverage within ${BAND[level][0]}–${BAND[level][1]} %, also at the last step (at most 6 points lower)`, () => {
      const b = band(level);
      expect(100 * b.coverage).toBeGreaterThanOrEqual(BAND[level][0]);
      expect(100 * b.coverage).toBeLessThanOrEqual(BAND[level][1]);
      expect(100 * b.last).toBeGreaterThanOrEqual(BAND[level][0] - 6);
    });
  }

  it('keeps the 95 % MSIS below the seasonal-naive Gaussian reference', () => {
    const ref = all.referenceBands.find((b) => b.level === 95)!;
    expect(band(95).scaledScore).toBeLessThan(ref.scaledScore);
  });
});
