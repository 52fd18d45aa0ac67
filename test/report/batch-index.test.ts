/**
 * renderBatchIndex: every series linked to its report, input text escaped, and the page in
 * chromium (when present) loads without errors or requests, filters its rows, and keeps markup
 * in names as text.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { renderBatchIndex, type BatchIndexRow } from '../../src/report/batch-index.js';
import { browserSkipReason, launchBrowser, openFile } from './browser.js';

const rows: BatchIndexRow[] = [
  { series: 'Tarnby ovens', folder: 'tarnby-ovens', status: 'forecast', reason: null, structure: 'ARX lags 1-2, trend', holdoutMase: 0.81, bestBaseline: { name: 'last-season', mase: 0.97 } },
  { series: '<img src=x onerror=alert(1)>', folder: 'odd name/ü', status: 'forecast', reason: null, structure: 'logistic growth path', holdoutMase: 1.2, bestBaseline: { name: 'last-value', mase: 1.1 } },
  { series: 'Brenn kettles', folder: 'brenn', status: 'failed', reason: 'too short: 5 points, need 12', structure: null, holdoutMase: null, bestBaseline: null },
];

describe('renderBatchIndex', () => {
  it('links every forecast series to its report.html and escapes input text', () => {
    const html = renderBatchIndex(rows);
    expect(html).toContain('<a href="tarnby-ovens/report.html">Tarnby ovens</a>');
    expect(html).toContain('href="odd%20name/%C3%BC/report.html"');
    expect(html).toContain('&lt;img src=x onerror=alert(1)&gt;');
    expect(html).not.toContain('<img');
    expect(html).toContain('too short: 5 points, need 12');
    expect(html).toMatch(/3 series: 2 forecast, 1 not; the best baseline beat the model on 1/);
  });
  it('is deterministic', () => {
    expect(renderBatchIndex(rows)).toBe(renderBatchIndex(rows));
  });
  it('after an update: a column of what it did to each series, a drift alarm tagged, and its totals', () => {
    const plain = renderBatchIndex(rows);
    expect(plain).not.toContain('last update');
    const updated: BatchIndexRow[] = [
      { ...rows[0], update: { status: 'updated', text: '2 new rows to 2025-02; policy adapt', alarms: 1 } },
      { ...rows[1], update: { status: 'unchanged', text: 'not in the <new> data', alarms: 0 } },
      { ...rows[2], update: { status: 'failed', text: 'no model in this batch', alarms: 0 } },
    ];
    const html = renderBatchIndex(updated, 'certa batch', { updated: 1, unchanged: 1, failed: 2, alarms: 1, withoutModel: 1 });
    expect(html).toContain('<th>last update</th>');
    expect(html).toContain('<span class="tag bad">1 drift alarm</span> <span class="note">2 new rows to 2025-02; policy adapt</span>');
    expect(html).toContain('<span class="tag">unchanged</span> <span class="note">not in the &lt;new&gt; data</span>');
    expect(html).toContain('<span class="tag bad">failed</span>');
    expect(html).toContain('Last update (updates.csv): 1 updated, 1 unchanged, 2 failed; 1 drift alarm; 1 series of the new data without a model here.');
    // every row has the column, so the table stays rectangular
    const bodyRows = html.split('<tbody>')[1].split('</tbody>')[0].split('</tr>').filter((r) => r.includes('<td'));
    expect(bodyRows.map((r) => r.match(/<td/g)!.length)).toEqual([6, 6, 6]);
    expect(html.split('</thead>')[0].match(/<th[\s>]/g)).toHaveLength(6);
  });
});

const skip = browserSkipReason();
describe.skipIf(skip !== null)('renderBatchIndex in chromium', () => {
  let browser: Browser;
  let file: string;
  beforeAll(async () => {
    browser = await launchBrowser();
    file = join(mkdtempSync(join(tmpdir(), 'certa-index-')), 'index.html');
    writeFileSync(file, renderBatchIndex(rows));
  });
  afterAll(async () => {
    await browser?.close();
  });
  it('loads cleanly, shows markup as text and filters rows', async () => {
    const { page, log } = await openFile(browser, file);
    expect(log.errors).toEqual([]);
    expect(log.requests).toEqual([]);
    // self-contained: its filter script is inline (admitted by its hash), nothing else is read
    expect(log.files.map(decodeURI)).toEqual([`file://${file}`]);
    expect(await page.locator('img').count()).toBe(0);
    expect(await page.locator('#series tbody tr').count()).toBe(3);
    await page.fill('#filter', 'kettles');
    expect(await page.locator('#shown').innerText()).toBe('1');
    expect(log.dialogs).toEqual([]);
    await page.close();
  }, 30_000);
});
