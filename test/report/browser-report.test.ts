/**
 * report.html in a real browser (chromium, headless): it loads with no console error and no
 * network request, every chart canvas is drawn (not blank), and a series named like markup shows
 * as text. The page is the one the built CLI writes. A batch series' report, opened from its
 * batch folder, loads the batch's one copy of the chart library and nothing else; moved out of
 * the batch folder it says that its charts need that file, while its text and tables still show;
 * and its policy keeps any other script or style from taking effect.
 */
import { cpSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { folderNames } from '../../src/batch/folder-names.js';
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

/** A local file as the page log names it (openFile opens `file://` + the path). */
const url = (file: string) => `file://${file}`;
const filesRead = (files: string[]) => files.map(decodeURI);

/** Waits until the report's script has run: `drawn`, or `missing` when its chart library did not load. */
async function chartsState(page: Page, state: 'drawn' | 'missing'): Promise<void> {
  await page.waitForFunction((s) => (globalThis as any).document.documentElement.getAttribute('data-charts') === s, state, { timeout: 10_000 });
}

/**
 * Opens a report, waits until its charts are drawn and checks it stayed clean: no console error,
 * request or dialog, and no local file read but the page and `alsoLoads`.
 */
async function openDrawn(browser: Browser, file: string, alsoLoads: string[] = []): Promise<Page> {
  const { page, log } = await openFile(browser, file);
  await chartsState(page, 'drawn');
  expect(log.errors).toEqual([]);
  expect(log.requests).toEqual([]);
  expect(filesRead(log.files)).toEqual([url(file), ...alsoLoads.map(url)]);
  expect(log.dialogs).toEqual([]);
  return page;
}

/** Hovers the right of the forecast chart and tells whether a tooltip added ink. */
async function hoverShowsTooltip(page: Page): Promise<boolean> {
  const canvas = page.locator('#chart-forecast');
  await canvas.scrollIntoViewIfNeeded();
  const box = (await canvas.boundingBox())!;
  const before = await inkShare(page, 'chart-forecast');
  await page.mouse.move(box.x + box.width * 0.85, box.y + box.height * 0.5);
  await page.waitForTimeout(150);
  return (await inkShare(page, 'chart-forecast')) > before;
}

const CHARTS = ['chart-forecast', 'chart-holdout', 'chart-periodogram', 'chart-residuals'];
/** Invented product lines of an invented district: a batch of three monthly series. */
const LINES = ['Tessel north', 'Tessel south', 'Orrin'];

/** A long-layout file of the LINES, 60 months each, trend, yearly cycle and seeded noise. */
function batchFile(path: string): void {
  let s = 7;
  const noise = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32 - 0.5;
  };
  const rows = ['line,month,units'];
  LINES.forEach((name, k) => {
    for (let t = 0; t < 60; t++) {
      const y = 120 + 15 * k + 0.8 * t + 14 * Math.sin((2 * Math.PI * t) / 12 + k) + 6 * noise();
      rows.push(`"${name}",${2020 + Math.floor(t / 12)}-${String((t % 12) + 1).padStart(2, '0')},${y.toFixed(2)}`);
    }
  });
  writeFileSync(path, `${rows.join('\n')}\n`);
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
    // a batch, and one of its series folders moved out of the batch folder
    batchFile(join(dir, 'lines.csv'));
    const b = runCli(['forecast', join(dir, 'lines.csv'), '--id', 'line', '--no-charts', '--quiet', '--out', join(dir, 'batch')]);
    expect(b.code, b.stderr).toBe(0);
    cpSync(join(dir, 'batch', folderNames(LINES)[0]), join(dir, 'moved', folderNames(LINES)[0]), { recursive: true });
  }, 120_000);
  afterAll(async () => {
    await browser?.close();
  });

  it('loads without console errors, requests or dialogs and draws every chart', async () => {
    const page = await openDrawn(browser, join(dir, 'out', 'report.html'));
    for (const id of CHARTS) expect(await inkShare(page, id), id).toBeGreaterThan(0.01);
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
    await chartsState(page, 'drawn');
    expect(await hoverShowsTooltip(page)).toBe(true);
    await page.close();
  }, 60_000);

  it('a batch series report opened from the batch folder loads the shared library and nothing else, draws every chart and its tooltip', async () => {
    for (const folder of folderNames(LINES)) {
      const file = join(dir, 'batch', folder, 'report.html');
      const page = await openDrawn(browser, file, [join(dir, 'batch', 'assets', 'charts.js')]);
      for (const id of CHARTS) expect(await inkShare(page, id), `${folder} ${id}`).toBeGreaterThan(0.01);
      expect(await page.locator('#charts-missing').isVisible()).toBe(false);
      expect(await page.locator('.chart.missing').count()).toBe(0);
      expect(await hoverShowsTooltip(page)).toBe(true);
      await page.close();
    }
  }, 60_000);

  it('moved out of its batch folder, the report says its charts need ../assets/charts.js, and its text and tables still show', async () => {
    const folder = folderNames(LINES)[0];
    const file = join(dir, 'moved', folder, 'report.html');
    const { page, log } = await openFile(browser, file);
    await chartsState(page, 'missing');
    const note = page.locator('#charts-missing');
    expect(await note.isVisible()).toBe(true);
    expect(await note.innerText()).toMatch(/The charts are not shown\. .*assets\/charts\.js.*\.\.\/assets\/charts\.js.*Open the report inside its batch folder/s);
    // each chart box says so in a line instead of an empty canvas
    expect(await page.locator('.chart.missing').count()).toBe(CHARTS.length);
    for (const id of CHARTS) expect(await page.locator(`#${id}`).isVisible(), id).toBe(false);
    expect(await page.locator('.chart.missing p.note').first().innerText()).toMatch(/Chart not shown: its chart library did not load/);
    // the text and the tables are all there
    expect(await page.locator('h1').innerText()).toBe(LINES[0]);
    const text = await page.locator('body').innerText();
    for (const heading of ['Read this first.', 'In short', 'The asserted equation', 'Coefficients', 'Holdout', 'Candidates and why the winner won', 'Residual checks']) expect(text).toContain(heading);
    expect(await page.locator('#equation table tbody tr').count()).toBeGreaterThan(1);
    expect(await page.locator('#holdout table tbody tr').count()).toBeGreaterThan(4);
    expect(await page.locator('#candidates table tbody tr').count()).toBeGreaterThan(1);
    // the one error is the missing file itself; nothing else was fetched
    expect(filesRead(log.files)).toEqual([url(file), url(join(dir, 'moved', 'assets', 'charts.js'))]);
    expect(log.errors).toHaveLength(1);
    expect(log.errors[0]).toMatch(/ERR_FILE_NOT_FOUND/);
    expect(log.requests).toEqual([]);
    expect(log.dialogs).toEqual([]);
    await page.close();
  }, 60_000);

  it("a batch report's policy runs only its own scripts and style: an added inline script, a remote one and a style element are refused", async () => {
    const folder = folderNames(LINES)[1];
    const html = readFileSync(join(dir, 'batch', folder, 'report.html'), 'utf8');
    const extra = '<script>document.documentElement.setAttribute("data-intruder", "ran")</script><script src="https://scripts.invalid/x.js"></script><style>body { background: rgb(255, 0, 0); }</style>';
    const file = join(dir, 'batch', folder, 'altered.html');
    writeFileSync(file, html.replace('</main>', `</main>\n${extra}`));
    const { page, log } = await openFile(browser, file);
    await chartsState(page, 'drawn');
    expect(await page.evaluate(() => (globalThis as any).document.documentElement.getAttribute('data-intruder'))).toBeNull();
    // both refused by the policy (the remote one before any byte arrives; nothing but the page
    // and the shared library is read from disk)
    expect(log.errors.length).toBeGreaterThanOrEqual(2);
    for (const e of log.errors) expect(e).toMatch(/Content Security Policy/);
    expect(log.errors.some((e) => /inline script/.test(e))).toBe(true);
    expect(log.errors.some((e) => /inline style/.test(e))).toBe(true);
    expect(await page.evaluate(() => (globalThis as any).getComputedStyle((globalThis as any).document.body).backgroundColor)).not.toBe('rgb(255, 0, 0)');
    expect(log.errors.some((e) => e.includes('https://scripts.invalid/x.js'))).toBe(true);
    expect(filesRead(log.files)).toEqual([url(file), url(join(dir, 'batch', 'assets', 'charts.js'))]);
    await page.close();
  }, 60_000);
});
