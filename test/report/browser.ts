/**
 * Chromium for the browser tests: Debian's /usr/bin/chromium driven by playwright-core, headless,
 * without sandbox or GPU. When it is missing the tests skip with a message, unless
 * CERTA_BROWSER_TESTS=required (set by .ci/run), where a missing browser fails them.
 */
import { existsSync } from 'node:fs';
import { chromium, type Browser, type Page } from 'playwright-core';

export const CHROMIUM = process.env.CERTA_CHROMIUM ?? '/usr/bin/chromium';
export const browserRequired = process.env.CERTA_BROWSER_TESTS === 'required';
export const browserPresent = existsSync(CHROMIUM);

/** Why the browser tests do not run here, or null when they do. */
export function browserSkipReason(): string | null {
  if (browserPresent || browserRequired) return null;
  return `browser tests skipped: no chromium at ${CHROMIUM} (install Debian's chromium package, or set CERTA_BROWSER_TESTS=required to make this a failure)`;
}

export async function launchBrowser(): Promise<Browser> {
  if (!browserPresent) throw new Error(`CERTA_BROWSER_TESTS=required but there is no chromium at ${CHROMIUM}`);
  return chromium.launch({ executablePath: CHROMIUM, headless: true, args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'] });
}

/** What happened while a page opened: console errors, page errors, requests, dialogs. */
export interface PageLog {
  errors: string[];
  /** Requests of anything but a local file or a data URL (a page of certa makes none). */
  requests: string[];
  /** Local files requested, the page itself first. */
  files: string[];
  dialogs: string[];
}

/** Opens a local file, recording every console error, uncaught error, request and dialog. */
export async function openFile(browser: Browser, file: string, viewport = { width: 1200, height: 900 }): Promise<{ page: Page; log: PageLog }> {
  const page = await browser.newPage({ viewport });
  const log: PageLog = { errors: [], requests: [], files: [], dialogs: [] };
  page.on('console', (m) => {
    if (m.type() === 'error') log.errors.push(m.text());
  });
  page.on('pageerror', (e) => log.errors.push(String(e)));
  page.on('request', (r) => {
    if (r.url().startsWith('file://')) log.files.push(r.url());
    else if (!r.url().startsWith('data:')) log.requests.push(r.url());
  });
  page.on('dialog', (d) => {
    log.dialogs.push(d.message());
    void d.dismiss();
  });
  const url = `file://${file}`;
  await page.goto(url, { waitUntil: 'load' });
  return { page, log };
}
