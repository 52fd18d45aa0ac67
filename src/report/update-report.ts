/**
 * Everything `certa update` writes, built from an UpdateResult as plain values: the tidy
 * forecast table (the model's window as history, then the new forecast; the columns of
 * `certa forecast`'s table), the summary a scheduler reads, the forecast chart and the text a
 * person reads. Nothing here touches files.
 */
import { formatTime, type Frequency } from '../data/calendar.js';
import type { DriftAlarm } from '../forecast/drift.js';
import type { UpdateResult } from '../forecast/update.js';
import { FORECAST_CAUTION } from './cautions.js';
import { coefficientRows, coefficientTerms, COEFFICIENT_LEVEL, type CoefficientRow } from './coefficients.js';
import { forecastChart } from './charts.js';
import { combinationJson, fmt, footerLines, forecastRows, forecastTableLines } from './forecast-report.js';
import { bandStory, headlineLines, memberLines, pointStory, storySubtitle, type BandStory, type PointStory } from './forecast-story.js';

/** The account of what an update forecasts (forecast-story.ts); null without a forecast. */
export function updateStory(result: UpdateResult): { point: PointStory; bands: BandStory } | null {
  const fc = result.forecast;
  if (!fc) return null;
  const point = pointStory(fc.combination, result.policy.after);
  return { point, bands: bandStory(fc.paths, point, result.series.time, result.series.frequency, result.series.inputs.length > 0) };
}
import { tableToCsv, toCsv, toJson, type Cell, type Table } from './tables.js';
import { csvHeader, forecastsColumns } from '../batch/batch-table.js';

/** `forecast.csv` after an update: window rows as `history`, then `forecast` rows. */
export function updateTable(result: UpdateResult): Table {
  const { series } = result;
  const levels = result.forecast?.levels ?? [];
  const bandCols = levels.flatMap((l) => [`lower_${l}`, `upper_${l}`]);
  const columns = ['series', 'time', 'kind', 'value', 'point', 'rolling_point', ...bandCols];
  const blank = bandCols.map(() => null);
  const rows: Cell[][] = [];
  for (let t = 0; t < series.values.length; t++) rows.push([series.name, formatTime(series.time[t], series.frequency), 'history', series.values[t], null, null, ...blank]);
  if (result.forecast) rows.push(...forecastRows(series.name, series.frequency, result.forecast.times, result.forecast.paths));
  return { columns, rows };
}

function alarmJson(a: DriftAlarm, f: Frequency): Record<string, unknown> {
  return { kind: a.kind, at: formatTime(a.at, f), statistic: a.statistic, threshold: a.threshold };
}

/** One phrase per alarm, e.g. `mean-up at 2009-03 (statistic 7.41 > 7.13)`. */
export function describeAlarm(a: DriftAlarm, f: Frequency): string {
  const stat = a.kind === 'variance' ? 'mean z² over the window' : a.kind === 'mean-up' ? 'S⁺' : 'S⁻';
  return `${a.kind} at ${formatTime(a.at, f)} (${stat} ${fmt(a.statistic)} > ${fmt(a.threshold)})`;
}

export interface UpdateContext {
  /** The model file updated. */
  model: string;
  /** The new-data file. */
  data: string;
  files: string[];
  outDir: string;
  /** Notes from loading and locking. */
  warnings?: string[];
}

/** The coefficient table of the updated model (coefficients.ts): its terms, θ, se and active terms. */
export function updateCoefficientRows(result: UpdateResult): CoefficientRow[] {
  const { body } = result;
  const active = Array.isArray(body.state.active) ? (body.state.active as number[]).map((a) => a === 1) : body.terms.map(() => true);
  return coefficientRows(body.terms, body.theta, body.se, active, COEFFICIENT_LEVEL);
}

/** `summary.json` of an update. */
export function updateSummary(result: UpdateResult, ctx: UpdateContext): Record<string, unknown> {
  const { body, series } = result;
  const f = series.frequency;
  const fc = result.forecast;
  const d = body.drift;
  const story = updateStory(result);
  return {
    caution: FORECAST_CAUTION,
    command: 'update',
    modelFile: ctx.model,
    data: ctx.data,
    series: { name: series.name, frequency: f, season: series.season, lastTime: body.series.lastTimeLabel, inputs: body.series.inputs, window: series.values.length },
    update: {
      rowsAdded: result.added,
      changed: result.changed,
      first: result.steps.length > 0 ? result.steps[0].label : null,
      last: result.steps.length > 0 ? result.steps[result.steps.length - 1].label : null,
      parameterChange: result.parameterChange,
      revisions: result.revisions.map((r) => ({ time: r.label, column: r.column, found: r.found, expected: r.expected })),
      alarms: result.alarms.map((a) => alarmJson(a, f)),
      policy: result.policy.name,
      note: result.policy.note,
      structureChanged: result.policy.structureChanged,
      before: result.policy.before,
      after: result.policy.after,
    },
    drift: { method: d.method, k: d.k, h: d.h, window: d.window, varianceRate: d.varianceRate, varianceThreshold: d.varianceThreshold, alarmsSinceCreated: d.alarms },
    model: { key: result.policy.after.key, label: result.policy.after.label, equation: result.policy.after.equation, lambda: body.lambda, sigma2: body.sigma2, coefficientLevel: COEFFICIENT_LEVEL, terms: coefficientTerms(updateCoefficientRows(result)) },
    forecast: fc
      ? {
          horizon: fc.horizon,
          levels: fc.levels,
          intervalMethod: fc.paths.method,
          inputs: fc.inputs.source,
          point: story?.point ?? null,
          bands: story?.bands ?? null,
          combination: combinationJson(fc.combination),
          rows: Array.from(fc.times, (t, j) => {
            const row: Record<string, unknown> = { time: formatTime(t, f), point: fc.paths.point[j] };
            for (const b of fc.paths.bands) {
              row[`lower_${b.level}`] = b.lower[j];
              row[`upper_${b.level}`] = b.upper[j];
            }
            return row;
          }),
        }
      : null,
    warnings: [...(ctx.warnings ?? []), ...result.warnings],
    files: ctx.files,
    outDir: ctx.outDir,
  };
}

/** The forecast chart after an update (the window as history). */
export function updateCharts(result: UpdateResult): Record<string, Buffer> {
  const fc = result.forecast;
  if (!fc) return {};
  const { series } = result;
  const n = series.values.length;
  const show = Math.min(n, Math.max(series.season ? 6 * series.season : 40, 3 * fc.horizon));
  return {
    'forecast.png': forecastChart({
      title: `${series.name}: forecast after update, ${fc.horizon} periods`,
      subtitle: `${storyText(result)}asserted: ${result.policy.after.label}; ${fc.inputs.source}`,
      frequency: series.frequency,
      history: { time: series.time.subarray(n - show), values: series.values.subarray(n - show) },
      forecast: { time: fc.times, mean: fc.paths.point, bands: fc.paths.bands.map((b) => ({ level: b.level / 100, lower: b.lower, upper: b.upper })) },
    }),
  };
}

function storyText(result: UpdateResult): string {
  const story = updateStory(result);
  return story ? `${storySubtitle(story.point, story.bands)}; ` : '';
}

/**
 * The records a batch's forecasts.csv holds for a series after an update (batch-table.ts): its
 * forecast rows without the rolling_point column, no header; '' when the update made no forecast.
 */
export function updateRecords(result: UpdateResult): string {
  const fc = result.forecast;
  if (!fc) return '';
  const rows = forecastRows(result.series.name, result.series.frequency, fc.times, fc.paths).map((r) => [...r.slice(0, 5), ...r.slice(6)]);
  const columns = forecastsColumns(fc.levels);
  return toCsv(columns, rows).slice(csvHeader(columns).length);
}

/** CSV and JSON files of an update, by file name (charts separately; summary.json added by the caller). */
export function updateFiles(result: UpdateResult): Record<string, string> {
  return { 'forecast.csv': tableToCsv(updateTable(result)) };
}

export function updateSummaryJson(summary: Record<string, unknown>): string {
  return toJson(summary);
}

/** The terminal summary of an update. */
export function updateText(result: UpdateResult, summary: Record<string, unknown>): string {
  const f = result.series.frequency;
  const lines: string[] = [];
  const name = result.series.name;
  if (result.added === 0 && !result.changed) {
    lines.push(`certa update: ${name}: 0 new rows; the model is unchanged (last ${result.body.series.lastTimeLabel}); nothing written`);
  } else {
    const span = result.steps.length > 0 ? ` (${result.steps[0].label} to ${result.steps[result.steps.length - 1].label})` : '';
    lines.push(`certa update: ${name}: ${result.added} new row${result.added === 1 ? '' : 's'}${span}; the model now runs to ${result.body.series.lastTimeLabel}`);
    if (result.revisions.length > 0) lines.push(`Revisions accepted: ${result.revisions.length} (first ${result.revisions[0].label}, column "${result.revisions[0].column}")`);
    lines.push(`Parameter change ‖θ_after − θ_before‖₂ = ${fmt(result.parameterChange)}`);
    if (result.alarms.length === 0) lines.push('Drift: no alarm');
    else lines.push(`Drift: ${result.alarms.length} alarm${result.alarms.length > 1 ? 's' : ''}: ${result.alarms.map((a) => describeAlarm(a, f)).join('; ')}`);
    lines.push(`Policy: ${result.policy.name}: ${result.policy.note}`);
    const { before, after } = result.policy;
    if (before.equation !== after.equation) {
      lines.push('');
      lines.push(`Before: ${before.label}`);
      lines.push(`  ${before.equation}`);
      lines.push(`After:  ${after.label}`);
      lines.push(`  ${after.equation}`);
    } else {
      lines.push(`Model: ${after.label}`);
      lines.push(`  ${after.equation}`);
    }
  }
  const story = updateStory(result);
  if (result.forecast && story) {
    lines.push('');
    lines.push(...headlineLines(story.point, story.bands));
    const members = memberLines(story.point);
    if (members.length > 0) lines.push('', ...members);
    lines.push('');
    lines.push(...forecastTableLines(f, result.forecast.times, result.forecast.paths, result.forecast.inputs.source));
  }
  lines.push(...footerLines(summary));
  return `${lines.join('\n')}\n`;
}
