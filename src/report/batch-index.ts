/**
 * `index.html` of a batch: one row per series linking its `report.html`, with its status, the
 * asserted structure, the holdout MASE and the best baseline, and after a `certa update` of the
 * batch what that update did to each series. A static table (no chart library)
 * with a small inline filter, so a page of 1,000 series opens at once; self-contained and offline
 * like every certa page, every input text escaped.
 */
import { FORECAST_CAUTION } from './cautions.js';
import { escapeHtml as esc, page } from './html.js';
import { formatTableNumber } from './table-numbers.js';

/** One series of a batch, as the index lists it. */
export interface BatchIndexRow {
  series: string;
  /** The series' output folder, relative to the index page (its report is `<folder>/report.html`). */
  folder: string;
  /** `forecast` (linked to its report) or `failed`, as batch.csv says. */
  status: 'forecast' | 'failed' | string;
  /** Why the series failed or was skipped; null when it ran. */
  reason: string | null;
  /** Label of the asserted structure; null when none was asserted. */
  structure: string | null;
  holdoutMase: number | null;
  bestBaseline: { name: string; mase: number } | null;
  /** What the last `certa update` of the batch did to the series (absent before any). */
  update?: BatchIndexUpdate;
}

/** A series' part in the last update of its batch (updates.csv). */
export interface BatchIndexUpdate {
  status: 'updated' | 'unchanged' | 'failed';
  /** In words: the rows learnt and to when, or why nothing changed or what failed. */
  text: string;
  /** Drift alarms the update raised. */
  alarms: number;
}

/** The totals of the last update, for the page's header. */
export interface BatchIndexUpdateTotals {
  updated: number;
  unchanged: number;
  failed: number;
  alarms: number;
  /** Series of the new data without a model in the batch (listed in updates.csv, not here). */
  withoutModel: number;
}

/** A relative folder as a link target: each path segment percent-encoded, `/` kept. */
function href(folder: string): string {
  return `${folder.split(/[\\/]/).filter((s) => s !== '').map(encodeURIComponent).join('/')}/report.html`;
}

function mase(x: number | null): string {
  return x === null || !Number.isFinite(x) ? '' : esc(formatTableNumber(x));
}

const FILTER_SCRIPT = `(function () {
  var input = document.getElementById('filter');
  var rows = Array.prototype.slice.call(document.querySelectorAll('#series tbody tr'));
  var keys = rows.map(function (r) { return r.textContent.toLowerCase(); });
  var count = document.getElementById('shown');
  input.addEventListener('input', function () {
    var q = input.value.toLowerCase();
    var n = 0;
    for (var i = 0; i < rows.length; i++) {
      var show = q === '' || keys[i].indexOf(q) >= 0;
      rows[i].style.display = show ? '' : 'none';
      if (show) n++;
    }
    count.textContent = String(n);
  });
})();`;

function plural(n: number, one: string): string {
  return `${n} ${one}${n === 1 ? '' : 's'}`;
}

/** The cell of a series' last update: a tag (a drift alarm is the bad news) and the words. */
function updateCell(u: BatchIndexUpdate | undefined): string {
  if (!u) return '<td class="status"></td>';
  const [cls, tag] = u.status === 'failed' ? [' bad', 'failed'] : u.alarms > 0 ? [' bad', plural(u.alarms, 'drift alarm')] : u.status === 'updated' ? [' good', 'updated'] : ['', 'unchanged'];
  return `<td class="status"><span class="tag${cls}">${esc(tag)}</span> <span class="note">${esc(u.text)}</span></td>`;
}

/**
 * The whole index page of a batch, rows in the order given. With `updates` (the totals of the
 * batch's last `certa update`) the page says what that update did, and each row has a column for
 * it; the other columns stay those of the forecast run.
 */
export function renderBatchIndex(rows: readonly BatchIndexRow[], title = 'certa batch', updates: BatchIndexUpdateTotals | null = null): string {
  const ok = rows.filter((r) => r.status === 'forecast').length;
  const beaten = rows.filter((r) => r.holdoutMase !== null && r.bestBaseline !== null && r.bestBaseline.mase < r.holdoutMase).length;
  const body = rows
    .map((r) => {
      const linked = r.status === 'forecast' ? `<a href="${esc(href(r.folder))}">${esc(r.series)}</a>` : esc(r.series);
      const statusTag = `<span class="tag${r.status === 'forecast' ? ' good' : ' bad'}">${esc(r.status)}</span>`;
      const base = r.bestBaseline ? `${esc(r.bestBaseline.name)} ${mase(r.bestBaseline.mase)}` : '';
      return `<tr><td class="nowrap">${linked}</td><td class="status">${statusTag}${r.reason ? ` <span class="note">${esc(r.reason)}</span>` : ''}</td><td>${esc(r.structure ?? '')}</td><td class="n">${mase(r.holdoutMase)}</td><td class="nowrap">${base}</td>${updates ? updateCell(r.update) : ''}</tr>`;
    })
    .join('\n');
  const updateLine = updates
    ? `<p class="sub">Last update (updates.csv): ${updates.updated} updated, ${updates.unchanged} unchanged, ${updates.failed} failed; ${plural(updates.alarms, 'drift alarm')}${updates.withoutModel > 0 ? `; ${plural(updates.withoutModel, 'series')} of the new data without a model here` : ''}. The other columns are those of the forecast run.</p>`
    : '';
  const html = [
    '<main>',
    `<header class="top"><h1>${esc(title)}</h1><p class="sub">${rows.length} series: ${ok} forecast, ${rows.length - ok} not; the best baseline beat the model on ${beaten}</p>${updateLine}</header>`,
    `<section class="caution"><p>${esc(FORECAST_CAUTION)}</p></section>`,
    `<section><p><input class="filter" id="filter" type="search" placeholder="filter by any text in a row" aria-label="filter rows"> <span class="note"><span id="shown">${rows.length}</span> shown</span></p>`,
    `<table id="series"><thead><tr><th>series</th><th>status</th><th>asserted structure</th><th class="n">holdout MASE</th><th>best baseline (MASE)</th>${updates ? '<th>last update</th>' : ''}</tr></thead><tbody>`,
    body,
    '</tbody></table></section>',
    '</main>',
  ].join('\n');
  return page(title, html, [{ inline: FILTER_SCRIPT }]);
}
