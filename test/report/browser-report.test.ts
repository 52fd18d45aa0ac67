/**
 * report.html in a real browser (chromium, headless): it loads with no console error and no
 * network request, every chart canvas is drawn (not blank), and a series named like markup shows
 * as text. The page is the one the built CLI writes.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt, runCli } from '../cli/run-cli.js';
import { browserSkipReason, launchBrowser, openFile } from './browser.js';

const skip = browserSkipReason();
if (skip) console.warn(skip);

const HOSTILE = '<img src=x onerror=alert(1)>';

/** Share of a canvas's pixels that are not transparent or white. */
async function inkShare(page: Page, id: string): Promise<number> {
  return page.evaluate((canvasId) => {
    // runs in the page: the DOM is there, its types are not part of this project
    const c = (globalThis as any).document.getElementById(canvasId);
    if (!c || c.width === 0 || c.height === 0) return 0;
    const d: Uint8ClampedArray = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
    let ink = 0;
    for (let i = 0; i < d.length; i += 4) if (d[i + 3] > 0 && !(d[i] > 245 && d[i + 1] > 245 && d[i + 2] > 245)) ink++;
    return ink / (d.length / 4);
  }, id);
}

/** Opens a report, waits until its charts are drawn and checks it stayed clean: no console error, request or dialog. */
async function openDrawn(browser: Browser, file: string): Promise<Page> {
  const { page, log } = await openFile(browser, file);
  await page.waitForFunction(() => (globalThis as any).document.documentElement.getAttribute('data-charts') === 'drawn', undefined, { timeout: 10_000 });
  expect(log.errors).toEqual([]);
  expect(log.requests).toEqual([]);
  expect(log.dialogs).toEqual([]);
  return page;
}

describe.skipIf(skip !== null)('report.html in chromium', () => {
  let browser: Browser;
  let dir: string;
  beforeAll(async () => {
    ensureBuilt();
    browser = await launchBrowser();
    dir = mkdtempSync(join(tmpdir(), 'certa-browser-'));
    // the demo series under a name that is markup
    const csv = readFileSync('datasets/demo/vallmark-heatpumps.csv', 'utf8').split('\n');
    const header = csv[0].split(',');
    header[1] = `"${HOSTILE}"`;
    writeFileSync(join(dir, 'in.csv'), [header.join(','), ...csv.slice(1)].join('\n'));
    const r = runCli(['forecast', join(dir, 'in.csv'), '--value', HOSTILE, '--inputs', 'subsidy,frost_index', '--no-charts', '--out', join(dir, 'out')]);
    expect(r.code, r.stderr).toBe(0);
    // a model fitted to 2024-06, then updated with the whole file: the update's own report.html
    const lines = [header.join(','), ...csv.slice(1)].filter((l) => l.trim() !== '');
    const cut = lines.findIndex((l) => l.startsWith('2024-07'));
    writeFileSync(join(dir, 'in-cut.csv'), `${lines.slice(0, cut).join('\n')}\n`);
    const f = runCli(['forecast', join(dir, 'in-cut.csv'), '--value', HOSTILE, '--inputs', 'subsidy,frost_index', '--no-charts', '--no-report', '--holdout', '0', '--out', join(dir, 'up')]);
    expect(f.code, f.stderr).toBe(0);
    const u = runCli(['update', join(dir, 'up', 'model.json'), join(dir, 'in.csv'), '--value', HOSTILE, '--no-charts']);
    expect(u.code, u.stderr).toBe(0);
  }, 120_000);
  afterAll(async () => {
    await browser?.close();
  });

  it('loads without console errors, requests or dialogs and draws every chart', async () => {
    const page = await openDrawn(browser, join(dir, 'out', 'report.html'));
    for (const id of ['chart-forecast', 'chart-holdout', 'chart-periodogram', 'chart-residuals']) expect(await inkShare(page, id), id).toBeGreaterThan(0.01);
    // the caution and the sections are there
    const text = await page.locator('body').innerText();
    expect(text).toMatch(/not physical climate projections and not financial advice/);
    for (const heading of ['The asserted equation', 'Coefficients', 'Residual checks', 'Candidates and why the winner won']) expect(text).toContain(heading);
    await page.close();
  }, 60_000);

  it('shows a series named like markup as text, not as an element', async () => {
    const { page, log } = await openFile(browser, join(dir, 'out', 'report.html'));
    expect(await page.locator('h1').innerText()).toBe(HOSTILE);
    expect(await page.locator('img').count()).toBe(0);
    expect(await page.title()).toContain(HOSTILE);
    expect(log.dialogs).toEqual([]);
    await page.close();
  }, 60_000);

  it('the report of certa update loads cleanly, draws its forecast and keeps markup as text', async () => {
    const page = await openDrawn(browser, join(dir, 'up', 'report.html'));
    expect(await inkShare(page, 'chart-forecast')).toBeGreaterThan(0.01);
    expect(await page.locator('h1').innerText()).toBe(HOSTILE);
    expect(await page.locator('img').count()).toBe(0);
    const text = await page.locator('body').innerText();
    expect(text).toContain('What this update did');
    expect(text).toMatch(/6 new observations \(2024-07 to 2024-12\)/);
    expect(text).toMatch(/not physical climate projections and not financial advice/);
    await page.close();
  }, 60_000);

  it('shows the values under the pointer (tooltip) on the forecast chart', async () => {
    const { page } = await openFile(browser, join(dir, 'out', 'report.html'));
    await page.waitForFunction(() => (globalThis as any).document.documentElement.getAttribute('data-charts') === 'drawn');
    const canvas = page.locator('#chart-forecast');
    await canvas.scrollIntoViewIfNeeded();
    const box = (await canvas.boundingBox())!;
    const before = await inkShare(page, 'chart-forecast');
    await page.mouse.move(box.x + box.width * 0.85, box.y + box.height * 0.5);
    await page.waitForTimeout(150);
    const after = await inkShare(page, 'chart-forecast');
    expect(after).toBeGreaterThan(before);
    await page.close();
  }, 60_000);
});
