/**
 * Mauna Loa CO2, monthly (vega-datasets `co2-concentration.csv`, NOAA Global Monitoring
 * Laboratory record as shipped by the package): the last 24 months held out, default options.
 * Measured fixed-origin MASE 1.04 (MAE 1.6 ppm); the naive, drift and seasonal naive forecasts
 * score 1.54, 1.32 and 2.43. The ceiling was 0.9 while level structures on the log scale had an
 * exponential trend by default (0.86 then): this accelerating series is one an exponential line
 * suits, which the M3 benchmark's 2,202 series on average are not (README, accuracy section).
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadSeries } from '../../src/data/load.js';
import { forecastSeries } from '../../src/forecast/pipeline.js';

const file = join(process.cwd(), 'node_modules/vega-datasets/data/co2-concentration.csv');

describe('forecastSeries on Mauna Loa CO2', () => {
  it('fixed-origin MASE below 1.15 and below every baseline, sMAPE below the seasonal naive forecast', async () => {
    const { series } = await loadSeries(file, { series: 'CO2' });
    expect(series).toHaveLength(1);
    const run = forecastSeries(series[0], { holdout: 24 });
    const rows = run.evaluation!.table.filter((r) => r.view === 'fixed-origin');
    const model = rows.find((r) => r.method === 'model')!;
    const snaive = rows.find((r) => r.method === 'last-season')!;
    expect(model.metrics.n).toBe(24);
    expect(model.metrics.mase).toBeLessThan(1.15);
    expect(model.metrics.smape).toBeLessThan(snaive.metrics.smape);
    for (const baseline of ['last-value', 'average-change', 'last-season']) {
      expect(model.metrics.mase).toBeLessThan(rows.find((r) => r.method === baseline)!.metrics.mase);
    }
  });
});
