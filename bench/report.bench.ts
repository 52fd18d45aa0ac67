/**
 * report.html cost.
 *
 * 1. Writing one series' report: `forecastHtml(run, summary)` (page data, cumulative periodogram,
 *    tables, the inlined chart library) plus the atomic file write, for the demo series (120
 *    monthly points, two inputs, the default search), median of 50 after 5 warm-up runs; also
 *    the first call of a process alone (it reads the chart library from node_modules). The same
 *    for a batch series' report, which loads the batch's one copy of the chart library instead of
 *    inlining it.
 * 2. Opening a batch index of 1,000 series in chromium: `renderBatchIndex` of 1,000 rows written
 *    to a file, then the time from `page.goto` to the load event plus a filter keystroke's
 *    handling (headless /usr/bin/chromium, --no-sandbox --disable-gpu), median of 5.
 *
 * Targets: under 150 ms per series for the report; under 2 s for the 1,000-row index to open.
 * Run: `npm run bench -- report`.
 */
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium } from 'playwright-core';
import { loadSeries } from '../src/data/load.js';
import { forecastSeries } from '../src/forecast/pipeline.js';
import { renderBatchIndex, type BatchIndexRow } from '../src/report/batch-index.js';
import { forecastSummary } from '../src/report/forecast-report.js';
import { forecastHtml } from '../src/report/html-report.js';
import { CHART_ASSET, chartAssetSrc, chartLibraryScript } from '../src/report/html.js';
import { writeFileAtomic } from '../src/store/atomic.js';

const dir = mkdtempSync(join(tmpdir(), 'certa-bench-report-'));
const file = 'datasets/demo/vallmark-heatpumps.csv';
const { series } = await loadSeries(file, { inputs: ['subsidy', 'frost_index'] });
const run = forecastSeries(series[0]);
const summary = forecastSummary(run, { files: ['report.html'], outDir: dir });

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const t0 = performance.now();
await writeFileAtomic(join(dir, 'report.html'), forecastHtml(run, summary));
const first = performance.now() - t0;
for (let i = 0; i < 5; i++) forecastHtml(run, summary);
const times: number[] = [];
for (let i = 0; i < 50; i++) {
  const t = performance.now();
  await writeFileAtomic(join(dir, 'report.html'), forecastHtml(run, summary));
  times.push(performance.now() - t);
}
const size = readFileSync(join(dir, 'report.html')).length;
console.log(`report.html per series: median ${median(times).toFixed(1)} ms, first call ${first.toFixed(1)} ms, ${(size / 1024).toFixed(0)} KiB (target < 150 ms)`);
const shared = { chartLibrarySrc: chartAssetSrc('series') };
for (let i = 0; i < 5; i++) forecastHtml(run, summary, shared);
const sharedTimes: number[] = [];
for (let i = 0; i < 50; i++) {
  const t = performance.now();
  await writeFileAtomic(join(dir, 'report.html'), forecastHtml(run, summary, shared));
  sharedTimes.push(performance.now() - t);
}
const sharedSize = readFileSync(join(dir, 'report.html')).length;
console.log(`report.html of a batch series (chart library shared): median ${median(sharedTimes).toFixed(1)} ms, ${(sharedSize / 1024).toFixed(0)} KiB; the batch's one ${CHART_ASSET}: ${(Buffer.byteLength(chartLibraryScript()) / 1024).toFixed(0)} KiB`);

const chromiumPath = '/usr/bin/chromium';
if (!existsSync(chromiumPath)) {
  console.log(`batch index in chromium: not measured, no browser at ${chromiumPath}`);
} else {
  const rows: BatchIndexRow[] = Array.from({ length: 1000 }, (_, i) => ({
    series: `Vallmark region ${String(i).padStart(4, '0')} heat pumps`,
    folder: `region-${i}`,
    status: i % 37 === 0 ? 'failed' : 'ok',
    reason: i % 37 === 0 ? 'too short: 9 points' : null,
    structure: i % 37 === 0 ? null : `ARX lags 1-${1 + (i % 3)}, trend, ${i % 4} seasonal harmonics`,
    holdoutMase: i % 37 === 0 ? null : 0.5 + (i % 50) / 40,
    bestBaseline: i % 37 === 0 ? null : { name: ['last-value', 'last-season', 'average-change'][i % 3], mase: 0.7 + (i % 30) / 30 },
  }));
  const indexFile = join(dir, 'index.html');
  const tr = performance.now();
  await writeFileAtomic(indexFile, renderBatchIndex(rows));
  const render = performance.now() - tr;
  const browser = await chromium.launch({ executablePath: chromiumPath, headless: true, args: ['--headless', '--no-sandbox', '--disable-gpu'] });
  const opens: number[] = [];
  for (let i = 0; i < 5; i++) {
    const page = await browser.newPage();
    const t = performance.now();
    await page.goto(`file://${indexFile}`, { waitUntil: 'load' });
    await page.fill('#filter', 'region 09');
    await page.waitForFunction(() => (globalThis as any).document.getElementById('shown').textContent !== '1000');
    opens.push(performance.now() - t);
    await page.close();
  }
  await browser.close();
  console.log(`batch index of 1000 series: rendered in ${render.toFixed(1)} ms, opened in chromium (load + one filter) median ${median(opens).toFixed(0)} ms (target < 2000 ms)`);
}
