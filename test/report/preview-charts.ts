/**
 * Renders every chart on the invented demo data into output/charts-preview/ (git-ignored), to
 * look at them. Run: npx tsx test/report/preview-charts.ts
 */
import { mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { forecastChart, historyChart, holdoutChart, rankingChart, residualChart } from '../../src/report/charts.js';
import { lumoForecast, lumoHistory, lumoHoldout, lumoRanking, lumoResiduals } from './chart-fixtures.js';

const dir = join('output', 'charts-preview');
mkdirSync(dir, { recursive: true });
const charts: Record<string, Buffer> = {
  'history.png': historyChart(lumoHistory),
  'forecast.png': forecastChart(lumoForecast),
  'holdout.png': holdoutChart(lumoHoldout),
  'ranking.png': rankingChart(lumoRanking),
  'residuals.png': residualChart(lumoResiduals),
};
for (const [name, png] of Object.entries(charts)) {
  const tmp = join(dir, `.${name}.tmp`);
  writeFileSync(tmp, png);
  renameSync(tmp, join(dir, name));
}
process.stdout.write(`wrote ${Object.keys(charts).length} charts to ${dir}\n`);
