/**
 * Building blocks of certa's HTML pages: escaping, data for inline scripts, the chart library,
 * and the page shell with its style sheet and content security policy. A page fetches nothing
 * from any network: its styles and data are inline, its scripts inline too or, for the reports
 * of a batch, the one copy of the chart library the batch folder keeps (`CHART_ASSET`), loaded
 * from the local file next to the series folders.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';

const ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/**
 * Text for HTML element content or a quoted attribute value: `& < > " '` as character
 * references, so input text (series names, column names, warnings) shows as text, never markup.
 * @example escapeHtml('<img src=x>') === '&lt;img src=x&gt;'
 */
export function escapeHtml(text: string): string {
  return HTML_SPECIAL.test(text) ? text.replace(HTML_SPECIAL_ALL, (c) => ESCAPES[c]) : text;
}

const HTML_SPECIAL = /[&<>"']/;
const HTML_SPECIAL_ALL = /[&<>"']/g;

/**
 * JSON for an inline `<script type="application/json">` element: canonical `JSON.stringify`
 * output with `<`, `>`, `&` and the line separators U+2028/U+2029 written as `\uXXXX` escapes,
 * so no input text can close the element or start markup; `JSON.parse` of the element's text
 * gives the value back. Non-finite numbers become null (JSON cannot hold them).
 */
export function scriptJson(value: unknown): string {
  // JSON.stringify itself writes NaN and ±Infinity as null
  const json = JSON.stringify(value);
  return UNSAFE_IN_SCRIPT.test(json) ? json.replace(UNSAFE_IN_SCRIPT_ALL, (c) => SCRIPT_ESCAPES[c]) : json;
}

const UNSAFE_IN_SCRIPT = /[<>&\u2028\u2029]/;
const UNSAFE_IN_SCRIPT_ALL = /[<>&\u2028\u2029]/g;
const SCRIPT_ESCAPES: Record<string, string> = { '<': '\\u003c', '>': '\\u003e', '&': '\\u0026', '\u2028': '\\u2028', '\u2029': '\\u2029' };

let chartLibrary: string | null = null;

/**
 * The browser build of Chart.js (its minified UMD file, from the installed chart.js package),
 * read once per process. It holds no `</script`, so it can be inlined as is (checked).
 */
export function chartLibraryScript(): string {
  if (chartLibrary !== null) return chartLibrary;
  const require = createRequire(import.meta.url);
  const file = join(dirname(require.resolve('chart.js')), 'chart.umd.min.js');
  const text = readFileSync(file, 'utf8');
  if (/<\/script/i.test(text)) throw new Error(`chart library ${file} contains </script and cannot be inlined`);
  chartLibrary = text;
  return text;
}

/**
 * Where a batch keeps its one copy of the chart library, relative to the batch folder; each
 * series' report.html loads it from `../` + this path (see `chartAssetSrc`).
 */
export const CHART_ASSET = 'assets/charts.js';

/** The folder at the top of a batch folder that holds `CHART_ASSET`. */
export const CHART_ASSET_FOLDER = CHART_ASSET.split('/')[0];

/** The `src` of the shared chart library for a page in `folder` (relative to the batch folder, `/`-separated). */
export function chartAssetSrc(folder: string): string {
  const depth = folder.split(/[\\/]/).filter((s) => s !== '' && s !== '.').length;
  return `${'../'.repeat(depth)}${CHART_ASSET}`;
}

/** A script of a page: its source inline, or a local file loaded by a relative URL. */
export type PageScript = { inline: string } | { src: string };

const hashes = new Map<string, string>();

/** The CSP hash source of an inline script's or style's text (`'sha256-…'`), remembered per text. */
export function scriptHash(text: string): string {
  let h = hashes.get(text);
  if (h === undefined) {
    h = `'sha256-${createHash('sha256').update(text, 'utf8').digest('base64')}'`;
    hashes.set(text, h);
  }
  return h;
}

/**
 * The content security policy of a page with these scripts: nothing may load from anywhere
 * (`default-src 'none'`), the one style sheet of every page (`PAGE_STYLE`, by its hash), images
 * only as data URLs, and scripts only those of the page: each inline one by the hash of its text (so no other inline script or event handler
 * runs) and, when the page loads a local file, `'self'`. For a page opened from disk Chromium
 * takes `'self'` as any local file (a source cannot name a relative path, and a hash does not
 * reach a file:// script, whose integrity cannot be checked without CORS); no network source is
 * allowed either way.
 */
export function pagePolicy(scripts: readonly PageScript[]): string {
  const sources = [...(scripts.some((s) => 'src' in s) ? ["'self'"] : []), ...scripts.flatMap((s) => ('inline' in s ? [scriptHash(s.inline)] : []))];
  const script = sources.length > 0 ? sources.join(' ') : "'none'";
  return `default-src 'none'; script-src ${script}; style-src ${scriptHash(PAGE_STYLE)}; img-src data:`;
}

/** The `<script>` element of a page script (an inline source holds no `</script`: checked). */
function scriptElement(s: PageScript): string {
  if ('src' in s) return `<script src="${escapeHtml(s.src)}"></script>`;
  if (!safeScripts.has(s.inline)) {
    if (/<\/script/i.test(s.inline)) throw new Error('an inline script contains </script');
    safeScripts.add(s.inline);
  }
  return `<script>${s.inline}</script>`;
}

/** Inline script texts already checked (every report of a process inlines the same few). */
const safeScripts = new Set<string>();

/** The style sheet every certa page shares. */
export const PAGE_STYLE = `
:root { --ink: #1f2a36; --muted: #5d6b78; --rule: #d9dee3; --paper: #fbfaf7; --card: #ffffff;
  --accent: #3b4cc0; --warn: #9a4b00; --good: #2f6f3e; --bad: #a3262a; }
* { box-sizing: border-box; }
body { margin: 0; background: var(--paper); color: var(--ink);
  font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif; }
main { max-width: 1100px; margin: 0 auto; padding: 20px 24px 48px; }
header.top { border-bottom: 3px solid var(--accent); padding-bottom: 10px; margin-bottom: 16px; }
h1 { font-size: 24px; margin: 0 0 4px; overflow-wrap: anywhere; }
h2 { font-size: 18px; margin: 0 0 8px; }
h3 { font-size: 15px; margin: 14px 0 6px; }
.sub { color: var(--muted); margin: 0; }
section { background: var(--card); border: 1px solid var(--rule); border-radius: 6px; padding: 14px 18px; margin: 14px 0; }
.caution { border-left: 5px solid var(--warn); background: #fff8ef; }
.warnings li { color: var(--warn); }
.eq { font-family: "DejaVu Sans Mono", Menlo, Consolas, monospace; font-size: 13.5px; background: #f3f4f8;
  padding: 8px 10px; border-radius: 4px; overflow-wrap: anywhere; white-space: pre-wrap; }
table { border-collapse: collapse; margin: 6px 0; font-variant-numeric: tabular-nums; }
th, td { padding: 3px 10px 3px 0; text-align: left; vertical-align: top; border-bottom: 1px solid #eef0f2; }
th { color: var(--muted); font-weight: 600; border-bottom: 1px solid var(--rule); }
td.n, th.n { text-align: right; }
td.status { max-width: 22em; }
td.status .note { display: block; }
td.nowrap { white-space: nowrap; }
tr.best td { font-weight: 600; }
.chart { position: relative; height: 360px; margin: 6px 0 4px; }
.chart.small { height: 300px; }
.pair { display: grid; grid-template-columns: minmax(0, 1fr) minmax(0, 1fr); gap: 18px; }
.pair figure { margin: 0; min-width: 0; }
.pair figcaption { color: var(--muted); font-size: 13px; }
@media (max-width: 760px) { .pair { grid-template-columns: minmax(0, 1fr); } }
.note { color: var(--muted); font-size: 13.5px; }
.tag { display: inline-block; padding: 0 6px; border-radius: 3px; font-size: 12.5px; background: #eef0fa; color: var(--accent); }
.tag.bad { background: #fbeaea; color: var(--bad); }
.tag.good { background: #e8f3ea; color: var(--good); }
details summary { cursor: pointer; color: var(--accent); }
code { font-family: "DejaVu Sans Mono", Menlo, Consolas, monospace; font-size: 13.5px; background: #f3f4f8; padding: 0 3px; border-radius: 3px; }
.chart.missing { height: auto; }
.chart.missing canvas { display: none; }
input.filter { font: inherit; padding: 4px 8px; border: 1px solid var(--rule); border-radius: 4px; width: 320px; }
`;

/**
 * A whole page: doctype, UTF-8, the content security policy of its scripts (`pagePolicy`), the
 * style, `body`, then the scripts in the order given.
 */
export function page(title: string, body: string, scripts: readonly PageScript[] = []): string {
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="${pagePolicy(scripts)}">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${escapeHtml(title)}</title>`,
    `<style>${PAGE_STYLE}</style>`,
    '</head>',
    '<body>',
    body,
    ...scripts.map(scriptElement),
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
