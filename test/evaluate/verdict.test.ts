import { describe, expect, it } from 'vitest';
import { baselineVerdict, type MetricRow } from '../../src/evaluate/backtest.js';
import { metricTable } from '../../src/evaluate/metrics.js';

// MASE by hand: training [1, 3, 2, 5] has in-sample naive MAE (2 + 1 + 3)/3 = 2.
const train = [1, 3, 2, 5];
const actual = [6, 4];
const row = (method: string, forecast: number[], view: MetricRow['view'] = 'fixed-origin'): MetricRow => ({ method, view, metrics: metricTable(actual, forecast, { train, season: 1 }) });

describe('baselineVerdict', () => {
  it('names the baseline with the lowest fixed-origin MASE and says it beat the model', () => {
    // model MAE 2 → MASE 1; naive (5, 5) MAE 1 → 0.5; drift (6, 7) MAE 1.5 → 0.75.
    const v = baselineVerdict([row('model', [4, 6]), row('last-value', [5, 5]), row('average-change', [6, 7]), row('last-value', [6, 4], 'rolling-one-step')]);
    expect(v).toEqual({ baseline: 'last-value', baselineMase: 0.5, modelMase: 1, beaten: true });
  });

  it('is not beaten on a tie, and ignores rows that are not baselines', () => {
    const v = baselineVerdict([row('model', [5, 5]), row('last-value', [5, 5]), row('asserted equation alone', [6, 4])]);
    expect(v?.beaten).toBe(false);
    expect(v?.baseline).toBe('last-value');
  });

  it('is null without a model row', () => {
    expect(baselineVerdict([row('last-value', [5, 5])])).toBeNull();
  });
});
