/**
 * `report.html`: the page a person opens after `certa forecast`. One self-contained file (the
 * chart library, the drawing script, the style and the data inline; nothing fetched), built from
 * a ForecastRun and its summary as a string. In a batch the chart library is instead the one
 * copy the batch folder keeps (`CHART_ASSET`), loaded by a relative path: the page then carries
 * a note, shown when that file did not load, saying where the charts come from, while its text
 * and tables stand on their own. Every text that came from the input (series,
 * column and input names, warnings) is escaped; the data reach the script as escaped JSON.
 *
 * Sections: the caution, the headline, the asserted equation in plain words with its
 * coefficient table, the forecast chart with bands and a table of its values, the holdout view
 * with bands and the baseline scores, the candidates and why the winner won, the residual
 * checks (Ljung–Box, the cumulative periodogram with its Kolmogorov–Smirnov band and, beside it,
 * the standardised one-step residuals over time with their ±2 band), warnings.
 */
import { cadenceName, formatTime, type Frequency } from '../data/calendar.js';
import { valueFloor } from './chart-axis.js';
import type { Series } from '../data/series.js';
import type { ForecastPaths } from '../forecast/intervals.js';
import { cumulativePeriodogram, type CumulativePeriodogram } from '../evaluate/cumulative-periodogram.js';
import { OUTSIDE_TWO_SIGMA, RESIDUAL_BOUND, standardisedResiduals, type StandardisedResiduals } from '../evaluate/standardised-residuals.js';
import type { ForecastRun } from '../forecast/pipeline.js';
import { criterionLabel } from '../select/criteria.js';
import { FORECAST_CAUTION } from './cautions.js';
import { COEFFICIENT_LEVEL, estimateRows, type CoefficientRow } from './coefficients.js';
import { runStory } from './forecast-report.js';
import { CHART_ASSET, CHART_ASSET_FOLDER, chartLibraryScript, escapeHtml as esc, page, scriptJson } from './html.js';
import { palette } from './palette.js';
import { reportScript } from './report-script.js';
import { formatTableNumber } from './table-numbers.js';

/** A number for a table cell of the page. */
export function num(x: number): string {
  return esc(formatTableNumber(x));
}

/** An HTML table of cells already escaped; `numeric` right-aligns columns. */
export function table(head: string[], rows: string[][], numeric: boolean[], rowClass: (i: number) => string = () => ''): string {
  const th = head.map((h, i) => `<th${numeric[i] ? ' class="n"' : ''}>${esc(h)}</th>`).join('');
  const body = rows.map((r, i) => `<tr${rowClass(i) ? ` class="${rowClass(i)}"` : ''}>${r.map((c, j) => `<td${numeric[j] ? ' class="n"' : ''}>${c}</td>`).join('')}</tr>`).join('\n');
  return `<table><thead><tr>${th}</tr></thead><tbody>\n${body}\n</tbody></table>`;
}

function arr(a: ArrayLike<number>): (number | null)[] {
  return Array.from(a, (v) => (Number.isFinite(v) ? v : null));
}

/** The plain-words account of the asserted equation. */
function equationWords(run: ForecastRun): string[] {
  const { asserted, series } = run;
  const f = series.frequency;
  const n = series.values.length;
  const s = asserted.structure;
  const sigma = Math.sqrt(asserted.estimate.sigma2);
  const words: string[] = [];
  words.push(`certa asserts that this series follows a ${s.label}.`);
  words.push(
    `The equation below gives each value${s.transform === 'log' ? ' (on the log scale)' : ''} from the terms on its right-hand side, with coefficients estimated from ${formatTime(series.time[asserted.from], f)} to ${formatTime(series.time[n - 1], f)} (${n - asserted.from} points). ` +
      `e[t] is what the equation leaves unexplained: about ±${formatTableNumber(sigma)}${s.transform === 'log' ? ' on the log scale' : ''} in a typical period (one standard deviation).`,
  );
  if (series.inputs.length > 0) words.push(`It uses the inputs ${series.inputs.map((i) => i.name).join(', ')}; in the forecast, ${run.forecast.inputs.source}.`);
  return words;
}

const pad = (k: number): null[] => new Array<null>(k).fill(null);

/**
 * The page data of the forecast chart (and the look every chart of a page uses): the last
 * stretch of the history, then the point and bands anchored at the last observation.
 */
export function forecastPageData(series: Series, times: ArrayLike<number>, paths: ForecastPaths, horizon: number): Record<string, unknown> {
  const f = series.frequency;
  const n = series.values.length;
  const floor = valueFloor(series.values);
  const show = Math.min(n, Math.max(series.season ? 6 * series.season : 40, 3 * horizon));
  const h = times.length;
  const labels = [...Array.from(series.time.subarray(n - show), (t) => formatTime(t, f)), ...Array.from(times, (t) => formatTime(t, f))];
  const last = series.values[n - 1];
  const anchored = (a: ArrayLike<number>): (number | null)[] => [...pad(show - 1), Number.isFinite(last) ? last : null, ...arr(a)];
  const bandsSorted = [...paths.bands].sort((a, b) => a.level - b.level);
  return {
    valueLabel: series.name,
    look: {
      observed: palette.observed,
      forecast: palette.forecast,
      second: palette.second,
      context: palette.marker,
      bound: palette.bound,
      bandFill: palette.bands[0],
      bandEdge: palette.bandEdge,
      residualBand: palette.residualBand,
      grid: palette.grid,
    },
    forecast: {
      labels,
      observed: [...arr(series.values.subarray(n - show)), ...pad(h)],
      point: anchored(paths.point),
      bands: bandsSorted.map((b) => ({ level: b.level, lower: anchored(b.lower), upper: anchored(b.upper) })),
      floor,
    },
  };
}

/** The residual checks of a run's one-step residuals, made once for the page data and the residual section. */
interface ResidualChecks {
  cp: CumulativePeriodogram;
  st: StandardisedResiduals;
}

function residualChecks(run: ForecastRun): ResidualChecks {
  return { cp: cumulativePeriodogram(run.fitted.residuals), st: standardisedResiduals(run.fitted.residuals, Math.sqrt(run.asserted.estimate.sigma2)) };
}

/** The page data the script draws. */
function pageData(run: ForecastRun, { cp, st }: ResidualChecks): Record<string, unknown> {
  const { series } = run;
  const f = series.frequency;
  const floor = valueFloor(series.values);
  const data = forecastPageData(series, run.forecast.times, run.forecast.paths, run.horizon);
  const ev = run.evaluation;
  if (ev) {
    const ctxLen = Math.min(ev.nTrain, series.season ? 3 * series.season : 24);
    const ctxTimes = series.time.subarray(ev.nTrain - ctxLen, ev.nTrain);
    const hl = ev.holdout;
    data.holdout = {
      labels: [...Array.from(ctxTimes, (t) => formatTime(t, f)), ...Array.from(ev.times, (t) => formatTime(t, f))],
      context: [...arr(series.values.subarray(ev.nTrain - ctxLen, ev.nTrain)), ...pad(hl)],
      actual: [...pad(ctxLen), ...arr(ev.actual)],
      point: [...pad(ctxLen), ...arr(ev.fixed.point)],
      rolling: [...pad(ctxLen), ...arr(ev.rolling.oneStep)],
      bands: [...ev.fixed.bands].sort((a, b) => a.level - b.level).map((b) => ({ level: b.level, lower: [...pad(ctxLen), ...arr(b.lower)], upper: [...pad(ctxLen), ...arr(b.upper)] })),
      floor,
    };
  }
  if (cp.frequency.length >= 2 && Number.isFinite(cp.statistic)) {
    data.periodogram = { frequency: Array.from(cp.frequency), cumulative: arr(cp.cumulative), band: cp.band95 };
  }
  if (st.n > 0) {
    data.residuals = { labels: Array.from(run.fitted.index, (t) => formatTime(series.time[t], f)), values: arr(st.values), bound: RESIDUAL_BOUND, scale: st.scale };
  }
  return data;
}

/** The forecast section: its chart (drawn by the page script from forecastPageData) and a table of its values. */
export function forecastSectionHtml(frequency: Frequency, times: ArrayLike<number>, paths: ForecastPaths, horizon: number, bandsText: string): string {
  const levels = [...paths.bands].sort((a, b) => a.level - b.level);
  const head = ['time', 'point', ...levels.flatMap((b) => [`${b.level} % low`, `${b.level} % high`])];
  const rows = Array.from(times, (t, j) => [esc(formatTime(t, frequency)), num(paths.point[j]), ...levels.flatMap((b) => [num(b.lower[j]), num(b.upper[j])])]);
  return `<section id="forecast"><h2>Forecast, ${horizon} periods</h2>
<p class="note">${esc(bandsText)}. The inner band is filled; the outer band is drawn as dashed edges. Hover the chart for values.</p>
<div class="chart"><canvas id="chart-forecast" role="img" aria-label="forecast chart"></canvas></div>
<details><summary>Forecast values</summary>${table(head, rows, head.map((_, i) => i > 0))}</details></section>`;
}

function forecastSection(run: ForecastRun): string {
  return forecastSectionHtml(run.series.frequency, run.forecast.times, run.forecast.paths, run.horizon, runStory(run).bands.text);
}

function holdoutSection(run: ForecastRun): string {
  const ev = run.evaluation;
  if (!ev) return `<section id="holdout"><h2>Holdout</h2><p>None (--holdout 0): the model was not evaluated on data it had not seen.</p></section>`;
  const f = run.series.frequency;
  const levels = run.levels;
  const head = ['view', 'method', 'MAE', 'RMSE', 'sMAPE', 'MASE', ...levels.map((l) => `cover ${l} %`)];
  const bestBaseline = ev.verdict?.baseline;
  const rows = ev.table.map((r) => [
    esc(r.view),
    esc(r.method) + (r.method === bestBaseline && r.view === 'fixed-origin' ? ' <span class="tag">best baseline</span>' : ''),
    num(r.metrics.mae),
    num(r.metrics.rmse),
    num(r.metrics.smape),
    num(r.metrics.mase),
    ...levels.map((l) => {
      const x = r.intervals?.find((i) => i.level === l);
      return x ? `${(100 * x.coverage).toFixed(0)} %` : '';
    }),
  ]);
  let verdict = '';
  if (ev.verdict) {
    const v = ev.verdict;
    verdict = v.beaten
      ? `<p><span class="tag bad">beaten</span> The ${esc(v.baseline)} baseline beat the model on the holdout (MASE ${num(v.baselineMase)} against ${num(v.modelMase)}).</p>`
      : `<p><span class="tag good">ahead</span> The model beat every baseline on the holdout (MASE ${num(v.modelMase)}; best baseline ${esc(v.baseline)}, ${num(v.baselineMase)}).</p>`;
  }
  return `<section id="holdout"><h2>Holdout: the last ${ev.holdout} points, never seen by the search</h2>
<p class="note">Trained to ${esc(formatTime(run.series.time[ev.nTrain - 1], f))}. The forecast from the end of training is drawn with its bands; the rolling one-step forecasts learn as each point arrives (λ = ${run.forgetting}).</p>
<div class="chart"><canvas id="chart-holdout" role="img" aria-label="holdout chart"></canvas></div>
${verdict}
${table(head, rows, head.map((_, i) => i > 1), (i) => (ev.table[i].method === 'model' && ev.table[i].view === 'fixed-origin' ? 'best' : ''))}</section>`;
}

function candidatesSection(run: ForecastRun): string {
  const s = run.search;
  const crit = criterionLabel(s.criterion);
  const fitted = s.ranking.filter((c) => c.status === 'fitted');
  const top = fitted.slice(0, 10);
  const winner = fitted[0];
  const second = fitted[1];
  const why: string[] = [];
  if (winner) {
    why.push(`Every candidate was scored by ${esc(crit)} on the same one-step prediction errors, over ${esc(s.sample.start)} to ${esc(s.sample.end)} (n = ${s.sample.n}); lower is better.`);
    if (second) {
      const d = second.delta - winner.delta;
      why.push(
        `The winner, <b>${esc(winner.label)}</b>, scored ${num(d)} lower than the runner-up, ${esc(second.label)} (Akaike weights ${num(winner.weight)} and ${num(second.weight)}).` +
          (d < 2 ? ' A difference under 2 means the data hardly tell them apart.' : d < 10 ? ' A difference between 2 and 10 is moderate evidence for the winner.' : ' A difference over 10 is strong evidence for the winner.'),
      );
    }
  }
  const rows = top.map((c) => [String(c.rank), num(c.delta), num(c.weight), esc(c.label)]);
  const failed = s.failed > 0 ? `<p class="note">${s.failed} candidate${s.failed === 1 ? '' : 's'} could not be fitted.</p>` : '';
  return `<section id="candidates"><h2>Candidates and why the winner won</h2><p>${why.join(' ')}</p>
${table(['rank', `Δ${crit}`, 'weight', 'structure'], rows, [true, true, true, false], (i) => (i === 0 ? 'best' : ''))}
<p class="note">${s.fitted} fitted; the best 10 shown (candidates.csv lists all).</p>${failed}</section>`;
}

function residualSection(run: ForecastRun, { cp, st }: ResidualChecks): string {
  const lb = run.search.winner.whiteness;
  const lines: string[] = [];
  if (Number.isFinite(lb.pValue)) {
    lines.push(`Ljung–Box over ${lb.lags} lags: Q = ${num(lb.q)}, p = ${num(lb.pValue)} — ${lb.white ? 'no evidence against white residuals' : 'the residuals are not white: some structure is left in them'}.`);
  }
  if (Number.isFinite(cp.statistic)) {
    lines.push(`Cumulative periodogram (Bartlett): largest distance from the white-noise line D = ${num(cp.statistic)} against a 95 % band of ±${num(cp.band95)}, p = ${num(cp.pValue)} — ${cp.statistic <= cp.band95 ? 'inside the band' : 'outside the band: a cycle or trend is left in the residuals'}.`);
  }
  if (st.n > 0) {
    lines.push(
      `Over time: ${st.outside} of ${st.n} standardised residuals lie outside ±${RESIDUAL_BOUND} (about ${(st.n * OUTSIDE_TWO_SIGMA).toFixed(1)} expected of white normal noise); the largest is ${st.largest.toFixed(2)} standard deviations (σ̂ = ${num(st.scale)}).`,
    );
  }
  const periodogram = Number.isFinite(cp.statistic) && cp.frequency.length >= 2 ? '<div class="chart small"><canvas id="chart-periodogram" role="img" aria-label="cumulative periodogram of the residuals"></canvas></div>' : '';
  const overTime = st.n > 0 ? '<div class="chart small"><canvas id="chart-residuals" role="img" aria-label="standardised one-step residuals over time"></canvas></div>' : '';
  const charts = periodogram || overTime ? `<div class="pair">${periodogram ? `<figure>${periodogram}<figcaption>Whiteness: the cumulative periodogram against the white-noise diagonal and its dashed 95 % band.</figcaption></figure>` : ''}${overTime ? `<figure>${overTime}<figcaption>Size over time: each residual divided by σ̂; the shaded band is ±${RESIDUAL_BOUND}, points outside it are marked.</figcaption></figure>` : ''}</div>` : '';
  const scale = run.asserted.structure.transform === 'log' ? ' (on the log scale)' : '';
  return `<section id="residuals"><h2>Residual checks</h2><p class="note">One-step residuals of the asserted equation${scale}, n = ${cp.n}. White residuals rise along the diagonal; a bulge outside the dashed band means a cycle or trend the equation missed. Over time, runs on one side of zero or many points outside the band mean the equation misses something at those times.</p>
${charts}<ul>${lines.map((l) => `<li>${l}</li>`).join('')}</ul></section>`;
}

/** The coefficient table of an equation: estimate, standard error and interval of each term. */
export function coefficientTableHtml(rows: readonly CoefficientRow[]): string {
  return table(
    ['term', 'estimate', 'standard error', `${COEFFICIENT_LEVEL} % interval`],
    rows.map((r) => [esc(r.term), num(r.estimate), r.active ? num(r.se) : 'left out', r.active && Number.isFinite(r.lower) ? `${num(r.lower)} to ${num(r.upper)}` : '']),
    [false, true, true, true],
  );
}

function equationSection(run: ForecastRun): string {
  const a = run.asserted;
  const coef = coefficientTableHtml(estimateRows(a));
  const derived = a.derived.length
    ? `<h3>What the coefficients imply</h3><ul>${a.derived.map((d) => `<li><b>${esc(d.name)}</b>: ${esc(typeof d.value === 'number' ? formatTableNumber(d.value) : String(d.value))}${d.unit ? ` ${esc(d.unit)}` : ''}${d.note ? ` <span class="note">(${esc(d.note)})</span>` : ''}</li>`).join('')}</ul>`
    : '';
  return `<section id="equation"><h2>The asserted equation</h2>${equationWords(run).map((w) => `<p>${esc(w)}</p>`).join('')}
<div class="eq">${esc(a.equation)}</div>
<h3>Coefficients</h3>${coef}${derived}</section>`;
}

/** How a report gets its chart library. */
export interface ReportOptions {
  /**
   * Load the chart library from this relative URL (a batch's shared copy, e.g.
   * `../assets/charts.js`) instead of inlining it.
   */
  chartLibrarySrc?: string;
}

/**
 * The note a report loading the shared chart library carries, hidden until its script finds
 * that the library did not load (the folder was moved out of its batch folder).
 */
export function missingChartsNote(src: string): string {
  return `<section class="caution" id="charts-missing" hidden><p><b>The charts are not shown.</b> This report is part of a batch: it draws its charts with the chart library the batch folder keeps once for all its reports, <code>${esc(CHART_ASSET)}</code>, which this page loads as <code>${esc(src)}</code>, and that file was not found. Open the report inside its batch folder, or put the batch's <code>${esc(CHART_ASSET_FOLDER)}</code> folder beside this report's folder. The text and the tables below are complete.</p></section>`;
}

/**
 * The whole `report.html` of a run. `summary` supplies the warnings as summary.json lists them;
 * `options.chartLibrarySrc` makes it load the chart library instead of inlining it.
 */
export function forecastHtml(run: ForecastRun, summary: Record<string, unknown>, options: ReportOptions = {}): string {
  const { series } = run;
  const f = series.frequency;
  const n = series.values.length;
  const story = runStory(run);
  const warnings = (summary.warnings as string[] | undefined) ?? run.warnings;
  const checks = residualChecks(run);
  const headline = `<section id="headline"><h2>In short</h2><p>Point forecast: ${esc(story.point.text)}.</p><p>Bands: ${esc(story.bands.text)}.</p></section>`;
  const warn = warnings.length ? `<section id="warnings"><h2>Warnings</h2><ul class="warnings">${warnings.map((w) => `<li>${esc(w)}</li>`).join('')}</ul></section>` : '';
  const body = [
    '<main>',
    `<header class="top"><h1>${esc(series.name)}</h1><p class="sub">${esc(cadenceName(f, series.step))}, ${n} points, ${esc(formatTime(series.time[0], f))} to ${esc(formatTime(series.time[n - 1], f))} · certa forecast report</p></header>`,
    ...(options.chartLibrarySrc !== undefined ? [missingChartsNote(options.chartLibrarySrc)] : []),
    `<section class="caution" id="caution"><p><b>Read this first.</b> ${esc(FORECAST_CAUTION)}</p></section>`,
    headline,
    warn,
    equationSection(run),
    forecastSection(run),
    holdoutSection(run),
    candidatesSection(run),
    residualSection(run, checks),
    '</main>',
    `<script type="application/json" id="certa-data">${scriptJson(pageData(run, checks))}</script>`,
  ].join('\n');
  const library = options.chartLibrarySrc !== undefined ? { src: options.chartLibrarySrc } : { inline: chartLibraryScript() };
  return page(`${series.name} · certa report`, body, [library, { inline: reportScript() }]);
}
