/**
 * Everything `certa forecast` writes, built from a ForecastRun as plain values: the tidy
 * forecast table, the metrics table, the summary a scheduler reads, the charts, and the text a
 * person reads in the terminal. Nothing here touches files.
 */
import { cadenceName, formatTime, type Frequency } from '../data/calendar.js';
import type { ForecastPaths } from '../forecast/intervals.js';
import type { ForecastRun } from '../forecast/pipeline.js';
import { replacesOwn, type Combination } from '../forecast/combine.js';
import { FORECAST_CAUTION } from './cautions.js';
import { criterionLabel } from '../select/criteria.js';
import { setAsideWords } from '../select/search.js';
import { candidatesCsv } from './candidates.js';
import { coefficientLines, coefficientTerms, COEFFICIENT_LEVEL, estimateRows } from './coefficients.js';
import { formatTableNumber } from './table-numbers.js';
import { valueFloor } from './chart-axis.js';
import { forecastChart, historyChart, holdoutChart, rankingChart, residualChart } from './charts.js';
import { csvField, formatNumber, tableToCsv, toJson, type Cell, type Table } from './tables.js';
import { bandStory, headlineLines, memberLines, pointStory, storySubtitle, type BandStory, type PointStory } from './forecast-story.js';

/**
 * The account of what a run forecasts: its point and its bands (forecast-story.ts). A run's
 * files all tell it (summary, model file, charts, report), so it is made once per run and the
 * same (read-only) account is handed out again.
 */
export function runStory(run: ForecastRun): { readonly point: PointStory; readonly bands: BandStory } {
  let story = stories.get(run);
  if (story === undefined || story.from !== run.forecast) {
    const point = pointStory(run.forecast.combination, run.asserted.structure);
    story = { from: run.forecast, point, bands: bandStory(run.forecast.paths, point, run.series.time, run.series.frequency, run.series.inputs.length > 0) };
    stories.set(run, story);
  }
  return story;
}

const stories = new WeakMap<ForecastRun, { from: ForecastRun['forecast']; point: PointStory; bands: BandStory }>();

/**
 * forecast.csv, the tidy forecast table of a run (one row per time and kind: history, fitted,
 * holdout, forecast; the columns below) written as `toCsv` writes a table, and from the same
 * fields the records of its holdout and forecast rows without the rolling_point column, as a
 * batch's forecasts.csv holds them (batch-table.ts, no header): each number and time stamp is
 * written once for both.
 */
export function forecastCsv(run: ForecastRun): { csv: string; records: string } {
  const { series, levels } = run;
  const f = series.frequency;
  const columns = ['series', 'time', 'kind', 'value', 'point', 'rolling_point', ...levels.flatMap((l) => [`lower_${l}`, `upper_${l}`])];
  const name = csvField(series.name);
  const nl = '\r\n';
  let csv = columns.map(csvField).join(',') + nl;
  // a batch keeps every series' records to the end: lines joined once into one flat text, not a rope of pieces
  const records: string[] = [];
  // history and fitted rows leave the point (or value), the rolling point and every band empty
  const noBands = ','.repeat(2 * levels.length);
  const n = series.values.length;
  const nTrain = n - run.holdout;
  const history = `,${csvField('history')},`;
  for (let t = 0; t < nTrain; t++) csv += `${name},${csvField(formatTime(series.time[t], f))}${history}${formatNumber(series.values[t])},,${noBands}${nl}`;
  const fitted = `,${csvField('fitted')},,`;
  for (let i = 0; i < run.fitted.index.length; i++) {
    csv += `${name},${csvField(formatTime(series.time[run.fitted.index[i]], f))}${fitted}${formatNumber(run.fitted.values[i])},${noBands}${nl}`;
  }
  const ev = run.evaluation;
  if (ev) {
    const bands = checkedBands(ev.fixed.bands, levels.length);
    const kind = `,${csvField('holdout')},`;
    for (let j = 0; j < ev.holdout; j++) {
      const head = `${name},${csvField(formatTime(ev.times[j], f))}${kind}${formatNumber(ev.actual[j])},${formatNumber(ev.fixed.point[j])}`;
      const tail = bandFields(bands, j);
      csv += `${head},${formatNumber(ev.rolling.oneStep[j])}${tail}${nl}`;
      records.push(`${head}${tail}${nl}`);
    }
  }
  const paths = run.forecast.paths;
  const bands = checkedBands(paths.bands, levels.length);
  const kind = `,${csvField('forecast')},,`;
  for (let j = 0; j < run.forecast.times.length; j++) {
    const head = `${name},${csvField(formatTime(run.forecast.times[j], f))}${kind}${formatNumber(paths.point[j])}`;
    const tail = bandFields(bands, j);
    csv += `${head},${tail}${nl}`;
    records.push(`${head}${tail}${nl}`);
  }
  return { csv, records: records.join('') };
}

/** The bands of a row, one per level (a row of another width is a caller bug, as `toCsv` says). */
function checkedBands<B>(bands: readonly B[], levels: number): readonly B[] {
  if (bands.length !== levels) throw new RangeError(`forecastCsv: ${bands.length} bands, the header has ${levels} levels`);
  return bands;
}

/** `,lower,upper` of each band at step j. */
function bandFields(bands: readonly { lower: ArrayLike<number>; upper: ArrayLike<number> }[], j: number): string {
  let out = '';
  for (const b of bands) out += `,${formatNumber(b.lower[j])},${formatNumber(b.upper[j])}`;
  return out;
}

/** The `forecast` rows of the tidy table (columns as in `forecastCsv`), one per step. */
export function forecastRows(name: string, f: Frequency, times: Float64Array, paths: ForecastPaths): Cell[][] {
  const rows: Cell[][] = [];
  for (let j = 0; j < times.length; j++) {
    const bands = paths.bands.flatMap((b) => [b.lower[j], b.upper[j]]);
    rows.push([name, formatTime(times[j], f), 'forecast', null, paths.point[j], null, ...bands]);
  }
  return rows;
}

/** The evaluation table (`metrics.csv`): one row per method and view. */
export function metricsTable(run: ForecastRun): Table {
  const levelCols = run.levels.flatMap((l) => [`coverage_${l}`, `interval_score_${l}`]);
  const columns = ['series', 'view', 'method', 'n', 'mae', 'rmse', 'mape', 'smape', 'mase', 'mean_error', ...levelCols];
  const rows: Cell[][] = (run.evaluation?.table ?? []).map((r) => {
    const iv = run.levels.flatMap((l) => {
      const x = r.intervals?.find((i) => i.level === l);
      return x ? [x.coverage, x.intervalScore] : [null, null];
    });
    const m = r.metrics;
    return [run.series.name, r.view, r.method, m.n, m.mae, m.rmse, m.mape, m.smape, m.mase, m.meanError, ...iv];
  });
  return { columns, rows };
}

export interface SummaryContext {
  /** Files written, relative to the output folder. */
  files: string[];
  outDir: string;
  source?: string;
  /** Extra warnings from loading. */
  warnings?: string[];
}

/** `summary.json`: everything a scheduler needs, including warnings. */
export function forecastSummary(run: ForecastRun, ctx: SummaryContext): Record<string, unknown> {
  const { series, asserted, search } = run;
  const f = series.frequency;
  const n = series.values.length;
  const winner = search.winner;
  const ev = run.evaluation;
  const learning = ev?.table.find((r) => r.view === 'rolling-one-step' && r.method.startsWith('model, learning'));
  const frozen = ev?.table.find((r) => r.view === 'rolling-one-step' && r.method === 'model, frozen');
  const story = runStory(run);
  return {
    caution: FORECAST_CAUTION,
    series: {
      name: series.name,
      source: ctx.source ?? series.source ?? null,
      frequency: f,
      ...(series.step !== undefined && series.step > 1 ? { step: series.step } : {}),
      season: series.season,
      seasons: search.seasons ?? null,
      length: n,
      start: formatTime(series.time[0], f),
      end: formatTime(series.time[n - 1], f),
      inputs: series.inputs.map((i) => i.name),
    },
    options: {
      horizon: run.horizon,
      holdout: run.holdout,
      levels: run.levels,
      forgetting: run.forgetting,
      criterion: search.criterion,
      intervalMethod: run.forecast.paths.method,
    },
    model: {
      key: asserted.structure.key,
      label: asserted.structure.label,
      family: asserted.structure.family,
      transform: asserted.structure.transform,
      equation: asserted.equation,
      fittedOn: { start: formatTime(series.time[asserted.from], f), end: formatTime(series.time[n - 1], f), n: n - asserted.from },
      coefficientLevel: COEFFICIENT_LEVEL,
      terms: coefficientTerms(estimateRows(asserted)),
      sigma2: asserted.estimate.sigma2,
      derived: asserted.derived,
      whiteness: winner.whiteness,
    },
    search: {
      sample: search.sample,
      fitted: search.fitted,
      failed: search.failed,
      top: search.ranking
        .filter((c) => c.status === 'fitted')
        .slice(0, 10)
        .map((c) => ({ rank: c.rank, key: c.key, label: c.label, score: c.score, delta: c.delta, weight: c.weight })),
    },
    evaluation: ev
      ? {
          trainEnd: formatTime(series.time[ev.nTrain - 1], f),
          holdout: ev.holdout,
          rows: ev.table.map((r) => ({ view: r.view, method: r.method, ...r.metrics, intervals: r.intervals ?? null })),
          onlineLearning: learning && frozen ? { learningMae: learning.metrics.mae, frozenMae: frozen.metrics.mae } : null,
          bestBaseline: ev.verdict ? { name: ev.verdict.baseline, mase: ev.verdict.baselineMase } : null,
          modelMase: ev.verdict?.modelMase ?? null,
          beatenByBaseline: ev.verdict?.beaten ?? false,
        }
      : null,
    forecast: {
      inputs: run.forecast.inputs.source,
      point: story.point,
      bands: story.bands,
      combination: combinationJson(run.forecast.combination),
      rows: Array.from(run.forecast.times, (t, j) => {
        const row: Record<string, unknown> = { time: formatTime(t, f), point: run.forecast.paths.point[j] };
        for (const b of run.forecast.paths.bands) {
          row[`lower_${b.level}`] = b.lower[j];
          row[`upper_${b.level}`] = b.upper[j];
        }
        return row;
      }),
    },
    warnings: [...(ctx.warnings ?? []), ...run.warnings],
    files: ctx.files,
    outDir: ctx.outDir,
  };
}

/** The charts of a run, by file name. */
export function forecastCharts(run: ForecastRun): Record<string, Buffer> {
  const { series, asserted } = run;
  const f = series.frequency;
  const n = series.values.length;
  const title = series.name;
  const out: Record<string, Buffer> = {};
  // The one-step fitted values come from the refit on all data: inside the holdout they are
  // in-sample, so the chart stops them where the holdout starts and shows there the forecast
  // that was made without the holdout (out of sample).
  const ev0 = run.evaluation;
  const nTrain = ev0 ? ev0.nTrain : n;
  const fitted = new Float64Array(n).fill(NaN);
  run.fitted.index.forEach((t, i) => {
    if (t < nTrain) fitted[t] = run.fitted.values[i];
  });
  const outOfSample = ev0 ? new Float64Array(n).fill(NaN) : undefined;
  if (ev0 && outOfSample) for (let j = 0; j < ev0.holdout; j++) outOfSample[nTrain + j] = ev0.fixed.point[j];
  const holdoutStart = ev0 ? series.time[ev0.nTrain] : undefined;
  // a series that is never negative gets a value axis that stops at zero
  const floor = valueFloor(series.values) ?? undefined;
  out['history.png'] = historyChart({
    title: `${title}: history, one-step fitted values${ev0 ? ' and the holdout forecast' : ''}`,
    subtitle: `${asserted.structure.label}${ev0 ? `; fitted values are in-sample (refit on all data) and stop at the holdout, where the forecast made without it is drawn` : ''}`,
    frequency: f,
    valueLabel: series.name,
    time: series.time,
    actual: series.values,
    fitted,
    fittedLabel: 'one-step fitted (in-sample)',
    ...(outOfSample ? { outOfSample, outOfSampleLabel: 'holdout forecast (out of sample)' } : {}),
    holdoutStart,
    floor,
  });
  const show = Math.min(n, Math.max(series.season ? 6 * series.season : 40, 3 * run.horizon));
  const story = runStory(run);
  out['forecast.png'] = forecastChart({
    title: `${title}: forecast, ${run.horizon} periods`,
    subtitle: `${storySubtitle(story.point, story.bands)}; asserted: ${asserted.structure.label}; ${run.forecast.inputs.source}`,
    frequency: f,
    valueLabel: series.name,
    history: { time: series.time.subarray(n - show), values: series.values.subarray(n - show) },
    forecast: {
      time: run.forecast.times,
      mean: run.forecast.paths.point,
      bands: run.forecast.paths.bands.map((b) => ({ level: b.level / 100, lower: b.lower, upper: b.upper })),
    },
    floor,
  });
  const ev = run.evaluation;
  if (ev) {
    const ctxLen = Math.min(ev.nTrain, series.season ? 3 * series.season : 24);
    out['holdout.png'] = holdoutChart({
      title: `${title}: holdout, actual against forecasts`,
      subtitle: `trained to ${formatTime(series.time[ev.nTrain - 1], f)}; rolling forecasts learn with λ = ${run.forgetting}`,
      frequency: f,
      valueLabel: series.name,
      context: { time: series.time.subarray(ev.nTrain - ctxLen, ev.nTrain), values: series.values.subarray(ev.nTrain - ctxLen, ev.nTrain) },
      time: ev.times,
      actual: ev.actual,
      forecasts: [
        { label: 'fixed origin', values: ev.fixed.point },
        { label: 'rolling one-step, learning', values: ev.rolling.oneStep },
        { label: 'rolling one-step, frozen', values: ev.frozen.oneStep },
      ],
      bands: ev.fixed.bands.map((b) => ({ level: b.level / 100, lower: b.lower, upper: b.upper })),
      floor,
    });
  }
  out['ranking.png'] = rankingChart({
    title: `${title}: candidate structures`,
    subtitle: `Δ${criterionLabel(run.search.criterion)} from the best; ${run.search.fitted} fitted, ${run.search.failed} failed`,
    criterion: criterionLabel(run.search.criterion),
    candidates: run.search.ranking.filter((c) => c.status === 'fitted').map((c) => ({ name: c.label, delta: c.delta })),
  });
  out['residuals.png'] = residualChart({
    title: `${title}: are the one-step residuals white?${asserted.structure.transform === 'log' ? ' (log scale)' : ''}`,
    subtitle: `one-step residuals of the asserted equation, ${formatTime(series.time[asserted.from], f)} to ${formatTime(series.time[n - 1], f)}${Number.isFinite(run.search.winner.whiteness.pValue) ? `; Ljung–Box over ${run.search.winner.whiteness.lags} lags p = ${fmt(run.search.winner.whiteness.pValue)}` : ''}`,
    residuals: run.fitted.residuals,
    time: Float64Array.from(run.fitted.index, (t) => series.time[t]),
    frequency: f,
    scale: Math.sqrt(asserted.estimate.sigma2),
  });
  return out;
}

/** CSV files of a run, by file name (charts separately); `forecast` is the run's `forecastCsv`. */
export function forecastFiles(run: ForecastRun, forecast: { csv: string } = forecastCsv(run)): Record<string, string> {
  return {
    'forecast.csv': forecast.csv,
    'metrics.csv': tableToCsv(metricsTable(run)),
    'candidates.csv': candidatesCsv(run.search),
  };
}

export function summaryJson(summary: Record<string, unknown>): string {
  return toJson(summary);
}

/** The terminal summary a person reads. */
export function forecastText(run: ForecastRun, summary: Record<string, unknown>): string {
  const { series, asserted, search } = run;
  const f = series.frequency;
  const lines: string[] = [];
  const n = series.values.length;
  lines.push(`certa forecast: ${series.name} (${cadenceName(f, series.step)}, ${n} points, ${formatTime(series.time[0], f)} to ${formatTime(series.time[n - 1], f)})`);
  lines.push('');
  const story = runStory(run);
  lines.push(...headlineLines(story.point, story.bands));
  lines.push('');
  const share = story.point.kind === 'combined' ? ` (share of the point forecast: ${(100 * story.point.assertedShare).toFixed(0)} %)` : '';
  lines.push(`Asserted model${share}: ${asserted.structure.label}`);
  lines.push(`  ${asserted.equation}`);
  lines.push(...coefficientLines(estimateRows(asserted), COEFFICIENT_LEVEL, fmt));
  for (const d of asserted.derived) lines.push(`  ${d.name}: ${typeof d.value === 'number' ? fmt(d.value) : String(d.value)}${d.unit ? ` ${d.unit}` : ''}${d.note ? `  (${d.note})` : ''}`);
  lines.push('');
  const aside = search.failed > 0 ? `, ${search.failed} set aside (${setAsideWords(search.setAside)})` : '';
  lines.push(`Candidates: ${search.fitted} fitted${aside}; ranked by ${criterionLabel(search.criterion)} on ${search.sample.start} to ${search.sample.end} (n = ${search.sample.n})`);
  if (search.seasons) lines.push(`Season: ${search.seasons.text}`);
  const top = search.ranking.filter((c) => c.status === 'fitted').slice(0, 5);
  lines.push(pad(['rank', 'Δ', 'weight', 'structure'], [4, 8, 7, 0]));
  for (const c of top) lines.push(pad([String(c.rank), fmt(c.delta), c.weight.toFixed(3), c.label], [4, 8, 7, 0]));
  const ev = run.evaluation;
  if (ev) {
    lines.push('');
    lines.push(`Holdout: last ${ev.holdout} points (from ${formatTime(ev.times[0], f)}), never seen by the search`);
    const cov = run.levels.map((l) => `cover ${l}%`);
    lines.push(pad(['view', 'method', 'MAE', 'RMSE', 'sMAPE', 'MASE', 'bias', ...cov], [17, 24, 10, 10, 7, 7, 10, ...cov.map(() => 10)]));
    for (const r of ev.table) {
      const m = r.metrics;
      const c = run.levels.map((l) => {
        const x = r.intervals?.find((i) => i.level === l);
        return x ? `${(100 * x.coverage).toFixed(0)}%` : '';
      });
      lines.push(pad([r.view, r.method, fmt(m.mae), fmt(m.rmse), m.smape.toFixed(2), m.mase.toFixed(3), fmt(m.meanError), ...c], [17, 24, 10, 10, 7, 7, 10, ...c.map(() => 10)]));
    }
    if (ev.verdict) {
      const v = ev.verdict;
      lines.push(
        v.beaten
          ? `Verdict: the ${v.baseline} baseline beat the model on the holdout (MASE ${v.baselineMase.toFixed(3)} against ${v.modelMase.toFixed(3)})`
          : `Verdict: the model beat every baseline on the holdout (MASE ${v.modelMase.toFixed(3)}; best baseline ${v.baseline} ${v.baselineMase.toFixed(3)})`,
      );
    }
  } else {
    lines.push('');
    lines.push('Holdout: none (--holdout 0): the model was not evaluated on unseen data.');
  }
  lines.push('');
  const members = memberLines(story.point);
  if (members.length > 0) lines.push(...members, '');
  lines.push(...forecastTableLines(f, run.forecast.times, run.forecast.paths, run.forecast.inputs.source));
  lines.push(...footerLines(summary));
  return `${lines.join('\n')}\n`;
}

/** The end of a terminal summary: warnings, where the files went, and the caution. */
export function footerLines(summary: Record<string, unknown>): string[] {
  const lines: string[] = [];
  const warnings = summary.warnings as string[];
  if (warnings.length > 0) {
    lines.push('');
    for (const w of warnings) lines.push(`warning: ${w}`);
  }
  const files = summary.files as string[];
  if (files.length > 0) {
    lines.push('');
    lines.push(`Wrote ${files.join(', ')} to ${String(summary.outDir)}`);
  }
  lines.push('');
  lines.push(FORECAST_CAUTION);
  return lines;
}

/** The forecast table of the terminal summary: a heading line, then time, point and bands per step. */
export function forecastTableLines(f: Frequency, times: Float64Array, paths: ForecastPaths, inputs: string): string[] {
  const lines = [`Forecast (${paths.method} bands; ${inputs}):`];
  const bandHead = paths.bands.map((b) => `${b.level}% interval`);
  lines.push(pad(['time', 'point', ...bandHead], [12, 12, ...bandHead.map(() => 26)]));
  for (let j = 0; j < times.length; j++) {
    const cells = paths.bands.map((b) => `${fmt(b.lower[j])} to ${fmt(b.upper[j])}`);
    lines.push(pad([formatTime(times[j], f), fmt(paths.point[j]), ...cells], [12, 12, ...cells.map(() => 26)]));
  }
  return lines;
}

/** The members of a combination as summary.json lists them. */
export function combinationJson(c: Combination | null): Record<string, unknown>[] | null {
  return c ? c.members.map((m) => ({ key: m.key, group: m.group, weight: m.weight, groupWeight: m.groupWeight, share: m.share, excluded: m.excluded ?? null })) : null;
}

function pad(cells: string[], widths: number[]): string {
  return cells
    .map((c, i) => (widths[i] > 0 ? c.padEnd(widths[i]) : c))
    .join(' ')
    .trimEnd();
}

/** A number in the terminal summary: six significant digits (table-numbers.ts). */
export function fmt(x: number): string {
  return formatTableNumber(x);
}
