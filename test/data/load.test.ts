import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import ExcelJS from 'exceljs';
import { formatTime } from '../../src/data/calendar.js';
import { loadSeries, loadTable } from '../../src/data/load.js';
import { DataError, isCertaError } from '../../src/data/errors.js';

const VEGA = join(process.cwd(), 'node_modules/vega-datasets/data');
const src = (text: string, name = 'mem.csv') => ({ name, bytes: Buffer.from(text) });
const months = (t: Float64Array) => Array.from(t, (x) => formatTime(x, 'monthly'));

describe('loadSeries on Mauna Loa CO2 (vega-datasets co2-concentration.csv, monthly from 1958-03)', () => {
  it('finds exactly the five missing months and fills them under the default policy', async () => {
    const { series, report } = await loadSeries(join(VEGA, 'co2-concentration.csv'));
    expect(report.frequency.frequency).toBe('monthly');
    // 741 data rows in the file; 1958-03 … 2020-04 is 746 months, so 5 are absent.
    expect(report.rows).toBe(741);
    expect(report.frequency.text).toBe('monthly: 737 of 740 steps are 1 month; 2 steps of 2 months; 1 step of 4 months');
    const co2 = report.series.find((s) => s.name === 'CO2')!;
    expect(co2.start).toBe('1958-03');
    expect(co2.end).toBe('2020-04');
    expect(co2.length).toBe(746);
    expect(co2.filled.map((p) => p.time)).toEqual(['1958-06', '1958-10', '1964-02', '1964-03', '1964-04']);
    // Linear fill, from the file's neighbours: 1958-05 = 317.51, 1958-07 = 315.86.
    expect(co2.filled[0].value).toBeCloseTo((317.51 + 315.86) / 2, 10);
    // 1964-01 = 319.57 and 1964-05 = 322.26: three equal steps between them.
    expect(co2.filled[2].value).toBeCloseTo(319.57 + (322.26 - 319.57) / 4, 10);
    const s = series.find((x) => x.name === 'CO2')!;
    expect(s.values.every((v) => Number.isFinite(v))).toBe(true);
    expect(months(s.time).slice(0, 5)).toEqual(['1958-03', '1958-04', '1958-05', '1958-06', '1958-07']);
  });
  it('refuses the gaps with --gaps error, naming all of them', async () => {
    const e = await loadSeries(join(VEGA, 'co2-concentration.csv'), { gaps: 'error', series: 'CO2' }).catch((x) => x);
    expect(e).toBeInstanceOf(DataError);
    const line = (e as DataError).line();
    for (const m of ['1958-06', '1958-10', '1964-02 to 1964-04']) expect(line).toContain(m);
  });
});

describe('loadSeries on global temperature (vega-datasets global-temp.csv)', () => {
  it('is yearly from 1880 to 2023 without gaps', async () => {
    const { series, report } = await loadSeries(join(VEGA, 'global-temp.csv'));
    expect(report.frequency.frequency).toBe('yearly');
    expect(report.series[0]).toMatchObject({ name: 'temp', start: '1880', end: '2023', length: 144, filled: [] });
    expect(series[0].values[0]).toBe(-0.17); // first data row of the file
  });
});

describe('loadSeries: layouts and options', () => {
  it('reads long layout, grouping by id in first-seen order', async () => {
    const text = 'store,month,sales,price\nnorth,2021-01,10,2\nsouth,2021-01,7,3\nnorth,2021-02,12,2\nsouth,2021-02,8,3\n';
    const { series, report } = await loadSeries(src(text), { value: 'sales', inputs: ['price'] });
    expect(report.layout).toMatchObject({ kind: 'long', id: 'store', time: 'month', values: ['sales'], inputs: ['price'] });
    expect(series.map((s) => s.name)).toEqual(['north', 'south']);
    expect(Array.from(series[1].values)).toEqual([7, 8]);
    expect(Array.from(series[1].inputs[0].values)).toEqual([3, 3]);
  });
  it('detects the single numeric column of a long file as its value', async () => {
    const { report } = await loadSeries(src('id,date,value\na,2021-01-04,1\na,2021-01-05,2\n'));
    expect(report.layout.values).toEqual(['value']);
    expect(report.frequency.frequency).toBe('daily');
  });
  it('picks one series with --series and attaches inputs in wide layout', async () => {
    const text = 'month,north,south,promo\n2021-01,1,5,0\n2021-02,2,6,1\n2021-03,3,7,0\n';
    const { series } = await loadSeries(src(text), { series: 'south', inputs: ['promo'] });
    expect(series).toHaveLength(1);
    expect(series[0]).toMatchObject({ name: 'south', frequency: 'monthly', season: 12 });
    expect(Array.from(series[0].inputs[0].values)).toEqual([0, 1, 0]);
  });
  it('reads TSV, semicolons, quoted thousands and missing markers; trims leading and trailing missing values', async () => {
    const text = 'quarter;units\n2020-Q1;NA\n2020-Q2;"1,200.5"\n2020-Q3;..\n2020-Q4;1300\n2021-Q1;-\n';
    const { series, report } = await loadSeries(src(text));
    expect(report.frequency.frequency).toBe('quarterly');
    expect(report.series[0].trimmed).toEqual({ leading: 1, trailing: 1 });
    expect(Array.from(series[0].values)).toEqual([1200.5, (1200.5 + 1300) / 2, 1300]);
  });
  it('sorts rows and combines duplicates by the chosen policy', async () => {
    const text = 'date,x\n2021-01-03,5\n2021-01-01,1\n2021-01-02,2\n2021-01-02,4\n';
    for (const [policy, v] of [['sum', 6], ['mean', 3], ['last', 4]] as const) {
      const { series, report } = await loadSeries(src(text), { duplicates: policy });
      expect(Array.from(series[0].values)).toEqual([1, v, 5]);
      expect(report.series[0].duplicates).toEqual([{ time: '2021-01-02', rows: [4, 5] }]);
      expect(report.notes).toContain('rows were not in time order; sorted by time');
    }
  });
  it('aggregates daily data to weeks and months with --freq and --aggregate, noting partial periods', async () => {
    // 2021-01-04 is a Monday (ISO 2021-W01); 14 days of value 1..14.
    const rows = Array.from({ length: 14 }, (_, i) => `${new Date(Date.UTC(2021, 0, 4 + i)).toISOString().slice(0, 10)},${i + 1}`);
    const text = `date,x\n${rows.join('\n')}\n`;
    const weekly = await loadSeries(src(text), { freq: 'weekly' });
    expect(Array.from(weekly.series[0].values)).toEqual([28, 77]); // 1+…+7, 8+…+14
    const monthly = await loadSeries(src(text), { freq: 'monthly', aggregate: 'max' });
    expect(Array.from(monthly.series[0].values)).toEqual([14]);
    expect(monthly.report.series[0].partialPeriods).toEqual([{ time: '2021-01', observed: 14, expected: 31, dropped: false }]);
    expect(monthly.report.aggregated).toEqual({ from: 'daily', to: 'monthly', by: 'max' });
  });
  it('fills gaps with zero or carry at any length, and gaps in inputs the same way', async () => {
    const text = 'month,y,u\n2021-01,1,10\n2021-06,6,\n2021-07,7,30\n';
    const zero = await loadSeries(src(text), { gaps: 'zero', inputs: ['u'] });
    expect(Array.from(zero.series[0].values)).toEqual([1, 0, 0, 0, 0, 6, 7]);
    expect(Array.from(zero.series[0].inputs[0].values)).toEqual([10, 0, 0, 0, 0, 0, 30]);
    const carry = await loadSeries(src(text), { gaps: 'carry', inputs: ['u'] });
    expect(Array.from(carry.series[0].values)).toEqual([1, 1, 1, 1, 1, 6, 7]);
    expect(carry.report.series[0].filled.filter((p) => p.column === 'u')).toHaveLength(5);
  });
  it('infers weekly, hourly and index frequencies and moves stamps to period starts', async () => {
    const weekly = await loadSeries(src('week,x\n2020-W52,1\n2020-W53,2\n2021-W01,3\n'));
    expect(weekly.report.frequency.frequency).toBe('weekly');
    expect(Array.from(weekly.series[0].time, (t) => formatTime(t, 'weekly'))).toEqual(['2020-12-21', '2020-12-28', '2021-01-04']);
    const hourly = await loadSeries(src('time,x\n2021-03-01T22:00,1\n2021-03-01T23:00,2\n2021-03-02T00:00,3\n'));
    expect(hourly.report.frequency.frequency).toBe('hourly');
    const index = await loadSeries(src('t,x\n1,5\n2,6\n3,7\n'));
    expect(index.series[0]).toMatchObject({ frequency: 'index', season: null });
    expect(Array.from(index.series[0].time)).toEqual([1, 2, 3]);
    const monthEnds = await loadSeries(src('date,x\n2020-01-31,1\n2020-02-29,2\n2020-03-31,3\n'));
    expect(monthEnds.report.frequency.frequency).toBe('monthly');
    expect(months(monthEnds.series[0].time)).toEqual(['2020-01', '2020-02', '2020-03']);
  });
  it('resolves day/month order from the data, or from --date-format', async () => {
    const dayFirst = await loadSeries(src('date,x\n30/01/2021,1\n31/01/2021,2\n01/02/2021,3\n'));
    expect(dayFirst.report.timeForm).toBe('dates (DD/MM/YYYY)');
    expect(dayFirst.report.series[0].end).toBe('2021-02-01');
    const forced = await loadSeries(src('date,x\n01/02/2021,1\n01/03/2021,2\n'), { dateFormat: 'MM/DD/YYYY' });
    expect(forced.report.frequency.frequency).toBe('daily');
    expect(forced.report.series[0].start).toBe('2021-01-02');
  });
  it('reads JSON arrays of records', async () => {
    const { series, report } = await loadSeries(src('[{"month":"2021-01","y":1},{"month":"2021-02","y":null},{"month":"2021-03","y":3}]', 'x.json'));
    expect(report.format).toBe('json');
    expect(Array.from(series[0].values)).toEqual([1, 2, 3]);
  });
});

describe('loadTable / loadSeries on XLSX written by exceljs', () => {
  it('reads date cells by the ECMA-376 1900 system: serial 1 = 1900-01-01, 61 = 1900-03-01', async () => {
    const wb = new ExcelJS.Workbook();
    wb.addWorksheet('Notes').addRows([['note'], ['nothing here']]);
    const ws = wb.addWorksheet('Data');
    ws.addRow(['day', 'x']);
    for (const [serial, x] of [[1, 5], [2, 6], [3, 7]]) ws.addRow([serial, x]);
    ws.getColumn(1).numFmt = 'yyyy-mm-dd';
    const later = wb.addWorksheet('Later');
    later.addRow(['day', 'x']);
    for (const [serial, x] of [[61, 1], [62, 2]]) later.addRow([serial, x]);
    later.getColumn(1).numFmt = 'yyyy-mm-dd';
    const bytes = Buffer.from(await wb.xlsx.writeBuffer());
    const dir = mkdtempSync(join(tmpdir(), 'certa-xlsx-'));
    const file = join(dir, 'serials.xlsx');
    writeFileSync(file, bytes);

    const first = await loadSeries(file, { sheet: 'Data' });
    expect(first.report.sheet).toBe('Data');
    expect(first.report.series[0]).toMatchObject({ start: '1900-01-01', end: '1900-01-03', length: 3 });
    const second = await loadSeries(file, { sheet: 'Later' });
    expect(second.report.series[0]).toMatchObject({ start: '1900-03-01', end: '1900-03-02' });
    const table = await loadTable(file);
    expect(table.sheet).toBe('Notes');
  });
  it('refuses serial 60 (1900-02-29, which never existed)', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('S');
    ws.addRow(['day', 'x']);
    ws.addRow([59, 1]);
    ws.addRow([60, 2]);
    ws.getColumn(1).numFmt = 'yyyy-mm-dd';
    const bytes = Buffer.from(await wb.xlsx.writeBuffer());
    const e = await loadSeries({ name: 'leap.xlsx', bytes }).catch((x) => x);
    expect(isCertaError(e)).toBe(true);
    expect((e as DataError).context).toMatchObject({ file: 'leap.xlsx', row: 3, column: 'day', found: '60' });
  });
  it('reads JS dates written by exceljs back as the same days', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('S');
    ws.addRow(['month', 'x']);
    ws.addRow([new Date(Date.UTC(2021, 0, 1)), 1]);
    ws.addRow([new Date(Date.UTC(2021, 1, 1)), 2]);
    const bytes = Buffer.from(await wb.xlsx.writeBuffer());
    const { report } = await loadSeries({ name: '-', bytes });
    expect(report.format).toBe('xlsx');
    expect(report.frequency.frequency).toBe('monthly');
    expect(report.series[0].start).toBe('2021-01');
  });
});

describe('loadSeries on more vega-datasets files', () => {
  it('stocks.csv: long layout (symbol, "Jan 1 2000" dates, price), monthly', async () => {
    const { series, report } = await loadSeries(join(VEGA, 'stocks.csv'));
    expect(report.layout).toMatchObject({ kind: 'long', id: 'symbol', time: 'date', values: ['price'] });
    expect(report.frequency.frequency).toBe('monthly');
    expect(series.map((s) => s.name)).toEqual(['MSFT', 'AMZN', 'IBM', 'GOOG', 'AAPL']);
    expect(report.series[0]).toMatchObject({ start: '2000-01', end: '2010-03' });
  });
  it('seattle-weather.csv: daily 2012-01-01 to 2015-12-31, the text column "weather" left out', async () => {
    const { report } = await loadSeries(join(VEGA, 'seattle-weather.csv'));
    expect(report.layout.kind).toBe('wide');
    expect(report.layout.ignored).toEqual(['weather']);
    expect(report.series[0]).toMatchObject({ start: '2012-01-01', end: '2015-12-31', length: 1461 });
  });
});
