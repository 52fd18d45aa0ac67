/**
 * Safe CSV outputs: text from the input is neutralised against formula injection (the leading-
 * apostrophe rule of OWASP, "CSV Injection"), numbers are never altered, and every CSV certa
 * writes parses back, with the project's own reader (src/data/csv.ts), to the cells written.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseDelimited } from '../../src/data/csv.js';
import type { Series } from '../../src/data/series.js';
import { forecastSeries } from '../../src/forecast/pipeline.js';
import { formatTime } from '../../src/data/calendar.js';
import type { ForecastRun } from '../../src/forecast/pipeline.js';
import { forecastCsv, forecastFiles, forecastRows } from '../../src/report/forecast-report.js';
import { csvField, formatNumber, readsAsFormula, tableToCsv, toCsv, type Cell, type Table } from '../../src/report/tables.js';
import { csvHeader, forecastsColumns } from '../../src/batch/batch-table.js';

/**
 * forecast.csv built the slow, plain way, as the reference `forecastCsv` must equal: the tidy
 * table of cells (one row per time and kind) written by the general table writer.
 */
function forecastTable(run: ForecastRun): Table {
  const { series, levels } = run;
  const name = series.name;
  const f = series.frequency;
  const bandCols = levels.flatMap((l) => [`lower_${l}`, `upper_${l}`]);
  const columns = ['series', 'time', 'kind', 'value', 'point', 'rolling_point', ...bandCols];
  const rows: Cell[][] = [];
  const blank = bandCols.map(() => null);
  const n = series.values.length;
  const nTrain = n - run.holdout;
  for (let t = 0; t < nTrain; t++) rows.push([name, formatTime(series.time[t], f), 'history', series.values[t], null, null, ...blank]);
  for (let i = 0; i < run.fitted.index.length; i++) {
    const t = run.fitted.index[i];
    rows.push([name, formatTime(series.time[t], f), 'fitted', null, run.fitted.values[i], null, ...blank]);
  }
  const ev = run.evaluation;
  if (ev) {
    for (let j = 0; j < ev.holdout; j++) {
      const bands = ev.fixed.bands.flatMap((b) => [b.lower[j], b.upper[j]]);
      rows.push([name, formatTime(ev.times[j], f), 'holdout', ev.actual[j], ev.fixed.point[j], ev.rolling.oneStep[j], ...bands]);
    }
  }
  rows.push(...forecastRows(name, f, run.forecast.times, run.forecast.paths));
  return { columns, rows };
}

/** A series' records in forecasts.csv the plain way: the rows written by the table writer, header cut off. */
function forecastsRecords(columns: string[], rows: Cell[][]): string {
  return toCsv(columns, rows).slice(csvHeader(columns).length);
}

/** What a cell should read back as: the text written, apostrophe included, or the number's text. */
function expected(cell: Cell): string {
  if (cell === null) return '';
  if (typeof cell === 'number') return formatNumber(cell);
  return readsAsFormula(cell) ? `'${cell}` : cell;
}

function readBack(text: string): string[][] {
  const t = parseDelimited(text, ',', 'out.csv', 'csv');
  const rows: string[][] = [t.header];
  for (let r = 0; r < t.rows.length; r++) rows.push(t.columns.map((c) => String(c[r] ?? '')));
  return rows;
}

describe('readsAsFormula / csvField: formula injection', () => {
  it('prefixes an apostrophe to text starting with = + - @, tab or CR', () => {
    expect(csvField('=HYPERLINK("http://x.invalid")')).toBe(`"'=HYPERLINK(""http://x.invalid"")"`);
    expect(csvField('+1+2')).toBe("'+1+2");
    expect(csvField('-2+3')).toBe("'-2+3");
    expect(csvField('@SUM(A1:A2)')).toBe("'@SUM(A1:A2)");
    expect(csvField('\t=1')).toBe("'\t=1");
    expect(csvField('\r=1')).toBe(`"'\r=1"`);
  });
  it('leaves numbers and plain-number text alone', () => {
    expect(csvField(-3.5)).toBe('-3.5');
    expect(csvField(-1e-7)).toBe('-1e-7');
    expect(csvField('-12.5')).toBe('-12.5');
    expect(csvField('+4')).toBe('+4');
    expect(readsAsFormula('-1e5')).toBe(false);
    expect(readsAsFormula('-')).toBe(true);
  });
  it('leaves text that starts otherwise alone, even with = inside', () => {
    expect(csvField('a=b')).toBe('a=b');
    expect(csvField("'quoted")).toBe("'quoted");
  });
});

describe('toCsv: every document parses back to the cells written', () => {
  const names = ['=1+1', 'say "hi", twice', 'two\nlines', 'cr\r\nlf', '@home', '-minus', 'plain', ',', '"', '+', '\ttab'];
  it('round-trips names holding quotes, commas, newlines and formula starts', () => {
    const rows: Cell[][] = names.map((n, i) => [n, i, -i - 0.5, null]);
    const text = toCsv(['name', 'i', 'x', 'missing'], rows);
    expect(readBack(text)).toEqual([['name', 'i', 'x', 'missing'], ...rows.map((r) => r.map(expected))]);
  });
  it('round-trips arbitrary text and numbers (property)', () => {
    const cell = fc.oneof(fc.string({ minLength: 1, unit: fc.constantFrom('a', '=', '+', '-', '@', '"', ',', '\n', '\r', '\t', ' ', '1', '.', 'é') }), fc.double({ noNaN: true }), fc.constant(null));
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.constant('key'), cell), { minLength: 1, maxLength: 8 }), (pairs) => {
        // a leading non-blank key column: the reader skips blank records
        const rows: Cell[][] = pairs.map(([k, c]) => [k, c]);
        expect(readBack(toCsv(['k', 'v'], rows))).toEqual([['k', 'v'], ...rows.map((r) => r.map(expected))]);
      }),
      { numRuns: 300 },
    );
  });
});

describe('forecastFiles: the CSV outputs of a run with a hostile series name', () => {
  it('forecast.csv, metrics.csv and candidates.csv parse back cell for cell', () => {
    const n = 60;
    const values = Float64Array.from({ length: n }, (_, t) => 50 + 0.4 * t + 6 * Math.sin((2 * Math.PI * t) / 12) + ((t * 7919) % 13) / 4);
    const name = '=cmd|"/c calc"!A0, line\ntwo';
    const series: Series = { name, frequency: 'index', season: 12, time: Float64Array.from(values, (_, i) => i), values, inputs: [] };
    const run = forecastSeries(series, { horizon: 6, holdout: 12, intervals: { method: 'analytic' } });
    const files = forecastFiles(run);
    for (const [file, text] of Object.entries(files)) {
      const back = readBack(text);
      expect(back.length, file).toBeGreaterThan(1);
      if (file !== 'candidates.csv') {
        for (const row of back.slice(1)) expect(row[0], file).toBe(`'${name}`);
      }
    }
    const fcRows = readBack(files['forecast.csv']);
    const valueCol = fcRows[0].indexOf('value');
    const history = fcRows.filter((r) => r[2] === 'history');
    expect(history.map((r) => Number(r[valueCol]))).toEqual(Array.from(values.subarray(0, n - 12)));
  });

  it('forecastCsv writes the bytes of the tidy table and, for forecasts.csv, its holdout and forecast records without rolling_point', () => {
    const n = 48;
    const values = Float64Array.from({ length: n }, (_, t) => 20 + 0.3 * t + 4 * Math.cos((2 * Math.PI * t) / 12) + ((t * 104729) % 11) / 3);
    const name = '-4+"x", y';
    const time = Float64Array.from({ length: n }, (_, i) => Date.UTC(2019, i, 1));
    const series: Series = { name, frequency: 'monthly', season: 12, time, values, inputs: [] };
    for (const holdout of [0, 10]) {
      const run = forecastSeries(series, { horizon: 5, holdout, levels: [50, 80, 95] });
      const table = forecastTable(run);
      const { csv, records } = forecastCsv(run);
      expect(csv).toBe(tableToCsv(table));
      const columns = forecastsColumns(run.levels);
      const pick = columns.map((c) => table.columns.indexOf(c));
      const rows = table.rows.filter((r) => r[2] === 'holdout' || r[2] === 'forecast').map((r) => pick.map((j) => r[j]));
      expect(rows).toHaveLength(holdout + 5);
      expect(records).toBe(forecastsRecords(columns, rows));
    }
  });
});
