/**
 * The page shell of html.ts and how report.html gets its chart library: inline by default, or
 * the batch's shared copy by a relative path, with the note for when it is missing. The policy's
 * script hashes are checked against node:crypto's SHA-256 of the script text (the CSP hash of an
 * inline script is the base64 SHA-256 of its text); the pages themselves are run in chromium by
 * browser-report.test.ts.
 */
import { createHash } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadSeries } from '../../src/data/load.js';
import { forecastSeries, type ForecastRun } from '../../src/forecast/pipeline.js';
import { forecastSummary } from '../../src/report/forecast-report.js';
import { forecastHtml } from '../../src/report/html-report.js';
import { CHART_ASSET, chartAssetSrc, chartLibraryScript, page, PAGE_STYLE, pagePolicy } from '../../src/report/html.js';
import { reportScript } from '../../src/report/report-script.js';

const sha = (text: string) => `'sha256-${createHash('sha256').update(text, 'utf8').digest('base64')}'`;

/** The policy a page declares. */
function policyOf(html: string): string {
  return /<meta http-equiv="Content-Security-Policy" content="([^"]*)">/.exec(html)![1];
}

describe('page and pagePolicy', () => {
  it('admits each inline script by the hash of its text, and nothing else', () => {
    const html = page('t', '<p>x</p>', [{ inline: 'var a = 1;' }, { inline: 'var b = 2;' }]);
    expect(policyOf(html)).toBe(`default-src 'none'; script-src ${sha('var a = 1;')} ${sha('var b = 2;')}; style-src ${sha(PAGE_STYLE)}; img-src data:`);
    expect(policyOf(html)).not.toContain('unsafe-inline');
    // the scripts come after the body, in the order given
    expect(html.indexOf('<p>x</p>')).toBeLessThan(html.indexOf('<script>var a = 1;</script>'));
    expect(html.indexOf('<script>var a = 1;</script>')).toBeLessThan(html.indexOf('<script>var b = 2;</script>'));
  });

  it("adds 'self' only for a page that loads a local file, and allows no script at all without scripts", () => {
    expect(pagePolicy([{ src: '../assets/charts.js' }, { inline: 'go()' }])).toBe(`default-src 'none'; script-src 'self' ${sha('go()')}; style-src ${sha(PAGE_STYLE)}; img-src data:`);
    expect(pagePolicy([])).toBe(`default-src 'none'; script-src 'none'; style-src ${sha(PAGE_STYLE)}; img-src data:`);
    expect(page('t', '', [{ src: '../assets/charts.js' }])).toContain('<script src="../assets/charts.js"></script>');
  });

  it('refuses an inline script that would close its element', () => {
    expect(() => page('t', '', [{ inline: 'x = "</script>"' }])).toThrow(/<\/script/);
  });

  it('finds the shared chart library from a series folder one level down', () => {
    expect(CHART_ASSET).toBe('assets/charts.js');
    expect(chartAssetSrc('Quenby')).toBe('../assets/charts.js');
    expect(chartAssetSrc('a_b~c8687a08')).toBe('../assets/charts.js');
    expect(chartAssetSrc('region/north')).toBe('../../assets/charts.js');
  });
});

describe('report.html and its chart library', () => {
  let run: ForecastRun;
  let summary: Record<string, unknown>;
  beforeAll(async () => {
    const { series } = await loadSeries('datasets/demo/vallmark-heatpumps.csv', { inputs: ['subsidy', 'frost_index'] });
    run = forecastSeries(series[0]);
    summary = forecastSummary(run, { files: ['report.html'], outDir: 'out' });
  });

  it('inlines the library by default: self-contained, no local file admitted', () => {
    const html = forecastHtml(run, summary);
    expect(html).toContain(`<script>${chartLibraryScript()}</script>`);
    expect(html).not.toContain('<script src=');
    expect(html).not.toContain('id="charts-missing"');
    expect(policyOf(html)).toBe(`default-src 'none'; script-src ${sha(chartLibraryScript())} ${sha(reportScript())}; style-src ${sha(PAGE_STYLE)}; img-src data:`);
  });

  it('in a batch loads the shared copy instead, carries the hidden note, and is smaller by the library', () => {
    const inline = forecastHtml(run, summary);
    const shared = forecastHtml(run, summary, { chartLibrarySrc: '../assets/charts.js' });
    expect(shared).not.toContain(chartLibraryScript().slice(0, 200));
    expect(shared).toContain('<script src="../assets/charts.js"></script>');
    expect(shared.indexOf('<script src="../assets/charts.js">')).toBeLessThan(shared.indexOf(`<script>${reportScript()}</script>`));
    expect(shared).toMatch(/<section class="caution" id="charts-missing" hidden><p><b>The charts are not shown\.<\/b>[^<]*<code>assets\/charts\.js<\/code>[^<]*<code>\.\.\/assets\/charts\.js<\/code>/);
    expect(policyOf(shared)).toBe(`default-src 'none'; script-src 'self' ${sha(reportScript())}; style-src ${sha(PAGE_STYLE)}; img-src data:`);
    expect(inline.length - shared.length).toBeGreaterThan(chartLibraryScript().length - 2000);
    // everything but the library, the note and the policy is the same page
    const strip = (h: string) => h.replace(/<meta http-equiv="Content-Security-Policy"[^>]*>/, '').replace(/<script>[^]*?<\/script>\n?|<script src="[^"]*"><\/script>\n?/g, '').replace(/<section class="caution" id="charts-missing"[^]*?<\/section>\n/, '');
    expect(strip(shared)).toBe(strip(inline));
  });

  it('writes the same bytes every time', () => {
    expect(forecastHtml(run, summary, { chartLibrarySrc: '../assets/charts.js' })).toBe(forecastHtml(run, summary, { chartLibrarySrc: '../assets/charts.js' }));
  });
});
