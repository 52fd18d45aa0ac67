/**
 * `report.html` after `certa update`: the page of the same folder as `certa forecast`'s, made
 * anew so it never shows a forecast older than forecast.csv. One self-contained file like that
 * page (chart library, script, style and data inline; every input text escaped), with what the
 * update did (rows learnt, parameter change, drift alarms, the policy taken), the point and
 * band method in words, warnings, the equation before and after with its coefficient table,
 * and the new forecast with bands, hover values and a table of its values. An update has no
 * holdout, ranking or residual checks of its own: those stay on the page of the last search.
 */
import { cadenceName, formatTime } from '../data/calendar.js';
import type { UpdateResult } from '../forecast/update.js';
import { FORECAST_CAUTION } from './cautions.js';
import { coefficientTableHtml, forecastPageData, forecastSectionHtml, missingChartsNote, type ReportOptions } from './html-report.js';
import { chartLibraryScript, escapeHtml as esc, page, scriptJson } from './html.js';
import { reportScript } from './report-script.js';
import { formatTableNumber } from './table-numbers.js';
import { describeAlarm, updateCoefficientRows, updateStory } from './update-report.js';

/** The plain-words account of what the update did. */
function updateWords(result: UpdateResult): string[] {
  const f = result.series.frequency;
  const words: string[] = [];
  const span = result.steps.length > 0 ? ` (${result.steps[0].label} to ${result.steps[result.steps.length - 1].label})` : '';
  words.push(`${result.added} new observation${result.added === 1 ? '' : 's'}${span} learnt by recursive least squares; the model now runs to ${result.body.series.lastTimeLabel}.`);
  if (result.revisions.length > 0) words.push(`${result.revisions.length} revised value${result.revisions.length === 1 ? ' was' : 's were'} accepted (first ${result.revisions[0].label}, column "${result.revisions[0].column}").`);
  words.push(`The coefficients moved by ‖θ_after − θ_before‖₂ = ${formatTableNumber(result.parameterChange)}.`);
  words.push(result.alarms.length === 0 ? 'Drift: no alarm; the new observations obey the model.' : `Drift: ${result.alarms.map((a) => describeAlarm(a, f)).join('; ')}.`);
  words.push(`Policy: ${result.policy.name}: ${result.policy.note}.`);
  return words;
}

function equationSection(result: UpdateResult): string {
  const { policy } = result;
  const rows = updateCoefficientRows(result);
  const before =
    policy.before.equation !== policy.after.equation
      ? `<h3>Before the update: ${esc(policy.before.label)}</h3><div class="eq">${esc(policy.before.equation)}</div><h3>After: ${esc(policy.after.label)}</h3>`
      : `<p>${esc(policy.after.label)}</p>`;
  return `<section id="equation"><h2>The asserted equation</h2>${before}
<div class="eq">${esc(policy.after.equation)}</div>
<h3>Coefficients</h3>${coefficientTableHtml(rows)}</section>`;
}

/** The whole `report.html` of an update. `summary` supplies the warnings as summary.json lists them. */
export function updateHtml(result: UpdateResult, summary: Record<string, unknown>, options: ReportOptions = {}): string {
  const { series } = result;
  const f = series.frequency;
  const n = series.values.length;
  const story = updateStory(result);
  const fc = result.forecast;
  const warnings = (summary.warnings as string[] | undefined) ?? result.warnings;
  const headline = story
    ? `<section id="headline"><h2>In short</h2><p>Point forecast: ${esc(story.point.text)}.</p><p>Bands: ${esc(story.bands.text)}.</p></section>`
    : '';
  const warn = warnings.length ? `<section id="warnings"><h2>Warnings</h2><ul class="warnings">${warnings.map((w) => `<li>${esc(w)}</li>`).join('')}</ul></section>` : '';
  const body = [
    '<main>',
    `<header class="top"><h1>${esc(series.name)}</h1><p class="sub">${esc(cadenceName(f, series.step))}, ${n} points kept, ${esc(formatTime(series.time[0], f))} to ${esc(formatTime(series.time[n - 1], f))} · certa update report</p></header>`,
    ...(fc && options.chartLibrarySrc !== undefined ? [missingChartsNote(options.chartLibrarySrc)] : []),
    `<section class="caution" id="caution"><p><b>Read this first.</b> ${esc(FORECAST_CAUTION)}</p></section>`,
    `<section id="update"><h2>What this update did</h2>${updateWords(result).map((w) => `<p>${esc(w)}</p>`).join('')}</section>`,
    headline,
    warn,
    equationSection(result),
    fc && story ? forecastSectionHtml(f, fc.times, fc.paths, fc.horizon, story.bands.text) : '',
    '</main>',
    fc ? `<script type="application/json" id="certa-data">${scriptJson(forecastPageData(series, fc.times, fc.paths, fc.horizon))}</script>` : '',
  ].join('\n');
  const library = options.chartLibrarySrc !== undefined ? { src: options.chartLibrarySrc } : { inline: chartLibraryScript() };
  return page(`${series.name} · certa update report`, body, fc ? [library, { inline: reportScript() }] : []);
}
