/**
 * Series observed every few periods, instants near midnight, decimal commas, the time column
 * chosen, and incomplete periods after aggregation: loadSeries on small files written here.
 * Expected values are counted by hand from the files (calendar arithmetic) or follow from the
 * definitions in the modules' comments.
 */
import { describe, expect, it } from 'vitest';
import { formatTime, seasonPeriod } from '../../src/data/calendar.js';
import { detectDecimalComma } from '../../src/data/decimal-comma.js';
import { CertaError } from '../../src/data/errors.js';
import { loadSeries, loadTable } from '../../src/data/load.js';
import { parseCommaNumberText } from '../../src/data/numbers.js';
import { snapToMidnight } from '../../src/data/snap.js';
import { timesAfter } from '../../src/data/series.js';

const src = (text: string, name = 'mem.csv') => ({ name, bytes: Buffer.from(text) });

async function refusal(p: Promise<unknown>): Promise<CertaError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof CertaError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}

const yearsEvery = (from: number, step: number, n: number) => Array.from({ length: n }, (_, i) => `${from + i * step},${100 + i}`).join('\n');

describe('steps of several periods', () => {
  it('reads every 10, 5 and 2 years as yearly with that step, and a missing observation as a gap of one step', async () => {
    for (const step of [10, 5, 2]) {
      const { series, report } = await loadSeries(src(`year,x\n${yearsEvery(1900, step, 8)}\n`));
      expect(report.frequency).toMatchObject({ frequency: 'yearly', step });
      expect(report.frequency.text).toBe(`every ${step} years: 7 of 7 steps are ${step} years`);
      expect(series[0].step).toBe(step);
      expect(series[0].season).toBeNull();
      expect(Array.from(series[0].time, (t) => formatTime(t, 'yearly'))).toEqual(Array.from({ length: 8 }, (_, i) => String(1900 + i * step)));
    }
    // 1900, 1910, 1930: one missing observation (1920), filled by interpolation.
    const gap = await loadSeries(src('year,x\n1900,1\n1910,2\n1930,4\n'));
    expect(gap.report.frequency.text).toBe('every 10 years: 1 of 2 steps are 10 years; 1 step of 20 years');
    expect(Array.from(gap.series[0].values)).toEqual([1, 2, 3, 4]);
    expect(gap.report.series[0].filled).toEqual([{ time: '1920', column: 'x', value: 3 }]);
  });

  it('reads every 2 months and every 2 weeks with seasons of 6 and 26 observations', async () => {
    const bimonthly = Array.from({ length: 12 }, (_, i) => `${2020 + Math.floor((2 * i) / 12)}-${String(((2 * i) % 12) + 1).padStart(2, '0')}-01,${i}`).join('\n');
    const b = await loadSeries(src(`date,x\n${bimonthly}\n`));
    expect(b.report.frequency).toMatchObject({ frequency: 'monthly', step: 2 });
    expect(b.series[0].season).toBe(6);
    // 2021-11 is the last: the next three are two months apart.
    expect(Array.from(timesAfter(b.series[0], 3), (t) => formatTime(t, 'monthly'))).toEqual(['2022-01', '2022-03', '2022-05']);
    // Mondays two weeks apart from 2021-01-04.
    const fortnights = Array.from({ length: 10 }, (_, i) => `${new Date(Date.UTC(2021, 0, 4 + 14 * i)).toISOString().slice(0, 10)},${i}`).join('\n');
    const w = await loadSeries(src(`date,x\n${fortnights}\n`));
    expect(w.report.frequency).toMatchObject({ frequency: 'weekly', step: 2 });
    expect(w.series[0].season).toBe(26);
    expect(seasonPeriod('daily', 2)).toBeNull(); // 7 / 2 is not whole
  });

  it('refuses a step that is not a multiple of the common one, naming its row', async () => {
    const e = await refusal(loadSeries(src('year,x\n1900,1\n1910,2\n1920,3\n1925,4\n1930,5\n1940,6\n')));
    expect(e.code).toBe('step-irregular');
    expect(e.context).toMatchObject({ row: 5, column: 'year', found: '1920-01-01 → 1925-01-01' });
    expect(e.context.hint).toBe('correct or remove the time stamp at row 5: the other steps are multiples of 10 years');
  });

  it('refuses --freq yearly on decennial data: finer than the data, which are every 10 years', async () => {
    const e = await refusal(loadSeries(src(`year,x\n${yearsEvery(1900, 10, 5)}\n`), { freq: 'yearly' }));
    expect(e.code).toBe('freq-finer');
    expect(e.message).toBe('--freq yearly is finer than the data, which are every 10 years');
  });
});

describe('instants near midnight', () => {
  it('snaps UTC instants of local midnights (UTC−8 winter, UTC−7 summer) to their day, and leaves other times alone', () => {
    const t = Float64Array.of(Date.UTC(2021, 0, 1, 8), Date.UTC(2021, 3, 1, 7), NaN, Date.UTC(2021, 4, 1, 7));
    expect(snapToMidnight(t)).toEqual({ moved: 3, minOffset: 420, maxOffset: 480 });
    expect(Array.from(t)).toEqual([Date.UTC(2021, 0, 1), Date.UTC(2021, 3, 1), NaN, Date.UTC(2021, 4, 1)]);
    // UTC+1 and +2: the previous day's 23:00 and 22:00 are the next day's midnight.
    const east = Float64Array.of(Date.UTC(2020, 11, 31, 23), Date.UTC(2021, 5, 30, 22));
    expect(snapToMidnight(east)?.moved).toBe(2);
    expect(Array.from(east)).toEqual([Date.UTC(2021, 0, 1), Date.UTC(2021, 6, 1)]);
    // End-of-day stamps (not whole quarter hours), hourly data (spread) and noon readings stay.
    expect(snapToMidnight(Float64Array.of(Date.UTC(2021, 0, 31, 23, 59, 59), Date.UTC(2021, 1, 28, 23, 59, 59)))).toBeNull();
    expect(snapToMidnight(Float64Array.from({ length: 30 }, (_, h) => Date.UTC(2021, 0, 1, h)))).toBeNull();
    expect(snapToMidnight(Float64Array.of(Date.UTC(2021, 0, 1, 12), Date.UTC(2021, 0, 2, 12)))).toBeNull();
  });

  it('reads a monthly JSON export with daylight-saving offsets as monthly, noting the count', async () => {
    const records = Array.from({ length: 12 }, (_, m) => ({ date: new Date(Date.UTC(2021, m, 1, m >= 3 && m <= 9 ? 7 : 8)).toISOString(), x: m }));
    const { series, report } = await loadSeries(src(JSON.stringify(records), 'export.json'));
    expect(report.frequency.text).toBe('monthly: 11 of 11 steps are 1 month');
    expect(report.snapped).toEqual({ moved: 12, minOffset: 420, maxOffset: 480 });
    expect(Array.from(series[0].time, (t) => formatTime(t, 'monthly'))).toEqual(Array.from({ length: 12 }, (_, m) => `2021-${String(m + 1).padStart(2, '0')}`));
  });
});

describe('the time column and aggregation', () => {
  it('takes a full date column over a year column, with a note', async () => {
    const rows = Array.from({ length: 15 }, (_, i) => `${2020 + Math.floor(i / 12)},${2020 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}-01,${i + 1}`).join('\n');
    const { report } = await loadSeries(src(`year,date,sales\n${rows}\n`));
    expect(report.layout.time).toBe('date');
    expect(report.layout.passedOver).toEqual(['year']);
    expect(report.frequency.frequency).toBe('monthly');
    expect(report.notes).toContain('time column "date" chosen over "year": its times are finer');
    // Forced onto the year column, --duplicates sum warns that 2021 combines 3 rows, not 12.
    const forced = await loadSeries(src(`year,date,sales\n${rows}\n`), { time: 'year', duplicates: 'sum', value: 'sales' });
    expect(Array.from(forced.series[0].values)).toEqual([78, 13 + 14 + 15]);
    expect(forced.report.notes.some((n) => n.includes('2021 (3 rows, most have 12)'))).toBe(true);
  });

  it('drops incomplete years at both ends after --freq yearly (April 2020 to March 2024), or keeps and flags them', async () => {
    const months = Array.from({ length: 48 }, (_, i) => {
      const k = i + 3; // 2020-04 …
      return `${2020 + Math.floor(k / 12)}-${String((k % 12) + 1).padStart(2, '0')},1`;
    }).join('\n');
    const dropped = await loadSeries(src(`month,x\n${months}\n`), { freq: 'yearly' });
    expect(Array.from(dropped.series[0].time, (t) => formatTime(t, 'yearly'))).toEqual(['2021', '2022', '2023']);
    expect(Array.from(dropped.series[0].values)).toEqual([12, 12, 12]);
    expect(dropped.report.series[0].partialPeriods).toEqual([
      { time: '2020', observed: 9, expected: 12, dropped: true },
      { time: '2024', observed: 3, expected: 12, dropped: true },
    ]);
    expect(dropped.report.notes).toContain('warning: series "x": dropped incomplete periods at the ends: 2020 (9 of 12), 2024 (3 of 12)');
    const kept = await loadSeries(src(`month,x\n${months}\n`), { freq: 'yearly', partial: 'keep' });
    expect(Array.from(kept.series[0].values)).toEqual([9, 12, 12, 12, 3]);
    expect(kept.report.series[0].partialPeriods.map((p) => p.dropped)).toEqual([false, false]);
  });

  it('combines stray stamps within a month when --freq names the data frequency', async () => {
    const { series, report } = await loadSeries(src('date,x\n2020-01-01,1\n2020-02-01,2\n2020-03-01,3\n2020-03-15,4\n2020-04-01,5\n'), { freq: 'monthly' });
    expect(Array.from(series[0].values)).toEqual([1, 2, 7, 5]);
    expect(report.frequency.text).toBe('monthly: 3 of 4 steps are 1 month; 1 step within one month; 2 steps are not whole months (folded by --freq)');
  });
});

describe('decimal commas', () => {
  it('reads 3,5 1.234,5 and 1 234,5 in decimal-comma mode and refuses 3.5 and 1.234 there', () => {
    expect(parseCommaNumberText('3,5')).toBe(3.5);
    expect(parseCommaNumberText('-0,25')).toBe(-0.25);
    expect(parseCommaNumberText('1.234,5')).toBe(1234.5);
    expect(parseCommaNumberText('1 234,5')).toBe(1234.5);
    expect(parseCommaNumberText('1.234.567')).toBe(1234567);
    expect(parseCommaNumberText('12')).toBe(12);
    for (const s of ['3.5', '1.234', '1,2,3', 'x', '']) expect(parseCommaNumberText(s), s).toBeNaN();
  });

  it('detects them in a semicolon-delimited file whose numbers have one comma each, not otherwise', async () => {
    const semi = await loadTable(src('month;sales;price\n2021-01;3,5;1,25\n2021-02;4,5;1,5\n'));
    expect(detectDecimalComma(semi)).toEqual(['sales', 'price']);
    const { series, report } = await loadSeries(src('month;sales;price\n2021-01;3,5;1,25\n2021-02;4,5;1,5\n'));
    expect(report.decimal).toEqual({ mark: ',', source: 'detected', columns: ['sales', 'price'] });
    expect(Array.from(series[0].values)).toEqual([3.5, 4.5]);
    expect(detectDecimalComma(await loadTable(src('month;x\n2020-01;1,234\n2020-02;5\n')))).toBeNull();
    expect(detectDecimalComma(await loadTable(src('month;x;y\n2020-01;1,5;2.5\n')))).toBeNull();
    const e = await refusal(loadSeries(src('month;x\n2020-01;3,5\n2020-02;4\n')));
    expect(e.code).toBe('value-not-number');
    expect(e.context.hint).toBe('the numbers have decimal commas: pass --decimal , to read them');
    const ok = await loadSeries(src('month;x\n2020-01;3,5\n2020-02;4\n'), { decimal: ',' });
    expect(Array.from(ok.series[0].values)).toEqual([3.5, 4]);
  });
});

describe('a single time stamp per series, with the frequency of the model it is for', () => {
  // One new month of two series, written as dates: the form alone says daily.
  const oneMonth = 'line,month,sales\nA,2025-01-01,600\nB,2025-01-01,70\n';

  it('takes the asked frequency when every stamp starts one of its periods', async () => {
    const plain = await loadSeries(src(oneMonth), { id: 'line' });
    expect(plain.series[0].frequency).toBe('daily');
    const asked = await loadSeries(src(oneMonth), { id: 'line', singleStampFrequency: 'monthly' });
    expect(asked.series.map((s) => [s.name, s.frequency, formatTime(s.time[0], s.frequency), s.values[0]])).toEqual([
      ['A', 'monthly', '2025-01', 600],
      ['B', 'monthly', '2025-01', 70],
    ]);
    expect(asked.report.frequency.text).toBe('monthly: a single time stamp, on the start of a month, as asked');
    // 2025-04-01 starts a quarter; 2025-02-01 does not
    expect((await loadSeries(src('t,y\n2025-04-01,5\n'), { singleStampFrequency: 'quarterly' })).series[0].frequency).toBe('quarterly');
    expect((await loadSeries(src('t,y\n2025-02-01,5\n'), { singleStampFrequency: 'quarterly' })).series[0].frequency).toBe('daily');
  });

  it('keeps the form’s frequency for a stamp inside a period, a finer asked frequency, or several stamps', async () => {
    expect((await loadSeries(src('line,month,sales\nA,2025-01-15,600\n'), { id: 'line', singleStampFrequency: 'monthly' })).series[0].frequency).toBe('daily');
    expect((await loadSeries(src('t,y\n2025-01,5\n'), { singleStampFrequency: 'daily' })).series[0].frequency).toBe('monthly');
    // two stamps a day apart show their step: daily, whatever is asked
    expect((await loadSeries(src('t,y\n2025-01-01,5\n2025-01-02,6\n'), { singleStampFrequency: 'monthly' })).series[0].frequency).toBe('daily');
  });
});
