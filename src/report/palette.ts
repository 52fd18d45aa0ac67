/**
 * The look of every certa chart: colours, line widths, font sizes. One place, so all charts
 * of a report read as a set.
 *
 * Colours: a dark slate for what was observed, teal for what a model fitted, burnt orange for
 * what it forecasts (its intervals as translucent orange), plum for a second forecast, a raspberry
 * red for reference bounds, on white with light grey grid lines.
 */

export const palette = {
  background: '#ffffff',
  text: '#2b2d42',
  mutedText: '#5c6170',
  grid: '#e6e8ee',
  axis: '#b8bcc8',
  observed: '#2b2d42',
  fitted: '#0f8b8d',
  forecast: '#d9731a',
  /** Interval bands, inner (e.g. 80 %) then outer (e.g. 95 %). */
  bands: ['rgba(217, 115, 26, 0.34)', 'rgba(217, 115, 26, 0.17)'] as const,
  second: '#7b3fa0',
  bound: '#b23a48',
  marker: '#8b919e',
  holdoutShade: 'rgba(43, 45, 66, 0.045)',
  bar: '#0f8b8d',
  bestBar: '#d9731a',
  /** Further lines, in order, when a chart shows more series than the named roles. */
  cycle: ['#d9731a', '#7b3fa0', '#2f6fb3', '#b23a48', '#5a8f29', '#0f8b8d'] as const,
} as const;

export const look = {
  /** Default image size in pixels (width × height). */
  width: 1000,
  height: 560,
  titleSize: 17,
  subtitleSize: 12.5,
  labelSize: 12,
  tickSize: 11.5,
  legendSize: 12,
  lineWidth: 2,
  thinLineWidth: 1.25,
  pointRadius: 2.5,
} as const;
