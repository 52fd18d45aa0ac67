/**
 * The chart renderer: Chart.js drawing on a @napi-rs/canvas surface, encoded as PNG.
 *
 * Chart.js runs without a DOM here (its basic platform): the chart is drawn synchronously while
 * it is constructed because animation is off, at device pixel ratio 1, unresponsive, with no
 * event handling. Every chart paints an opaque background first, so the PNG bytes depend only on
 * the configuration (and on the font file found, see `chartFontFamily`).
 */
import { existsSync } from 'node:fs';
import { createCanvas, GlobalFonts, type Canvas } from '@napi-rs/canvas';
import { Chart, registerables, type ChartConfiguration, type Plugin } from 'chart.js';
import { look, palette } from './palette.js';

/** Font family name charts ask for; registered on first use from a system font file. */
const FAMILY = 'certa-sans';

/** Sans-serif font files tried in order (regular, bold). */
const FONT_CANDIDATES: ReadonlyArray<readonly [string, string]> = [
  ['/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf', '/usr/share/fonts/truetype/dejavu/DejaVuSans-Bold.ttf'],
  ['/usr/share/fonts/TTF/DejaVuSans.ttf', '/usr/share/fonts/TTF/DejaVuSans-Bold.ttf'],
  ['/usr/share/fonts/dejavu/DejaVuSans.ttf', '/usr/share/fonts/dejavu/DejaVuSans-Bold.ttf'],
  ['/usr/share/fonts/dejavu-sans-fonts/DejaVuSans.ttf', '/usr/share/fonts/dejavu-sans-fonts/DejaVuSans-Bold.ttf'],
  ['/usr/share/fonts/truetype/liberation/LiberationSans-Regular.ttf', '/usr/share/fonts/truetype/liberation/LiberationSans-Bold.ttf'],
  ['/usr/share/fonts/liberation-sans/LiberationSans-Regular.ttf', '/usr/share/fonts/liberation-sans/LiberationSans-Bold.ttf'],
  ['/Library/Fonts/Arial.ttf', '/Library/Fonts/Arial Bold.ttf'],
  ['C:\\Windows\\Fonts\\arial.ttf', 'C:\\Windows\\Fonts\\arialbd.ttf'],
];

let fontFamily: string | null = null;
let registered = false;

/**
 * The font family the charts use: `certa-sans`, registered from the first font file of the
 * candidate list that exists; if none exists, the first family the canvas found on the system;
 * if there is none at all, `sans-serif` (text may then not render).
 */
export function chartFontFamily(): string {
  if (fontFamily !== null) return fontFamily;
  for (const [regular, bold] of FONT_CANDIDATES) {
    if (existsSync(regular) && GlobalFonts.registerFromPath(regular, FAMILY) !== null) {
      if (existsSync(bold)) GlobalFonts.registerFromPath(bold, FAMILY);
      fontFamily = FAMILY;
      return fontFamily;
    }
  }
  const families = GlobalFonts.families.map((f) => f.family).sort();
  const sans = families.find((f) => /sans/i.test(f) && !/mono/i.test(f));
  fontFamily = sans ?? families[0] ?? 'sans-serif';
  return fontFamily;
}

function setup(): void {
  if (registered) return;
  Chart.register(...registerables);
  registered = true;
}

/** A Chart.js font option in the chart font. */
export function font(size: number, weight: 'normal' | 'bold' = 'normal'): { family: string; size: number; weight: 'normal' | 'bold' } {
  return { family: chartFontFamily(), size, weight };
}

/** Image size in pixels. */
export interface ChartSize {
  /** Default 1000. */
  width?: number;
  /** Default 560 (larger for two-panel charts). */
  height?: number;
}

/** Checked width and height: integers in [200, 4000]. */
export function resolveSize(size: ChartSize, defaultHeight: number = look.height): { width: number; height: number } {
  const width = size.width ?? look.width;
  const height = size.height ?? defaultHeight;
  for (const [name, v] of [['width', width], ['height', height]] as const) {
    if (!Number.isInteger(v) || v < 200 || v > 4000) throw new RangeError(`chart ${name} must be an integer from 200 to 4000 pixels, got ${v}`);
  }
  return { width, height };
}

const background: Plugin = {
  id: 'certaBackground',
  beforeDraw(chart) {
    const ctx = chart.ctx;
    ctx.save();
    ctx.fillStyle = palette.background;
    ctx.fillRect(0, 0, chart.width, chart.height);
    ctx.restore();
  },
};

/**
 * Draws a Chart.js configuration onto a new canvas of that size and hands the canvas to `use`
 * before the chart is destroyed (destroying a chart clears its canvas).
 */
function withChart<T>(config: ChartConfiguration, width: number, height: number, use: (canvas: Canvas) => T): T {
  setup();
  chartFontFamily();
  const canvas = createCanvas(width, height);
  const ctx = canvas.getContext('2d');
  const options = {
    ...config.options,
    responsive: false,
    maintainAspectRatio: false,
    animation: false as const,
    devicePixelRatio: 1,
    events: [],
  };
  const chart = new Chart(ctx as unknown as ConstructorParameters<typeof Chart>[0], {
    ...config,
    options,
    plugins: [background, ...(config.plugins ?? [])],
  } as ChartConfiguration);
  try {
    return use(canvas);
  } finally {
    chart.destroy();
  }
}

/** PNG bytes of a canvas (no metadata chunks, so no dates). */
function encodePng(canvas: Canvas): Buffer {
  return canvas.toBuffer('image/png');
}

/** PNG bytes of one Chart.js configuration. */
export function renderChart(config: ChartConfiguration, width: number, height: number): Buffer {
  return withChart(config, width, height, encodePng);
}

let measureContext: ReturnType<Canvas['getContext']> | null = null;

/** Width in pixels of `text` in the chart font at `size` and `weight`. */
export function textWidth(text: string, size: number, weight: 'normal' | 'bold' = 'normal'): number {
  if (measureContext === null) measureContext = createCanvas(8, 8).getContext('2d');
  measureContext.font = `${weight === 'bold' ? 'bold ' : ''}${size}px ${chartFontFamily()}`;
  return measureContext.measureText(text).width;
}

/**
 * `text` broken at spaces into lines no wider than `maxWidth` pixels in the chart font (a word
 * wider than a line stays whole), so a long title is wrapped instead of squeezed.
 * @example wrapText('a b', 12, 10_000) → ['a b']
 */
export function wrapText(text: string, size: number, maxWidth: number, weight: 'normal' | 'bold' = 'normal'): string[] {
  const words = text.split(' ');
  const lines: string[] = [];
  let line = '';
  for (const w of words) {
    const next = line === '' ? w : `${line} ${w}`;
    if (line !== '' && textWidth(next, size, weight) > maxWidth) {
      lines.push(line);
      line = w;
    } else line = next;
  }
  if (line !== '' || lines.length === 0) lines.push(line);
  return lines;
}

/** Title and subtitle drawn across the top of a multi-panel image. */
export interface PanelHeader {
  title: string;
  subtitle?: string;
}

/** Line height of header text, as a multiple of the font size. */
const HEADER_LINE = 1.25;

/**
 * PNG bytes of panels side by side under one header: the title (bold) and the subtitle
 * (muted, wrapped to the image width) at the top left, then each panel, a Chart.js configuration
 * drawn `width` pixels wide from left to right over the rest of the height. The panel widths
 * must add up to the image width.
 */
export function renderSideBySide(header: PanelHeader, panels: ReadonlyArray<{ config: ChartConfiguration; width: number }>, width: number, height: number): Buffer {
  const sum = panels.reduce((s, p) => s + p.width, 0);
  if (sum !== width) throw new RangeError(`renderSideBySide: panel widths add up to ${sum} pixels, the image is ${width} wide`);
  const left = 10;
  const subtitle = header.subtitle ? wrapText(header.subtitle, look.subtitleSize, width - 2 * left) : [];
  const headerHeight = Math.ceil(4 + look.titleSize * HEADER_LINE + (subtitle.length > 0 ? 2 + subtitle.length * look.subtitleSize * HEADER_LINE : 0) + 6);
  if (headerHeight >= height - 100) throw new RangeError(`renderSideBySide: a header of ${headerHeight} pixels leaves no room for the panels in ${height}`);
  const canvas = createCanvas(width, height);
  const ctx = canvas.getContext('2d');
  ctx.fillStyle = palette.background;
  ctx.fillRect(0, 0, width, height);
  ctx.textBaseline = 'top';
  ctx.textAlign = 'left';
  ctx.fillStyle = palette.text;
  ctx.font = `bold ${look.titleSize}px ${chartFontFamily()}`;
  ctx.fillText(header.title, left, 4);
  ctx.fillStyle = palette.mutedText;
  ctx.font = `${look.subtitleSize}px ${chartFontFamily()}`;
  subtitle.forEach((line, i) => ctx.fillText(line, left, 4 + look.titleSize * HEADER_LINE + 2 + i * look.subtitleSize * HEADER_LINE));
  let x = 0;
  for (const p of panels) {
    withChart(p.config, p.width, height - headerHeight, (panel) => ctx.drawImage(panel, x, headerHeight));
    x += p.width;
  }
  return encodePng(canvas);
}
