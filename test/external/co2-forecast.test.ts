/**
 * Mauna Loa CO2, monthly (vega-datasets `co2-concentration.csv`, NOAA Global Monitoring
 * Laboratory record as shipped by the package): the last 24 months held out, default options.
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadSeries } from '../../src/data/load.js';
import { forecastSeries } from '../../src/forecast/pipeline.js';

const file = join(process.cwd(), 'node_modules/vega-datasets/data/co2-concentration.csv');

describe('forecastSeries on Mauna Loa CO2', () => {
  it('fixed-origin MASE below 0.9 and sMAPE below the seasonal naive forecast', async () => {
    const { series } = await loadSeries(file, { series: 'CO2' });
    expect(series).toHaveLength(1);
    const run = forecastSeries(series[0], { holdout: 24 });
    const rows = run.evaluation!.table.filter((r) => r.view === 'fixed-origin');
    const model = rows.find((r) => r.method === 'model')!;
    const snaive = rows.find((r) => r.method === 'seasonal-naive')!;
    expect(model.metrics.n).toBe(24);
    expect(model.metrics.mase).toBeLessThan(0.9);
    expect(model.metrics.smape).toBeLessThan(snaive.metrics.smape);
  });
});
