/**
 * The look of every certa chart: colours, line widths, font sizes. One place, so the PNG charts
 * and the HTML report read as a set.
 *
 * Colours: ink blue-black for what was observed, olive for what a model fitted, indigo for what
 * it forecasts. The interval bands: the inner level (50 % by default) as an indigo fill, the
 * outer level (90 %) as dashed indigo edges without fill, so the two never blur into one fan.
 * Magenta for a second forecast, amber for reference bounds, on white with light grid lines.
 */

export const palette = {
  background: '#ffffff',
  text: '#1f2a36',
  mutedText: '#5d6b78',
  grid: '#e9ecef',
  axis: '#b9c1c9',
  observed: '#1f2a36',
  fitted: '#6b8e23',
  forecast: '#3b4cc0',
  /** Fill of the innermost interval band; further levels reuse the last entry. */
  bands: ['rgba(59, 76, 192, 0.26)', 'rgba(59, 76, 192, 0.26)'] as const,
  /** Edges of the outer interval bands (dashed lines, no fill). */
  bandEdge: '#5f6fd6',
  second: '#b0306a',
  bound: '#b86e00',
  marker: '#98a2ad',
  /** Shade of the ±2 band of standardised residuals (olive, the colour of what the model fitted). */
  residualBand: 'rgba(107, 142, 35, 0.2)',
  holdoutShade: 'rgba(31, 42, 54, 0.045)',
  bar: '#93a5b8',
  bestBar: '#3b4cc0',
  /** Further lines, in order, when a chart shows more series than the named roles. */
  cycle: ['#3b4cc0', '#b0306a', '#6b8e23', '#b86e00', '#127a8a', '#5b3a8c'] as const,
} as const;

export const look = {
  /** Default image size in pixels (width × height). */
  width: 1000,
  height: 560,
  titleSize: 17,
  /** Title of one panel inside a multi-panel image. */
  panelTitleSize: 14,
  subtitleSize: 12.5,
  labelSize: 12,
  tickSize: 11.5,
  legendSize: 12,
  lineWidth: 2,
  thinLineWidth: 1.25,
  pointRadius: 2.5,
} as const;
