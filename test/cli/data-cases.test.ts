/**
 * Data as users bring it, through the built CLI (`node bin/certa.js`): a decennial census, time
 * stamps exported as instants of local midnights, a year column beside a date column,
 * aggregation with incomplete years, the season set once for every stage, the yearly cycle of
 * daily data, decimal commas and workbooks whose first sheet is empty.
 *
 * Sources: U.S. decennial census totals (test/fixtures/population, provenance there; Pearl &
 * Reed 1920, PNAS 6:275, fitted a logistic curve to 1790–1910 with capacity ≈ 197.27 million
 * and rate ≈ 0.03134 per year, and the library test accepts K in 170–240 million, r in
 * 0.027–0.035 for the ODE's integral regression); Seattle daily weather 2012–2015
 * (vega-datasets seattle-weather.csv, NOAA data as packaged there); the other files are
 * invented here, with the structure the test expects written into them.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt, runCli } from './run-cli.js';
import { parseResult } from './result.js';
import { expectPearlReedNeighbourhood } from '../external/census-neighbourhood.js';

const CENSUS = 'test/fixtures/population/us_census_1790_1950.csv';
const SEATTLE = 'node_modules/vega-datasets/data/seattle-weather.csv';
const POP = 'resident_population_50_states';

let dir = '';
const file = (name: string, content: string | Buffer): string => {
  const p = join(dir, name);
  writeFileSync(p, content);
  return p;
};
const json = (args: string[]) => {
  const r = runCli(args);
  expect(r.code, r.stderr).toBe(0);
  return parseResult(r.stdout);
};
/** The detail of the only series of a result document. */
const only = (args: string[]) => json(args).results[0].detail;
const derived = (doc: { winner: { derived: { name: string; value: unknown }[] } }, name: string) => doc.winner.derived.find((d) => d.name === name)?.value as number;

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'certa-data-'));
});

describe('a decennial census (every 10 years)', () => {
  it('inspect reads it as yearly with a step of 10 years, with the evidence', () => {
    const r = runCli(['inspect', CENSUS, '--series', POP]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('frequency  every 10 years: 16 of 16 steps are 10 years');
    expect(r.stdout).toContain('span       1790 to 1950 (17 observations, every 10 years)');
    const doc = json(['inspect', CENSUS, '--json']);
    expect(doc.file.frequency).toMatchObject({ name: 'yearly', step: 10, cadence: 'every 10 years' });
  });

  it('search gives the logistic law with K and r in the published neighbourhood (Pearl & Reed 1920), on 1790–1910 and on the whole file', () => {
    const lines = readFileSync(CENSUS, 'utf8').trim().split('\n');
    const to1910 = file('census-1910.csv', `${['year,population', ...lines.slice(1).filter((l) => Number(l.split(',')[0]) <= 1910).map((l) => l.split(',').slice(0, 2).join(','))].join('\n')}\n`);
    for (const args of [[to1910], [CENSUS, '--series', POP]]) {
      const doc = only(['search', ...args, '--json', '--out', join(dir, 'census-search')]);
      expect(doc.series).toMatchObject({ frequency: 'yearly', step: 10 });
      expect(doc.winner.structure).toMatch(/^ODE in level, quadratic \(logistic-type\)/);
      expect(derived(doc, 'sampling interval')).toBe(10);
      expectPearlReedNeighbourhood(derived(doc, 'capacity K'), derived(doc, 'rate r per year'));
    }
  });

  it('forecast steps ten years at a time, and update continues a saved model by one step of 10 years', () => {
    const out = join(dir, 'census-forecast');
    const f = runCli(['forecast', CENSUS, '--series', POP, '--out', out, '--no-charts', '--horizon', '3']);
    expect(f.code, f.stderr).toBe(0);
    expect(f.stdout).toMatch(/^certa forecast: resident_population_50_states \(every 10 years, 17 points, 1790 to 1950\)/);
    const rows = readFileSync(join(out, 'forecast.csv'), 'utf8').trim().split('\r\n').filter((l) => l.split(',')[2] === 'forecast');
    expect(rows.map((l) => l.split(',')[1])).toEqual(['1960', '1970', '1980']);
    // A model fitted to 1790–1940 learns 1950 from the whole file.
    const lines = readFileSync(CENSUS, 'utf8').trim().split('\n');
    const to1940 = file('census-1940.csv', `${lines.filter((l, i) => i === 0 || Number(l.split(',')[0]) <= 1940).join('\n')}\n`);
    const model = join(dir, 'census-model');
    expect(runCli(['forecast', to1940, '--series', POP, '--out', model, '--no-charts']).code).toBe(0);
    expect(JSON.parse(readFileSync(join(model, 'model.json'), 'utf8')).body.series.step).toBe(10);
    const u = runCli(['update', join(model, 'model.json'), CENSUS, '--series', POP, '--no-charts', '--horizon', '2']);
    expect(u.code, u.stderr).toBe(0);
    expect(u.stdout).toMatch(/1 new row \(1950 to 1950\); the model now runs to 1950/);
    expect(u.stdout).toMatch(/^1960 /m);
    expect(u.stdout).toMatch(/^1970 /m);
  });
});

describe('time stamps exported as instants of local midnights', () => {
  it('a monthly JSON export at 08:00Z in winter and 07:00Z in summer (UTC−8, daylight saving) is monthly, and inspect counts the snapped stamps', () => {
    const records = Array.from({ length: 36 }, (_, i) => {
      const y = 2021 + Math.floor(i / 12);
      const m = i % 12;
      const summer = m >= 3 && m <= 9; // April to October
      return { date: new Date(Date.UTC(y, m, 1, summer ? 7 : 8)).toISOString(), orders: 200 + 3 * i + (m % 4) * 5 };
    });
    const p = file('orders-export.json', JSON.stringify(records));
    const r = runCli(['inspect', p]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('times      date-times; 36 instants at +7:00 to +8:00 h from midnight snapped to it');
    expect(r.stdout).toContain('frequency  monthly: 35 of 35 steps are 1 month');
    expect(json(['inspect', p, '--json']).file.time_snapped).toEqual({ moved: 36, min_offset_minutes: 420, max_offset_minutes: 480 });
    const f = runCli(['forecast', p, '--out', join(dir, 'orders'), '--no-charts', '--horizon', '2']);
    expect(f.code, f.stderr).toBe(0);
    expect(f.stdout).toMatch(/^2024-01 /m);
  });
});

describe('a year column beside a date column', () => {
  it('takes the date column (monthly), says so, and leaves the year column unused', () => {
    const rows = Array.from({ length: 30 }, (_, i) => `${2022 + Math.floor(i / 12)},${2022 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}-01,${50 + i}`);
    const p = file('year-and-date.csv', `year,date,sales\n${rows.join('\n')}\n`);
    const r = runCli(['inspect', p]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('layout     wide: time "date", series "sales"');
    expect(r.stdout).toContain('times      dates (column chosen over "year": finer times)');
    expect(r.stdout).toContain('frequency  monthly: 29 of 29 steps are 1 month');
    expect(r.stdout).toContain('columns not used: "year"');
  });
});

describe('aggregation to a coarser frequency', () => {
  it('drops the incomplete first and last years with a warning, or keeps and flags them with --partial keep', () => {
    const rows = Array.from({ length: 40 }, (_, i) => {
      const k = i + 6; // 2020-07 to 2023-10
      return `${2020 + Math.floor(k / 12)}-${String((k % 12) + 1).padStart(2, '0')},10`;
    });
    const p = file('monthly-sales.csv', `month,sales\n${rows.join('\n')}\n`);
    const r = runCli(['inspect', p, '--freq', 'yearly']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('span       2021 to 2022 (2 years)');
    expect(r.stdout).toContain('partial    2020 (6 of 12, dropped), 2023 (10 of 12, dropped)');
    expect(r.stdout).toContain('warning: series "sales": dropped incomplete periods at the ends: 2020 (6 of 12), 2023 (10 of 12)');
    const kept = json(['inspect', p, '--freq', 'yearly', '--partial', 'keep', '--json']);
    expect(kept.results[0].detail).toMatchObject({ start: '2020', end: '2023', length: 4 });
    expect(kept.results[0].detail.partial_periods.map((x: { dropped: boolean }) => x.dropped)).toEqual([false, false]);
  });
});

describe('--season: one setting for every stage', () => {
  it('--season 365 on daily data sets the harmonics, baselines, holdout, horizon, MASE scale and summary', () => {
    const out = join(dir, 'seattle-365');
    const r = runCli(['forecast', SEATTLE, '--series', 'temp_max', '--season', '365', '--out', out, '--no-charts']);
    expect(r.code, r.stderr).toBe(0);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.series.season).toBe(365);
    expect(summary.options.holdout).toBe(292); // min(2 seasons = 730, 20 % of 1461)
    expect(summary.options.horizon).toBe(730); // two seasons
    expect(summary.model.label).toMatch(/harmonic/);
    expect(summary.model.equation).toContain('t/365)');
    // MASE scale: mean |y_t − y_{t−365}| over the 1169 training days (Hyndman & Koehler 2006, seasonal form).
    const y = readFileSync(SEATTLE, 'utf8').trim().split('\n').slice(1).map((l) => Number(l.split(',')[2]));
    const nTrain = y.length - 292;
    let sum = 0;
    for (let t = 365; t < nTrain; t++) sum += Math.abs(y[t] - y[t - 365]);
    const scale = sum / (nTrain - 365);
    const metrics = readFileSync(join(out, 'metrics.csv'), 'utf8').trim().split('\r\n').map((l) => l.split(','));
    const head = metrics[0];
    const at = (method: string, col: string) => Number(metrics.find((m) => m[1] === 'fixed-origin' && m[2] === method)![head.indexOf(col)]);
    for (const method of ['model', 'last-value', 'last-season']) expect(at(method, 'mase')).toBeCloseTo(at(method, 'mae') / scale, 10);
    // Seasonal naive over a 292-day holdout with m = 365 repeats the values 365 days earlier.
    const forecastRows = readFileSync(join(out, 'forecast.csv'), 'utf8').trim().split('\r\n').filter((l) => l.split(',')[2] === 'holdout');
    let mae = 0;
    for (let j = 0; j < 292; j++) mae += Math.abs(y[nTrain + j] - y[nTrain + j - 365]);
    expect(at('last-season', 'mae')).toBeCloseTo(mae / 292, 10);
    expect(forecastRows).toHaveLength(292);
    expect(runCli(['inspect', SEATTLE, '--series', 'temp_max', '--season', '365']).stdout).toContain('season     365 observations, set by --season; yearly cycle: not searched: --season sets the one season');
  });
});

describe('the yearly cycle of daily data', () => {
  it('Seattle daily maximum temperature: the yearly cycle (365.25 days) is supported over the weekly season', () => {
    const doc = only(['search', SEATTLE, '--series', 'temp_max', '--json', '--out', join(dir, 'seattle')]);
    expect(doc.seasons.supported).toBe('yearly');
    expect(doc.seasons.kinds.map((k: { kind: string }) => k.kind)[0]).toBe('yearly');
    expect(doc.seasons.kinds.map((k: { kind: string }) => k.kind).sort()).toEqual(['none', 'season', 'yearly']);
    expect(doc.winner.spec.season).toBe(365.25);
    expect(doc.winner.terms).toContain('cos(2π·1·t/365.25)');
    const text = runCli(['search', SEATTLE, '--series', 'temp_max', '--out', join(dir, 'seattle')]).stdout;
    // The alternatives are listed closest first; which of the two is closer depends on the families searched.
    const line = text.split('\n').find((l) => l.startsWith('season: ')) ?? '';
    expect(line).toMatch(/^season: the data support the yearly cycle \(365\.25 days, by harmonics\): its best candidate is [\d.]+ AICc below the best with (no seasonal terms|the weekly season \(7 days\)), and [\d.]+ AICc below the best with (no seasonal terms|the weekly season \(7 days\))$/);
    expect(line).toContain('no seasonal terms');
    expect(line).toContain('the weekly season (7 days)');
    expect(runCli(['inspect', SEATTLE]).stdout).toContain('yearly cycle: the search also tries the yearly cycle (365.25 days) by harmonics');
  });

  it('invented daily museum visits with a weekend effect and no yearly pattern: the weekly season is supported, the yearly cycle tried', () => {
    // visits = 400 + 120 on Saturdays and Sundays + a deterministic wobble (period 5 days), 800 days from a Monday.
    const rows = Array.from({ length: 800 }, (_, i) => {
      const day = new Date(Date.UTC(2021, 0, 4 + i));
      const weekend = i % 7 >= 5 ? 120 : 0;
      return `${day.toISOString().slice(0, 10)},${400 + weekend + ((i * 37) % 5) * 3}`;
    });
    const p = file('museum-visits.csv', `date,visits\n${rows.join('\n')}\n`);
    const doc = only(['search', p, '--json', '--out', join(dir, 'museum'), '--families', 'arx']);
    expect(doc.seasons.supported).toBe('season');
    expect(doc.seasons.kinds.map((k: { kind: string }) => k.kind)).toContain('yearly');
    expect(doc.seasons.yearly_skipped).toBeNull();
    expect(doc.winner.spec.season).toBe(7);
  });
});

describe('decimal commas', () => {
  it('are detected in a semicolon-delimited file whose numbers have one comma each, and read with --decimal , elsewhere', () => {
    const semi = file('prices.csv', 'month;price;volume\n2022-01;3,5;12,25\n2022-02;3,75;11,5\n2022-03;4,25;10,75\n');
    const r = runCli(['inspect', semi]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('file       ' + semi + ' (CSV, semicolon-delimited, decimal comma (detected), 3 data rows)');
    expect(r.stdout).toContain('summary    min 3.5  max 4.25  mean 3.83333');
    expect(r.stdout).toContain('numbers read with decimal commas: the file is semicolon-delimited and every value of "price", "volume" has one comma');
    const tab = file('prices.tsv', 'month\tprice\n2022-01\t3,5\n2022-02\t3,75\n');
    const refused = runCli(['inspect', tab]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/column "price" holds decimal commas \(found "3,5"/);
    expect(refused.stderr).toContain('hint: pass --decimal , to read "," as the decimal point');
    const read = json(['inspect', tab, '--decimal', ',', '--json']);
    expect(read.file.decimal).toEqual({ mark: ',', source: 'option', columns: [] });
    expect(read.results[0].detail.stats).toMatchObject({ min: 3.5, max: 3.75 });
  });
});

describe('workbooks', () => {
  it('a workbook whose first sheet is empty: the error lists every sheet with its rows, and the hint reads the sheet with data', async () => {
    const book = new ExcelJS.Workbook();
    book.addWorksheet('Cover');
    book.addWorksheet('Notes').addRows([['note'], ['invented figures']]);
    book.addWorksheet('Sales').addRows([['month', 'units'], ['2022-01', 5], ['2022-02', 7], ['2022-03', 6]]);
    const p = file('book.xlsx', Buffer.from(await book.xlsx.writeBuffer()));
    const r = runCli(['inspect', p]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('sheet "Cover" is empty; the other sheets: "Notes" (1 data row), "Sales" (3 data rows)');
    expect(r.stderr).toContain('hint: pass --sheet "Sales"');
    const wrong = runCli(['inspect', p, '--sheet', 'Costs']);
    expect(wrong.stderr).toContain('expected one of "Cover" (no data rows), "Notes" (1 data row), "Sales" (3 data rows)');
    const ok = runCli(['inspect', p, '--sheet', 'Sales']);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stdout).toContain('sheets     "Cover" (0 data rows), "Notes" (1 data row), "Sales" (3 data rows)');
  });
});
