import { describe, expect, it } from 'vitest';
import { choiceInputs, neighbours, startChoice, stepwise, type InputChoice } from '../../src/models/arx-inputs.js';
import type { CandidateBounds } from '../../src/models/registry.js';
import { makeSeries, noise } from './arx-fixtures.js';

const bounds: CandidateBounds = {
  maxAr: 1, maxInputLags: 2, maxDelay: 2, inputs: ['a', 'b'], harmonics: [0], season: 12,
  transforms: ['none'], trend: [false], seasonalLag: [false], differencing: ['none'],
};

const show = (c: InputChoice) => c.map((x) => (x.lags > 0 ? `${x.name}:${x.lags}@${x.delay}` : `${x.name}:out`)).join(' ');

describe('neighbours(choice, bounds): every choice one input term away', () => {
  it('for a = lag 0 only and b left out: one lag more or fewer at either end, a shift, and b added at each delay (enumerated by hand)', () => {
    const c: InputChoice = [{ name: 'a', lags: 1, delay: 0 }, { name: 'b', lags: 0, delay: 0 }];
    expect(neighbours(c, bounds).map(show)).toEqual([
      'a:2@0 b:out', // one more lag at the end (lags 0-1)
      'a:out b:out', // one fewer (the input left out)
      'a:1@1 b:out', // shifted one period later
      'a:1@0 b:1@0', // b at delay 0, 1 and 2
      'a:1@0 b:1@1',
      'a:1@0 b:1@2',
    ]);
  });

  it('never leaves the bounds: delay ≤ maxDelay, lags ≤ maxInputLags', () => {
    const c: InputChoice = [{ name: 'a', lags: 2, delay: 2 }, { name: 'b', lags: 1, delay: 1 }];
    for (const n of neighbours(c, bounds)) {
      for (const x of n) {
        expect(x.lags).toBeLessThanOrEqual(2);
        if (x.lags > 0) expect(x.delay).toBeLessThanOrEqual(2);
      }
    }
    expect(neighbours(c, bounds).map(show)).toContain('a:1@2 b:1@1');
    expect(neighbours(c, bounds).map(show)).toContain('a:2@2 b:2@0');
  });

  it('choiceInputs keeps the inputs with lags, in bounds order', () => {
    expect(choiceInputs([{ name: 'a', lags: 0, delay: 2 }, { name: 'b', lags: 2, delay: 1 }])).toEqual([{ name: 'b', lags: 2, delay: 1 }]);
  });
});

describe('stepwise(start, score, bounds)', () => {
  it('walks to the minimum of a score that counts the terms away from a = lags 1-2, b = lag 2 (three moves from nothing)', () => {
    const target: InputChoice = [{ name: 'a', lags: 2, delay: 1 }, { name: 'b', lags: 1, delay: 2 }];
    const lagsOf = (c: InputChoice[number]) => new Set(Array.from({ length: c.lags }, (_, l) => c.delay + l));
    const score = (c: InputChoice) => {
      let miss = 0;
      c.forEach((x, j) => {
        const have = lagsOf(x);
        const want = lagsOf(target[j]);
        for (const l of have) if (!want.has(l)) miss++;
        for (const l of want) if (!have.has(l)) miss++;
      });
      return miss;
    };
    const none: InputChoice = [{ name: 'a', lags: 0, delay: 0 }, { name: 'b', lags: 0, delay: 0 }];
    expect(show(stepwise(none, score, bounds))).toBe('a:2@1 b:1@2');
  });
});

describe('startChoice(series, bounds, base)', () => {
  it('reads the delays 0 and 2 of y_t = 3·a_t − 2·b_{t−2} + e_t off the prewhitened cross-correlations, one lag each', () => {
    const n = 150;
    const a = noise(n, 1, 11);
    const b = noise(n, 1, 12);
    const e = noise(n, 0.5, 13);
    const y = Array.from(a, (v, t) => 3 * v - 2 * (t >= 2 ? b[t - 2] : 0) + e[t]);
    const s = makeSeries(y, { a, b });
    expect(show(startChoice(s, bounds, { transform: 'none', differencing: 'none', season: 12 }))).toBe('a:1@0 b:1@2');
  });
});
