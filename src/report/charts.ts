/**
 * The charts of a certa report, each a pure function from plain data to PNG bytes.
 *
 * The library writes no files: callers write the returned Buffer (atomically). Time stamps are
 * those of calendar.ts (epoch ms for calendar frequencies, the step number for `index`); values
 * may contain NaN, drawn as gaps. All charts share the palette of palette.ts: observed in ink,
 * fitted in olive, forecasts in indigo with the inner band filled and wider bands as dashed
 * edges, legend above the plot area so it never covers data.
 */
import { Chart, type ChartConfiguration, type ChartDataset, type LegendItem, type Plugin, type Scale } from 'chart.js';
import type { Frequency } from '../data/calendar.js';
import { cumulativePeriodogram } from '../evaluate/cumulative-periodogram.js';
import { OUTSIDE_TWO_SIGMA, RESIDUAL_BOUND, standardisedResiduals } from '../evaluate/standardised-residuals.js';
import { axisValue, formatValueTick, tickLabelChars, timeRange, timeTicks, type AxisTick } from './chart-axis.js';
import { font, renderChart, renderSideBySide, resolveSize, wrapText, type ChartSize } from './chart-canvas.js';
import { look, palette } from './palette.js';

export type { ChartSize } from './chart-canvas.js';

/** Texts every time chart carries. */
export interface ChartText {
  title: string;
  /** A second, smaller line under the title (series name, data source...). */
  subtitle?: string;
  /** What the values are, for the y axis title, e.g. "units sold". */
  valueLabel?: string;
  /** Unit of the values, shown in brackets after `valueLabel`, e.g. "kettles / month". */
  unit?: string;
  /**
   * Lowest value the y axis shows, e.g. 0 for a series that is never negative, so a band's
   * lower edge below zero does not stretch the axis far below the data (clipped there).
   */
  floor?: number;
}

/** A series on the chart's time axis. */
export interface TimeLine {
  time: ArrayLike<number>;
  values: ArrayLike<number>;
}

/** Input of `historyChart`. */
export interface HistoryChartInput extends ChartText, ChartSize {
  frequency: Frequency;
  time: ArrayLike<number>;
  actual: ArrayLike<number>;
  /** Fitted (one-step) values aligned with `time`; NaN where the model has none. */
  fitted?: ArrayLike<number>;
  /** Legend label of the fitted values (default "fitted"). */
  fittedLabel?: string;
  /** An out-of-sample forecast aligned with `time` (NaN outside its span), e.g. the holdout's fixed-origin forecast. */
  outOfSample?: ArrayLike<number>;
  outOfSampleLabel?: string;
  /** Time stamp of the first holdout period: drawn as a dashed marker with the holdout shaded. */
  holdoutStart?: number;
}

/** One prediction interval level, aligned with the forecast times. */
export interface IntervalBand {
  /** Nominal coverage, e.g. 0.8 or 0.95. */
  level: number;
  lower: ArrayLike<number>;
  upper: ArrayLike<number>;
}

/** Input of `forecastChart`. */
export interface ForecastChartInput extends ChartText, ChartSize {
  frequency: Frequency;
  history: TimeLine;
  forecast: {
    time: ArrayLike<number>;
    mean: ArrayLike<number>;
    /** Up to two levels are shaded distinctly (narrowest darkest); more reuse the lightest shade. */
    bands?: IntervalBand[];
  };
}

/** One set of forecasts over the holdout, e.g. fixed-origin or rolling-origin. */
export interface HoldoutForecast {
  label: string;
  values: ArrayLike<number>;
}

/** Input of `holdoutChart`. */
export interface HoldoutChartInput extends ChartText, ChartSize {
  frequency: Frequency;
  /** The training data shown before the holdout, for context (e.g. its last few seasons). */
  context?: TimeLine;
  /** Holdout time stamps, actuals and the forecasts of each method, all aligned. */
  time: ArrayLike<number>;
  actual: ArrayLike<number>;
  forecasts: HoldoutForecast[];
  /** Interval bands of the first forecast, aligned with `time`. */
  bands?: IntervalBand[];
}

/** Input of `rankingChart`. */
export interface RankingChartInput extends ChartSize {
  title: string;
  subtitle?: string;
  /** Name of the criterion, e.g. "AICc". */
  criterion: string;
  /** Candidates with their criterion difference from the best (Δ ≥ 0, best 0). */
  candidates: ReadonlyArray<{ name: string; delta: number }>;
  /** How many candidates to show, best first; default 15. */
  top?: number;
}

/** Input of `residualChart`. */
export interface ResidualChartInput extends ChartSize {
  title: string;
  subtitle?: string;
  /** One-step residuals in time order; missing (NaN) values are dropped. */
  residuals: ArrayLike<number>;
  /** Time stamps of the residuals (aligned); without them the panel over time counts steps 1, 2, … */
  time?: ArrayLike<number>;
  frequency?: Frequency;
  /**
   * The standard deviation the residuals are divided by, e.g. the asserted equation's σ̂ (on the
   * residuals' scale); default the root mean square of the finite residuals.
   */
  scale?: number;
  /** Name of the scale in the axis title (default "σ̂"). */
  scaleLabel?: string;
}

/** Default width of the two-panel residual chart, pixels. */
const RESIDUAL_WIDTH = 1200;

type Point = { x: number; y: number | null };
/** How a dataset appears in the legend: a line sample, a filled box, or not at all. */
type LegendStyle =
  | { kind: 'line'; color: string; width: number; dash: number[] }
  | { kind: 'rect'; color: string }
  | { kind: 'none' };

const NO_LEGEND: LegendStyle = { kind: 'none' };

/** The legend line sample of a line dataset: its own colour, width and dash. */
function lineLegend(ds: { borderColor?: unknown; borderWidth?: unknown; borderDash?: unknown }): LegendStyle {
  return { kind: 'line', color: String(ds.borderColor), width: Number(ds.borderWidth ?? look.lineWidth), dash: (ds.borderDash as number[] | undefined) ?? [] };
}

function points(time: ArrayLike<number>, values: ArrayLike<number>, frequency: Frequency): Point[] {
  if (time.length !== values.length) throw new RangeError(`chart: ${time.length} time stamps but ${values.length} values; pass aligned arrays`);
  const out: Point[] = [];
  for (let i = 0; i < time.length; i++) {
    const v = values[i];
    out.push({ x: axisValue(time[i], frequency), y: Number.isFinite(v) ? v : null });
  }
  return out;
}

function finiteBounds(...arrays: ArrayLike<number>[]): { first: number; last: number } {
  let first = Number.POSITIVE_INFINITY;
  let last = Number.NEGATIVE_INFINITY;
  for (const a of arrays) {
    for (let i = 0; i < a.length; i++) {
      if (Number.isFinite(a[i])) {
        if (a[i] < first) first = a[i];
        if (a[i] > last) last = a[i];
      }
    }
  }
  return { first, last };
}

function axisTitle(text: string): { display: boolean; text: string; color: string; font: ReturnType<typeof font>; padding: number } {
  return { display: text !== '', text, color: palette.mutedText, font: font(look.labelSize), padding: 4 };
}

function valueTitle(t: ChartText): string {
  const label = t.valueLabel ?? 'value';
  return t.unit ? `${label} (${t.unit})` : label;
}

const FREQUENCY_WORD: Record<Frequency, string> = {
  hourly: 'hourly',
  daily: 'daily',
  weekly: 'weekly',
  monthly: 'monthly',
  quarterly: 'quarterly',
  yearly: 'yearly',
  index: 'step',
};

function timeTitle(f: Frequency): string {
  return f === 'index' ? 'step' : `time (${FREQUENCY_WORD[f]} data)`;
}

/** The linear time axis with calendar ticks (see chart-axis.ts). */
function timeScale(first: number, last: number, frequency: Frequency, width: number): Record<string, unknown> {
  const range = timeRange(first, last, frequency);
  const plotWidth = Math.max(100, width - 130);
  const maxTicks = Math.floor(plotWidth / (tickLabelChars(frequency) * 7.4 + 34));
  const ticks: AxisTick[] = timeTicks(range.from, range.to, frequency, maxTicks);
  return {
    type: 'linear',
    min: range.min,
    max: range.max,
    afterBuildTicks: (axis: Scale) => {
      axis.ticks = ticks.map((t) => ({ value: t.value }));
    },
    ticks: {
      autoSkip: false,
      maxRotation: 0,
      color: palette.mutedText,
      font: font(look.tickSize),
      callback: (_value: unknown, index: number) => ticks[index]?.label ?? '',
    },
    grid: { color: palette.grid, drawTicks: true, tickLength: 4 },
    border: { color: palette.axis },
    title: axisTitle(timeTitle(frequency)),
  };
}

function valueScale(title: string, extra: Record<string, unknown> = {}, floor?: number): Record<string, unknown> {
  return {
    type: 'linear',
    grace: '4%',
    ...(floor !== undefined
      ? {
          // after the nice ticks are placed (they may reach below the floor): cut the axis there
          afterBuildTicks: (axis: Scale) => {
            if (axis.min < floor) {
              axis.min = floor;
              axis.ticks = axis.ticks.filter((t) => t.value >= floor);
            }
          },
        }
      : {}),
    // a common minimum width keeps stacked panels' plot areas aligned
    afterFit: (axis: Scale) => {
      if (axis.isHorizontal()) return;
      axis.width = Math.max(axis.width, 78);
    },
    ticks: {
      color: palette.mutedText,
      font: font(look.tickSize),
      maxTicksLimit: 8,
      callback: (value: number | string, _index: number, ticks: { value: number }[]) => {
        const v = Number(value);
        const step = ticks.length > 1 ? Math.abs(ticks[1].value - ticks[0].value) : Math.abs(v) || 1;
        const maxAbs = ticks.reduce((m, t) => Math.max(m, Math.abs(t.value)), 0);
        return formatValueTick(v, step, maxAbs);
      },
    },
    grid: { color: palette.grid, tickLength: 4 },
    border: { color: palette.axis },
    title: axisTitle(title),
    ...extra,
  };
}

const LAYOUT = { padding: { left: 10, right: 22, top: 8, bottom: 6 } };

/**
 * Title, subtitle, legend (above the plot; legend styles by dataset), no tooltips. Title and
 * subtitle wrap to the chart's `width` (less the layout padding) rather than being squeezed.
 */
function frame(title: string, subtitle: string | undefined, styles: LegendStyle[], width: number, sizes: { title?: number } = {}): Record<string, unknown> {
  const room = width - LAYOUT.padding.left - LAYOUT.padding.right - 4;
  const titleSize = sizes.title ?? look.titleSize;
  return {
    title: {
      display: true,
      text: wrapText(title, titleSize, room, 'bold'),
      align: 'start',
      color: palette.text,
      font: font(titleSize, 'bold'),
      padding: { top: 4, bottom: subtitle ? 2 : 8 },
    },
    subtitle: {
      display: subtitle !== undefined && subtitle !== '',
      text: subtitle ? wrapText(subtitle, look.subtitleSize, room) : '',
      align: 'start',
      color: palette.mutedText,
      font: font(look.subtitleSize),
      padding: { top: 0, bottom: 8 },
    },
    legend: {
      display: styles.some((s) => s.kind !== 'none'),
      position: 'top',
      align: 'end',
      labels: {
        color: palette.text,
        font: font(look.legendSize),
        usePointStyle: true,
        pointStyleWidth: 26,
        boxHeight: 10,
        padding: 14,
        generateLabels: (chart: Chart): LegendItem[] => {
          const items: LegendItem[] = [];
          styles.forEach((style, datasetIndex) => {
            if (style.kind === 'none') return;
            const text = String(chart.data.datasets[datasetIndex]?.label ?? '');
            if (style.kind === 'rect') {
              items.push({ text, datasetIndex, fillStyle: style.color, strokeStyle: style.color, lineWidth: 0, pointStyle: 'rect', hidden: false });
            } else {
              items.push({ text, datasetIndex, fillStyle: style.color, strokeStyle: style.color, lineWidth: style.width, lineDash: style.dash, pointStyle: 'line', hidden: false });
            }
          });
          return items;
        },
      },
    },
    tooltip: { enabled: false },
  };
}

/** Dashed vertical marker at axis value `x` with a small label, the region after it shaded. */
function markerPlugin(x: number | null, label: string, shade: boolean): Plugin {
  return {
    id: 'certaMarker',
    beforeDatasetsDraw(chart) {
      if (x === null || !Number.isFinite(x)) return;
      const scale = chart.scales.x;
      const area = chart.chartArea;
      const px = scale.getPixelForValue(x);
      if (px < area.left || px > area.right) return;
      const ctx = chart.ctx;
      ctx.save();
      if (shade) {
        ctx.fillStyle = palette.holdoutShade;
        ctx.fillRect(px, area.top, area.right - px, area.bottom - area.top);
      }
      ctx.strokeStyle = palette.marker;
      ctx.lineWidth = 1.25;
      ctx.setLineDash([5, 4]);
      ctx.beginPath();
      ctx.moveTo(px, area.top);
      ctx.lineTo(px, area.bottom);
      ctx.stroke();
      ctx.setLineDash([]);
      const f = font(look.tickSize);
      ctx.font = `${f.size}px ${f.family}`;
      ctx.fillStyle = palette.mutedText;
      ctx.textBaseline = 'top';
      const textWidth = ctx.measureText(label).width;
      const room = area.right - px;
      if (room >= textWidth + 10) {
        ctx.textAlign = 'left';
        ctx.fillText(label, px + 5, area.top + 4);
      } else {
        ctx.textAlign = 'right';
        ctx.fillText(label, px - 5, area.top + 4);
      }
      ctx.restore();
    },
  };
}

function lineDataset(label: string, data: Point[], color: string, options: { width?: number; dash?: number[]; points?: boolean; order?: number } = {}): ChartDataset<'line', Point[]> {
  return {
    label,
    data,
    borderColor: color,
    backgroundColor: color,
    borderWidth: options.width ?? look.lineWidth,
    borderDash: options.dash ?? [],
    pointRadius: options.points ? look.pointRadius : 0,
    pointBorderWidth: 0,
    pointBackgroundColor: color,
    fill: false,
    tension: 0,
    spanGaps: false,
    order: options.order ?? 0,
  };
}

function showPoints(n: number): boolean {
  return n <= 48;
}

/**
 * History with fitted values: the observed series in slate, the fitted values in dashed teal,
 * optionally a dashed marker at the start of the holdout with the holdout period shaded.
 */
export function historyChart(input: HistoryChartInput): Buffer {
  const { width, height } = resolveSize(input);
  const f = input.frequency;
  const n = input.time.length;
  const datasets: ChartDataset<'line', Point[]>[] = [lineDataset('observed', points(input.time, input.actual, f), palette.observed, { points: showPoints(n), order: 1 })];
  if (input.fitted !== undefined) {
    datasets.push(lineDataset(input.fittedLabel ?? 'fitted', points(input.time, input.fitted, f), palette.fitted, { dash: [7, 4], order: 0 }));
  }
  if (input.outOfSample !== undefined) {
    datasets.push(lineDataset(input.outOfSampleLabel ?? 'out-of-sample forecast', points(input.time, input.outOfSample, f), palette.forecast, { order: 0 }));
  }
  const marker = input.holdoutStart === undefined ? null : axisValue(input.holdoutStart, f);
  return renderTimeLines(input, datasets, datasets.map(lineLegend), finiteBounds(input.time), marker, width, height);
}

/**
 * Renders line datasets on a calendar time axis with the chart frame (title, subtitle, legend),
 * the value axis titled from `text`, and, when `marker` is given, the dashed holdout marker with
 * the part after it shaded. Shared by the history, forecast and holdout charts.
 */
function renderTimeLines(
  text: ChartText & { frequency: Frequency },
  datasets: ChartDataset<'line', Point[]>[],
  styles: ReturnType<typeof lineLegend>[],
  bounds: { first: number; last: number },
  marker: number | null,
  width: number,
  height: number,
): Buffer {
  const config: ChartConfiguration = {
    type: 'line',
    data: { datasets },
    options: {
      layout: LAYOUT,
      plugins: { ...frame(text.title, text.subtitle, styles, width), filler: { propagate: false } },
      scales: { x: timeScale(bounds.first, bounds.last, text.frequency, width), y: valueScale(valueTitle(text), {}, text.floor) },
    },
    plugins: marker === null ? [] : [markerPlugin(marker, 'holdout', true)],
  } as ChartConfiguration;
  return renderChart(config, width, height);
}

function levelText(level: number): string {
  return `${Math.round(level * 1000) / 10} % interval`;
}

/**
 * Interval bands as datasets: the innermost level filled (palette.bands[0]), every wider level
 * drawn as dashed edge lines without fill (palette.bandEdge), so the levels stay apart.
 */
function pushBands(datasets: ChartDataset<'line', Point[]>[], styles: LegendStyle[], bands: readonly IntervalBand[], toPoints: (values: ArrayLike<number>) => Point[]): void {
  bands.forEach((band, i) => {
    const upper = toPoints(band.upper);
    const lower = toPoints(band.lower);
    const order = 10 + i;
    if (i === 0) {
      const color = palette.bands[0];
      datasets.push({ ...lineDataset(levelText(band.level), upper, color, { width: 0, order }), backgroundColor: color, fill: '+1' });
      datasets.push({ ...lineDataset('', lower, color, { width: 0, order }), fill: false });
      styles.push({ kind: 'rect', color }, NO_LEGEND);
    } else {
      const edge = lineDataset(`${levelText(band.level)} (edges)`, upper, palette.bandEdge, { width: look.thinLineWidth, dash: [6, 4], order });
      datasets.push(edge, lineDataset('', lower, palette.bandEdge, { width: look.thinLineWidth, dash: [6, 4], order }));
      styles.push(lineLegend(edge), NO_LEGEND);
    }
  });
}

/**
 * Forecast after the history: observed in ink, the point forecast in indigo, the inner interval
 * band filled and wider ones as dashed edges (`pushBands`). Line and bands start from the last
 * observation (zero width there), so the forecast reads as its continuation.
 */
export function forecastChart(input: ForecastChartInput): Buffer {
  const { width, height } = resolveSize(input);
  const f = input.frequency;
  const hist = points(input.history.time, input.history.values, f);
  const fc = points(input.forecast.time, input.forecast.mean, f);
  let anchor: Point | null = null;
  for (let i = hist.length - 1; i >= 0; i--) {
    if (hist[i].y !== null) {
      anchor = hist[i];
      break;
    }
  }
  const forecastLine = anchor !== null && fc.length > 0 && anchor.x < fc[0].x ? [anchor, ...fc] : fc;
  const datasets: ChartDataset<'line', Point[]>[] = [
    lineDataset('observed', hist, palette.observed, { points: showPoints(hist.length), order: 1 }),
    lineDataset('forecast', forecastLine, palette.forecast, { points: showPoints(fc.length), order: 0 }),
  ];
  const styles: LegendStyle[] = datasets.map(lineLegend);
  const bands = [...(input.forecast.bands ?? [])].sort((a, b) => a.level - b.level);
  // bands open from the last observation, like the forecast line, so a one-step band shows too
  const anchored = (p: Point[]): Point[] => (forecastLine !== fc && anchor !== null ? [anchor, ...p] : p);
  pushBands(datasets, styles, bands, (values) => anchored(points(input.forecast.time, values, f)));
  return renderTimeLines(input, datasets, styles, finiteBounds(input.history.time, input.forecast.time), null, width, height);
}

/**
 * Holdout actuals against forecasts: training context in thin slate, holdout actuals in slate
 * with points, each forecast (e.g. fixed origin, rolling origin) in its own colour and dash, the
 * bands of the first forecast (`pushBands`), a marker at the start of the holdout.
 */
export function holdoutChart(input: HoldoutChartInput): Buffer {
  const { width, height } = resolveSize(input);
  const f = input.frequency;
  const datasets: ChartDataset<'line', Point[]>[] = [];
  if (input.context !== undefined) {
    datasets.push(lineDataset('observed (training)', points(input.context.time, input.context.values, f), palette.marker, { width: look.thinLineWidth, order: 3 }));
  }
  datasets.push(lineDataset('observed (holdout)', points(input.time, input.actual, f), palette.observed, { points: true, order: 2 }));
  const dashes = [[], [7, 4], [2, 3], [10, 3, 2, 3]];
  input.forecasts.forEach((fcast, i) => {
    const color = palette.cycle[i % palette.cycle.length];
    datasets.push(lineDataset(fcast.label, points(input.time, fcast.values, f), color, { dash: dashes[i % dashes.length], points: showPoints(input.time.length), order: 0 }));
  });
  const styles: LegendStyle[] = datasets.map(lineLegend);
  pushBands(datasets, styles, [...(input.bands ?? [])].sort((a, b) => a.level - b.level), (values) => points(input.time, values, f));
  const marker = input.context !== undefined && input.time.length > 0 ? axisValue(input.time[0], f) : null;
  return renderTimeLines(input, datasets, styles, finiteBounds(input.context?.time ?? [], input.time), marker, width, height);
}

/**
 * A label broken into lines of at most `width` characters, whole phrases first: it breaks after
 * a comma when the comma-separated parts fit, and inside a part (at spaces) only when the part
 * alone is longer than a line; a word longer than a line stays whole, so nothing is cut off.
 * @example wrapLabel('AR lags 1-3, trend, 1 harmonic', 14) → ['AR lags 1-3,', 'trend,', '1 harmonic']
 */
export function wrapLabel(name: string, width: number): string[] {
  // phrases keep their comma: "AR lags 1-3," "trend," "1 harmonic"
  const phrases = name.split(/(?<=,) /);
  const lines: string[] = [];
  let line = '';
  const push = (piece: string): void => {
    if (line === '') line = piece;
    else if (line.length + 1 + piece.length <= width) line += ` ${piece}`;
    else {
      lines.push(line);
      line = piece;
    }
  };
  for (const phrase of phrases) {
    if (phrase.length <= width) push(phrase);
    else for (const w of phrase.split(' ')) push(w);
  }
  if (line !== '' || lines.length === 0) lines.push(line);
  return lines;
}

function deltaText(d: number): string {
  if (d === 0) return '0 (best)';
  return `+${d < 0.01 ? String(Number(d.toPrecision(2))) : d < 10 ? d.toFixed(2) : d < 100 ? d.toFixed(1) : d.toFixed(0)}`;
}

/** Characters per line of a ranking label. */
const RANK_LABEL_CHARS = 62;

/**
 * Ranking of candidates: horizontal bars of Δcriterion (difference from the best candidate),
 * best at the top in indigo, the rest in grey-blue, each bar labelled with its Δ and each
 * candidate named in full (labels wrap, `wrapLabel`; the chart grows to fit them). Candidates with a
 * non-finite Δ are left out and counted in the subtitle.
 */
export function rankingChart(input: RankingChartInput): Buffer {
  const size = resolveSize(input);
  const width = size.width;
  const top = input.top ?? 15;
  if (!Number.isInteger(top) || top < 1) throw new RangeError(`rankingChart: top must be an integer ≥ 1, got ${top}`);
  const finite = input.candidates.map((c, i) => ({ ...c, i })).filter((c) => Number.isFinite(c.delta));
  finite.sort((a, b) => a.delta - b.delta || a.i - b.i);
  const shown = finite.slice(0, top);
  const notes: string[] = [];
  if (input.subtitle) notes.push(input.subtitle);
  if (finite.length > shown.length) notes.push(`best ${shown.length} of ${finite.length} candidates`);
  const dropped = input.candidates.length - finite.length;
  if (dropped > 0) notes.push(`${dropped} without a finite score not shown`);
  // every label whole: rows of up to three lines, the chart as tall as they need
  const lineCount = shown.reduce((sum, c) => sum + Math.max(1, wrapLabel(c.name, RANK_LABEL_CHARS).length), 0);
  const height = input.height ?? Math.min(4000, Math.max(size.height, 130 + lineCount * 15 + shown.length * 10));
  const bestDelta = shown.length > 0 ? shown[0].delta : 0;
  const maxDelta = shown.reduce((m, c) => Math.max(m, c.delta), 0);
  const valueLabels: Plugin = {
    id: 'certaBarValues',
    afterDatasetsDraw(chart) {
      const meta = chart.getDatasetMeta(0);
      const ctx = chart.ctx;
      ctx.save();
      const f = font(look.tickSize);
      ctx.font = `${f.size}px ${f.family}`;
      ctx.fillStyle = palette.text;
      ctx.textBaseline = 'middle';
      ctx.textAlign = 'left';
      meta.data.forEach((bar, i) => {
        const { x, y } = bar.getProps(['x', 'y'], true) as { x: number; y: number };
        ctx.fillText(deltaText(shown[i].delta), x + 6, y);
      });
      ctx.restore();
    },
  };
  const config: ChartConfiguration = {
    type: 'bar',
    data: {
      labels: shown.map((c) => wrapLabel(c.name, RANK_LABEL_CHARS)),
      datasets: [
        {
          label: `Δ${input.criterion}`,
          data: shown.map((c) => c.delta),
          backgroundColor: shown.map((c) => (c.delta === bestDelta ? palette.bestBar : palette.bar)),
          borderWidth: 0,
          minBarLength: 4,
          maxBarThickness: 30,
          barPercentage: 0.78,
          categoryPercentage: 0.9,
        },
      ],
    },
    options: {
      indexAxis: 'y',
      layout: { padding: { left: 10, right: 30, top: 8, bottom: 6 } },
      plugins: frame(input.title, notes.join(' · '), [NO_LEGEND], width),
      scales: {
        x: valueScale(`Δ${input.criterion} (difference from the best candidate; lower is better)`, {
          min: 0,
          suggestedMax: maxDelta > 0 ? maxDelta * 1.14 : 1,
          grace: 0,
        }),
        y: {
          type: 'category',
          grid: { display: false },
          border: { color: palette.axis },
          ticks: { color: palette.text, font: font(look.tickSize), autoSkip: false },
        },
      },
    },
    plugins: [valueLabels],
  } as ChartConfiguration;
  return renderChart(config, width, height);
}

/** Shaded horizontal band between values `from` and `to` of the y axis, under the datasets. */
function bandPlugin(from: number, to: number, color: string): Plugin {
  return {
    id: 'certaValueBand',
    beforeDatasetsDraw(chart) {
      const y = chart.scales.y;
      const area = chart.chartArea;
      const top = Math.max(area.top, Math.min(area.bottom, y.getPixelForValue(to)));
      const bottom = Math.max(area.top, Math.min(area.bottom, y.getPixelForValue(from)));
      const ctx = chart.ctx;
      ctx.save();
      ctx.fillStyle = color;
      ctx.fillRect(area.left, top, area.right - area.left, bottom - top);
      ctx.strokeStyle = palette.axis;
      ctx.lineWidth = 1;
      const zero = y.getPixelForValue(0);
      if (zero > area.top && zero < area.bottom) {
        ctx.beginPath();
        ctx.moveTo(area.left, zero);
        ctx.lineTo(area.right, zero);
        ctx.stroke();
      }
      ctx.restore();
    },
  };
}

/** The left panel: the cumulative periodogram with the white-noise diagonal and its band. */
function periodogramPanel(residuals: ArrayLike<number>, width: number): ChartConfiguration {
  const cp = cumulativePeriodogram(residuals);
  const q = cp.frequency.length;
  const fx = Array.from(cp.frequency);
  const diag = fx.map((x, j) => ({ x, y: (j + 1) / q }));
  const step = fx.map((x, j) => ({ x, y: Number.isFinite(cp.cumulative[j]) ? cp.cumulative[j] : null }));
  const band = Number.isFinite(cp.band95) ? cp.band95 : Number.NaN;
  const edge = (sign: number) => diag.map((p) => ({ x: p.x, y: Number.isFinite(band) ? Math.min(1, Math.max(0, p.y + sign * band)) : null }));
  const cumulative = { ...lineDataset('cumulative periodogram', step, palette.observed, { order: 0 }), stepped: 'before' as const };
  const white = lineDataset('white noise', diag, palette.marker, { width: 1, order: 1 });
  const upper = lineDataset('95 % band', edge(1), palette.bound, { width: look.thinLineWidth, dash: [6, 4], order: 2 });
  const lower = lineDataset('', edge(-1), palette.bound, { width: look.thinLineWidth, dash: [6, 4], order: 2 });
  const verdict = Number.isFinite(cp.statistic)
    ? `D = ${cp.statistic.toFixed(3)}, band ±${band.toFixed(3)}, ${cp.pValue < 0.001 ? 'p < 0.001' : `p = ${cp.pValue.toFixed(3)}`}: ${cp.statistic <= band ? 'inside, no structure left' : 'outside, a cycle or trend is left'}`
    : `${cp.n} residuals: too few or constant, no periodogram`;
  return {
    type: 'line',
    data: { datasets: [cumulative, white, upper, lower] },
    options: {
      layout: LAYOUT,
      plugins: frame('Cumulative periodogram (Bartlett, Kolmogorov–Smirnov band)', verdict, [lineLegend(cumulative), lineLegend(white), lineLegend(upper), NO_LEGEND], width, { title: look.panelTitleSize }),
      scales: {
        x: { type: 'linear', min: 0, max: 0.5, grid: { color: palette.grid }, border: { color: palette.axis }, ticks: { color: palette.mutedText, font: font(look.tickSize), maxTicksLimit: 6 }, title: axisTitle('frequency (cycles per period; 0.5 = alternating)') },
        y: valueScale('cumulative share of the residual variance', { min: 0, max: 1, grace: 0 }),
      },
    },
  } as ChartConfiguration;
}

/** The right panel: standardised one-step residuals over time, the ±2 band shaded, points outside it marked. */
function overTimePanel(input: ResidualChartInput, width: number): ChartConfiguration {
  const f: Frequency = input.time !== undefined ? (input.frequency ?? 'index') : 'index';
  const time = input.time ?? Float64Array.from({ length: input.residuals.length }, (_, i) => i + 1);
  if (time.length !== input.residuals.length) throw new RangeError(`residualChart: ${time.length} time stamps but ${input.residuals.length} residuals; pass aligned arrays`);
  const bound = RESIDUAL_BOUND;
  const { values, scale, n, outside: out, largest } = standardisedResiduals(input.residuals, input.scale, bound);
  const inside = values.map((v) => (Math.abs(v) <= bound ? v : Number.NaN));
  const outside = values.map((v) => (Math.abs(v) > bound ? v : Number.NaN));
  const dots = (label: string, v: Float64Array, color: string, radius: number): ChartDataset<'line', Point[]> => ({
    ...lineDataset(label, points(time, v, f), color, { points: true, order: 0 }),
    showLine: false,
    pointRadius: radius,
    // points on the first and last time stamp sit on the plot edge: draw them whole
    clip: 8,
    pointStyle: 'circle',
  });
  const within = dots('standardised residual', inside, palette.observed, look.pointRadius);
  const beyond = { ...dots(`outside ±${bound}`, outside, palette.second, look.pointRadius + 1.5), pointStyle: 'rectRot' as const };
  const scaleText = Number.isFinite(scale) ? `residual ÷ ${input.scaleLabel ?? 'σ̂'} (${input.scaleLabel ?? 'σ̂'} = ${Number(scale.toPrecision(4))})` : 'residual ÷ σ̂';
  const expected = (n * OUTSIDE_TWO_SIGMA).toFixed(1);
  const verdict = n > 0 ? `${out} of ${n} outside ±${bound} (about ${expected} expected of white normal noise); largest |value| ${largest.toFixed(2)}` : 'no residuals to standardise (none, or no spread)';
  const styles: LegendStyle[] = [
    { kind: 'rect', color: palette.observed },
    { kind: 'rect', color: palette.second },
  ];
  const bounds = finiteBounds(time);
  const limit = Math.max(3, Math.ceil(largest + 0.25));
  const shade: LegendStyle = { kind: 'rect', color: palette.residualBand };
  // a dataset without points carries the band's legend entry; the band itself is drawn by the plugin
  const bandLegend = { ...lineDataset(`±${bound} band`, [], palette.residualBand, { width: 0, order: 2 }) };
  return {
    type: 'line',
    data: { datasets: [within, beyond, bandLegend] },
    options: {
      layout: LAYOUT,
      plugins: frame('Standardised one-step residuals over time', verdict, [...styles, shade], width, { title: look.panelTitleSize }),
      scales: {
        x: Number.isFinite(bounds.first) ? timeScale(bounds.first, bounds.last, f, width) : { type: 'linear', min: 0, max: 1, title: axisTitle(timeTitle(f)) },
        y: valueScale(scaleText, { min: -limit, max: limit, grace: 0 }),
      },
    },
    plugins: [bandPlugin(-bound, bound, palette.residualBand)],
  } as ChartConfiguration;
}

/**
 * Residual checks in two panels side by side under one title. Left, whiteness: the normalised
 * cumulative periodogram of the residuals (`cumulativePeriodogram`, a step line against
 * frequency in cycles per period), the white-noise diagonal and Bartlett's 95 %
 * Kolmogorov–Smirnov band around it (dashed); a residual series with a cycle or trend left in it
 * climbs early and leaves the band (Box, Jenkins, Reinsel & Ljung 2015, §8.2.4). Right, size
 * over time: each one-step residual divided by the equation's standard deviation
 * (`standardisedResiduals`), as points, the band ±2 shaded and the points outside it marked in
 * magenta; under white normal errors about 4.55 % fall outside (P(|Z| > 2) = 0.0455).
 */
export function residualChart(input: ResidualChartInput): Buffer {
  const { width, height } = resolveSize({ width: input.width ?? RESIDUAL_WIDTH, height: input.height });
  const leftWidth = Math.round(width * 0.46);
  return renderSideBySide(
    { title: input.title, subtitle: input.subtitle },
    [
      { config: periodogramPanel(input.residuals, leftWidth), width: leftWidth },
      { config: overTimePanel(input, width - leftWidth), width: width - leftWidth },
    ],
    width,
    height,
  );
}
