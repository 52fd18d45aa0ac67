import { describe, expect, it } from 'vitest';
import { createCanvas, loadImage } from '@napi-rs/canvas';
import { stepTime } from '../../src/data/calendar.js';
import { forecastChart, historyChart, holdoutChart, rankingChart, residualChart, wrapLabel } from '../../src/report/charts.js';
import { palette } from '../../src/report/palette.js';
import { lumoForecast, lumoHistory, lumoHoldout, lumoRanking, lumoResiduals } from './chart-fixtures.js';

/** PNG signature bytes, PNG specification (W3C, 2nd ed. 2003) section 5.2. */
const PNG_SIGNATURE = Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]);

/** Width and height from the IHDR chunk (bytes 16–23, big-endian), PNG specification 11.2.2. */
function pngSize(png: Buffer): { width: number; height: number } {
  expect(png.subarray(12, 16).toString('ascii')).toBe('IHDR');
  return { width: png.readUInt32BE(16), height: png.readUInt32BE(20) };
}

async function pixels(png: Buffer): Promise<{ data: Uint8ClampedArray; width: number; height: number }> {
  const img = await loadImage(png);
  const canvas = createCanvas(img.width, img.height);
  const ctx = canvas.getContext('2d');
  ctx.drawImage(img, 0, 0);
  return { data: ctx.getImageData(0, 0, img.width, img.height).data, width: img.width, height: img.height };
}

function parseRgb(hex: string): [number, number, number] {
  return [1, 3, 5].map((i) => Number.parseInt(hex.slice(i, i + 2), 16)) as [number, number, number];
}

/** Colour of `rgb` at opacity `a` drawn over `under` (source-over compositing). */
function over(rgb: [number, number, number], a: number, under: [number, number, number]): [number, number, number] {
  return [0, 1, 2].map((i) => rgb[i] * a + under[i] * (1 - a)) as [number, number, number];
}

type Img = { data: Uint8ClampedArray; width: number; height: number };

function near(img: Img, x: number, y: number, rgb: number[], tol: number): boolean {
  if (y < 0 || y >= img.height) return false;
  const o = 4 * (y * img.width + x);
  return Math.abs(img.data[o] - rgb[0]) <= tol && Math.abs(img.data[o + 1] - rgb[1]) <= tol && Math.abs(img.data[o + 2] - rgb[2]) <= tol;
}

/** Pixels within ±tol of `rgb` per channel, counted over columns [x0, x1). */
function countColour(img: Img, rgb: number[], x0: number, x1: number, tol = 4): number {
  let count = 0;
  for (let y = 0; y < img.height; y++) for (let x = x0; x < x1; x++) if (near(img, x, y, rgb, tol)) count++;
  return count;
}

/**
 * Pixels of colour `rgb` in rows [y0, y1) whose neighbours 2 pixels up, down, left and right have
 * that colour too: filled areas count, the anti-aliased edges of thin lines do not.
 */
function countNear(img: Img, rgb: number[], x0: number, x1: number, tol: number, y0 = 0, y1 = img.height): number {
  let count = 0;
  for (let y = y0; y < y1; y++) for (let x = x0; x < x1; x++) if (near(img, x, y, rgb, tol)) count++;
  return count;
}

function countFilled(img: Img, rgb: number[], x0: number, x1: number, tol = 4, y0 = 0, y1 = img.height): number {
  let count = 0;
  for (let y = y0; y < y1; y++) {
    for (let x = x0; x < x1; x++) {
      const filled =
        near(img, x, y, rgb, tol) &&
        near(img, x, y - 2, rgb, tol) &&
        near(img, x, y + 2, rgb, tol) &&
        x >= 2 &&
        x + 2 < img.width &&
        near(img, x - 2, y, rgb, tol) &&
        near(img, x + 2, y, rgb, tol);
      if (filled) count++;
    }
  }
  return count;
}

const WHITE: [number, number, number] = [255, 255, 255];
// the inner band fill of palette.ts, rgba(59, 76, 192, 0.26), over white; wider bands are edges
const INNER_ON_WHITE = over(parseRgb(palette.forecast), 0.26, WHITE);
const EDGE: [number, number, number] = parseRgb(palette.bandEdge);

const cases: Array<[string, () => Buffer, number, number]> = [
  ['historyChart', () => historyChart(lumoHistory), 1000, 560],
  ['forecastChart', () => forecastChart(lumoForecast), 1000, 560],
  ['holdoutChart', () => holdoutChart(lumoHoldout), 1000, 560],
  ['rankingChart', () => rankingChart(lumoRanking), 1000, 560],
  ['residualChart', () => residualChart(lumoResiduals), 1200, 560],
];

describe.each(cases)('%s', (_name, render, width, height) => {
  it('returns a PNG of the default size', () => {
    const png = render();
    expect(png.subarray(0, 8).equals(PNG_SIGNATURE)).toBe(true);
    expect(pngSize(png)).toEqual({ width, height });
  });
  it('is deterministic: the same input gives identical bytes', () => {
    expect(render().equals(render())).toBe(true);
  });
  it('renders text: title-coloured pixels in the top-left title area', async () => {
    const img = await pixels(render());
    const title = { ...img, height: 34 };
    expect(countColour(title, parseRgb(palette.text), 0, 300, 30)).toBeGreaterThan(100);
  });
});

describe('forecastChart bands', () => {
  it('fills the inner band and draws the outer band as edges, in the forecast part only', async () => {
    const img = await pixels(forecastChart(lumoForecast));
    // history spans 2016–2023, the forecast 2024–2025: the right fifth of the plot is forecast
    // rows 100–500 are inside the plot area (the legend's samples sit above row 90)
    const inner = (x0: number, x1: number) => countFilled(img, INNER_ON_WHITE.map(Math.round), x0, x1, 4, 100, 500);
    const edge = (x0: number, x1: number) => countNear(img, EDGE, x0, x1, 10, 100, 500);
    expect(inner(0, 500)).toBe(0);
    expect(edge(0, 500)).toBe(0);
    expect(inner(780, 1000)).toBeGreaterThan(200);
    expect(edge(780, 1000)).toBeGreaterThan(30);
  });
  it('draws no band when no bands are given', async () => {
    const img = await pixels(forecastChart({ ...lumoForecast, forecast: { ...lumoForecast.forecast, bands: [] } }));
    const withBands = await pixels(forecastChart(lumoForecast));
    // anti-aliased line pixels may match the fill colour here and there, far fewer than a band
    expect(countFilled(img, INNER_ON_WHITE.map(Math.round), 780, 1000)).toBeLessThan(countFilled(withBands, INNER_ON_WHITE.map(Math.round), 780, 1000) / 5);
    expect(countNear(withBands, EDGE, 780, 1000, 10, 100, 500)).toBeGreaterThan(3 * countNear(img, EDGE, 780, 1000, 10, 100, 500));
  });
  it('holdoutChart draws the bands of the first forecast', async () => {
    const bands = [{ level: 0.5, lower: Array.from(lumoHoldout.forecasts[0].values, (v) => v - 400), upper: Array.from(lumoHoldout.forecasts[0].values, (v) => v + 400) }];
    const withBands = await pixels(holdoutChart({ ...lumoHoldout, bands }));
    const without = await pixels(holdoutChart(lumoHoldout));
    // inside the holdout the band lies over the holdout shade: count pixels bluer than any grey
    const bluish = (img: Img) => {
      let n = 0;
      for (let y = 100; y < 500; y++) for (let x = 770; x < 980; x++) {
        const o = 4 * (y * img.width + x);
        if (img.data[o + 2] - img.data[o] > 25 && img.data[o + 2] - img.data[o] < 45) n++;
      }
      return n;
    };
    expect(bluish(withBands)).toBeGreaterThan(2000);
    expect(bluish(without)).toBeLessThan(bluish(withBands) / 10);
  });
  it('accepts a custom size', () => {
    expect(pngSize(forecastChart({ ...lumoForecast, width: 640, height: 400 }))).toEqual({ width: 640, height: 400 });
  });
  it('rejects a size outside 200–4000 pixels', () => {
    expect(() => forecastChart({ ...lumoForecast, width: 50 })).toThrow(RangeError);
  });
});

describe('wrapLabel', () => {
  it('breaks after commas when the parts fit, so a phrase such as "1 seasonal harmonic" stays on one line', () => {
    expect(wrapLabel('AR lags 1-3, trend, 1 harmonic', 14)).toEqual(['AR lags 1-3,', 'trend,', '1 harmonic']);
    expect(wrapLabel('logistic growth path, level effects of subsidy, frost_index, 1 seasonal harmonic', 62)).toEqual([
      'logistic growth path, level effects of subsidy, frost_index,',
      '1 seasonal harmonic',
    ]);
  });
  it('breaks inside a part longer than a line, keeps a word longer than a line whole, and loses nothing', () => {
    const names = ['AR lags 1-3, subsidy lags 0-1, frost_index lag 0 after delay 1, trend, 1 harmonic', 'x'.repeat(80), 'a, b', ''];
    for (const name of names) {
      for (const width of [8, 20, 62]) {
        const lines = wrapLabel(name, width);
        expect(lines.join(' ')).toBe(name);
        for (const l of lines) if (l.includes(' ')) expect(l.length).toBeLessThanOrEqual(width);
      }
    }
  });
});

describe('residualChart panels', () => {
  // the ±2 band of palette.ts, rgba(107, 142, 35, 0.2), over white
  const SHADE = over([107, 142, 35], 0.2, WHITE).map(Math.round);
  const MAGENTA = parseRgb(palette.second);
  // below the panel legends (about row 105), above the time axis
  const plotRows = [130, 500] as const;
  it('draws the periodogram on the left and the shaded ±2 band of the residuals over time on the right', async () => {
    const img = await pixels(residualChart(lumoResiduals));
    expect(countFilled(img, SHADE, 0, 552, 3, ...plotRows)).toBe(0);
    expect(countFilled(img, SHADE, 560, 1200, 3, ...plotRows)).toBeGreaterThan(20_000);
    // the periodogram's step line is ink on the left
    expect(countNear(img, parseRgb(palette.observed), 60, 540, 30, ...plotRows)).toBeGreaterThan(300);
  });
  it('marks points outside ±2 in magenta, and only those', async () => {
    const calm = Array.from({ length: 60 }, (_, i) => Math.sin(i * 1.7));
    const time = Float64Array.from({ length: 60 }, (_, i) => stepTime(Date.UTC(2019, 0, 1), 'monthly', i));
    // scale 1: the sines stay inside ±2; one value of 3.5 lies outside
    const without = await pixels(residualChart({ title: 'calm', residuals: calm, time, frequency: 'monthly', scale: 1 }));
    const withOne = await pixels(residualChart({ title: 'one outlier', residuals: calm.map((v, i) => (i === 30 ? 3.5 : v)), time, frequency: 'monthly', scale: 1 }));
    expect(countNear(without, MAGENTA, 560, 1200, 6, ...plotRows)).toBe(0);
    expect(countNear(withOne, MAGENTA, 560, 1200, 6, ...plotRows)).toBeGreaterThan(15);
  });
  it('refuses time stamps not aligned with the residuals (RangeError)', () => {
    expect(() => residualChart({ title: 'bad', residuals: [1, 2, 3], time: [1, 2], frequency: 'index' })).toThrow(RangeError);
  });
});

describe('edge cases render without throwing', () => {
  const t0 = Date.UTC(2021, 0, 1);
  const months = (n: number) => Float64Array.from({ length: n }, (_, i) => stepTime(t0, 'monthly', i));
  const isPng = (png: Buffer) => expect(png.subarray(0, 8).equals(PNG_SIGNATURE)).toBe(true);

  it('a single point', () => {
    isPng(historyChart({ title: 'one point', frequency: 'monthly', time: months(1), actual: [5], fitted: [5] }));
    isPng(forecastChart({ title: 'one point', frequency: 'monthly', history: { time: months(1), values: [5] }, forecast: { time: [stepTime(t0, 'monthly', 1)], mean: [6], bands: [{ level: 0.9, lower: [4], upper: [8] }] } }));
    isPng(holdoutChart({ title: 'one point', frequency: 'monthly', time: months(1), actual: [5], forecasts: [{ label: 'fixed origin', values: [4] }] }));
    isPng(residualChart({ title: 'one point', residuals: [0.5] }));
    isPng(rankingChart({ title: 'one candidate', criterion: 'BIC', candidates: [{ name: 'ARX(1,0)', delta: 0 }] }));
  });
  it('NaN gaps and all-NaN series', () => {
    const y = [1, 2, Number.NaN, 4, 5, Number.NaN, 7, 8];
    isPng(historyChart({ title: 'gaps', frequency: 'monthly', time: months(8), actual: y, fitted: y.map((v) => v + 0.5), holdoutStart: stepTime(t0, 'monthly', 6) }));
    isPng(historyChart({ title: 'all missing', frequency: 'monthly', time: months(4), actual: [Number.NaN, Number.NaN, Number.NaN, Number.NaN] }));
    isPng(residualChart({ title: 'gaps', residuals: y }));
    isPng(holdoutChart({ title: 'gaps', frequency: 'monthly', context: { time: months(4), values: [1, Number.NaN, 3, 4] }, time: months(8).slice(4), actual: y.slice(4), forecasts: [{ label: 'a', values: [Number.NaN, 1, 2, 3] }] }));
  });
  it('a constant series (zero-variance residuals: autocorrelations NaN)', () => {
    const c = new Array(24).fill(3);
    isPng(historyChart({ title: 'constant', frequency: 'monthly', time: months(24), actual: c, fitted: c }));
    isPng(residualChart({ title: 'constant', residuals: c }));
    isPng(forecastChart({ title: 'constant', frequency: 'monthly', history: { time: months(24), values: c }, forecast: { time: months(30).slice(24), mean: c.slice(0, 6) } }));
  });
  it('empty inputs', () => {
    isPng(historyChart({ title: 'empty', frequency: 'monthly', time: [], actual: [] }));
    isPng(residualChart({ title: 'empty', residuals: [] }));
    isPng(rankingChart({ title: 'empty', criterion: 'AICc', candidates: [] }));
  });
  it('every frequency, index included', () => {
    for (const frequency of ['hourly', 'daily', 'weekly', 'quarterly', 'yearly', 'index'] as const) {
      const time = Float64Array.from({ length: 30 }, (_, i) => stepTime(frequency === 'index' ? 0 : t0, frequency, i));
      isPng(historyChart({ title: frequency, frequency, time, actual: time.map((_, i) => Math.sin(i / 3)) }));
    }
  });
  it('rankings with non-finite deltas and long names', () => {
    isPng(rankingChart({ title: 'odd', criterion: 'AIC', candidates: [{ name: 'x'.repeat(200), delta: 0 }, { name: 'nan', delta: Number.NaN }, { name: 'inf', delta: Number.POSITIVE_INFINITY }] }));
  });
  it('misaligned arrays are a caller bug (RangeError)', () => {
    expect(() => historyChart({ title: 'bad', frequency: 'monthly', time: months(3), actual: [1, 2] })).toThrow(RangeError);
  });
});
