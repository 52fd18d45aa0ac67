/**
 * `certa inspect <file>`: what certa reads in a file — format (delimiter, decimal mark, the
 * sheets of a workbook), layout, how the time cells were read (and any instants snapped to
 * midnight), frequency and step with their evidence, the season, span, length, gaps (filled,
 * listed), duplicates, incomplete periods after `--freq`, missing values and summary
 * statistics. `--json` prints the same as one JSON document with a fixed key order.
 */
import type { Command } from 'commander';
import { cadenceName, DAYS_PER_YEAR, periodName, type Frequency } from '../data/calendar.js';
import { offsetText } from '../data/snap.js';
import { YEARLY_MIN_POINTS } from '../select/seasons.js';
import { delimiterName } from '../data/csv.js';
import type { LoadReport } from '../data/load.js';
import { summaryStats, type SeriesStats } from '../data/regularise.js';
import type { Series } from '../data/series.js';
import { addDataOptions, loadSeriesFromCli } from './data-options.js';
import type { CliIO } from './main.js';
import { resultDocument } from '../report/result-json.js';

export function register(program: Command, io: CliIO): void {
  const command = program
    .command('inspect')
    .description('show what certa reads in a file: layout, series, frequency, gaps, duplicates, statistics')
    .argument('<file>', 'CSV, TSV, XLSX or JSON file, or - for standard input')
    .option('--json', 'print a JSON document instead of text');
  addDataOptions(command);
  command.action(async (file: string, opts: Record<string, unknown>) => {
    const { series, report } = await loadSeriesFromCli(file, opts, io);
    const doc = inspectDocument(series, report);
    io.out(opts.json ? `${JSON.stringify(inspectResult(doc), null, 2)}\n` : renderText(doc));
  });
  program.addHelpText('after', '\nFirst look at a file:\n  certa inspect datasets/demo/vallmark-heatpumps.csv --inputs subsidy,frost_index\n');
}

interface InputDoc {
  name: string;
  stats: SeriesStats;
}

/** The inspect result, keys in the order they are printed. */
export interface InspectDocument {
  file: string;
  format: string;
  delimiter: string | null;
  sheet: string | null;
  sheets: { name: string; rows: number }[];
  decimal: { mark: string; source: string; columns: string[] };
  rows: number;
  columns: string[];
  layout: { kind: 'wide' | 'long'; time: string; id: string | null; values: string[]; inputs: string[]; ignored: string[]; passed_over: string[] };
  time_form: string;
  time_snapped: { moved: number; min_offset_minutes: number; max_offset_minutes: number } | null;
  frequency: { name: string; step: number; cadence: string; evidence: string; steps: number; step_counts: { periods: number; count: number }[] };
  season: { length: number | null; source: string; yearly: string | null };
  aggregated: { from: string; to: string; by: string } | null;
  series: {
    name: string;
    start: string;
    end: string;
    length: number;
    observations: number;
    missing: number;
    trimmed: { leading: number; trailing: number };
    duplicates: { policy: string; times: { time: string; rows: number[] }[] };
    filled: { time: string; column: string; value: number }[];
    partial_periods: { time: string; observed: number; expected: number; dropped: boolean }[];
    stats: SeriesStats;
    inputs: InputDoc[];
  }[];
  notes: string[];
}

export function inspectDocument(series: Series[], report: LoadReport): InspectDocument {
  return {
    file: report.source,
    format: report.format,
    delimiter: report.delimiter,
    sheet: report.sheet,
    sheets: report.sheets.map((x) => ({ name: x.name, rows: x.rows })),
    decimal: { mark: report.decimal.mark, source: report.decimal.source, columns: report.decimal.columns },
    rows: report.rows,
    columns: report.columns,
    layout: {
      kind: report.layout.kind,
      time: report.layout.time,
      id: report.layout.id,
      values: report.layout.values,
      inputs: report.layout.inputs,
      ignored: report.layout.ignored,
      passed_over: report.layout.passedOver,
    },
    time_form: report.timeForm,
    time_snapped: report.snapped ? { moved: report.snapped.moved, min_offset_minutes: report.snapped.minOffset, max_offset_minutes: report.snapped.maxOffset } : null,
    frequency: {
      name: report.frequency.frequency,
      step: report.frequency.step,
      cadence: cadenceName(report.frequency.frequency, report.frequency.step),
      evidence: report.frequency.text,
      steps: report.frequency.steps,
      step_counts: report.frequency.counts.map((c) => ({ periods: c.periods, count: c.count })),
    },
    season: { length: report.season.length, source: report.season.source, yearly: yearlyNote(series, report) },
    aggregated: report.aggregated ? { from: report.aggregated.from, to: report.aggregated.to, by: report.aggregated.by } : null,
    series: report.series.map((r, i) => ({
      name: r.name,
      start: r.start,
      end: r.end,
      length: r.length,
      observations: r.observations,
      missing: r.missing,
      trimmed: { leading: r.trimmed.leading, trailing: r.trimmed.trailing },
      duplicates: { policy: r.duplicatePolicy, times: r.duplicates.map((d) => ({ time: d.time, rows: d.rows })) },
      filled: r.filled.map((p) => ({ time: p.time, column: p.column, value: p.value })),
      partial_periods: r.partialPeriods.map((p) => ({ time: p.time, observed: p.observed, expected: p.expected, dropped: p.dropped })),
      stats: orderedStats(r.stats),
      inputs: series[i].inputs.map((x) => ({ name: x.name, stats: orderedStats(summaryStats(x.values)) })),
    })),
    notes: report.notes,
  };
}

/** The inspect document as the one result shape: the file's facts, one entry per series. */
export function inspectResult(doc: InspectDocument): Record<string, unknown> {
  const { series, ...file } = doc;
  return resultDocument(
    'inspect',
    series.map((s) => ({ series: s.name, status: 'ok', folder: null, reason: null, detail: s })),
    { file },
  );
}

/** What the search does about the yearly cycle of a daily series (select/seasons.ts), or null. */
function yearlyNote(series: Series[], report: LoadReport): string | null {
  const daily = series.length > 0 && series[0].frequency === 'daily' && (series[0].step ?? 1) === 1;
  if (!daily) return null;
  if (report.season.source === 'option') return 'not searched: --season sets the one season';
  if (series[0].season !== 7) return null;
  const longest = Math.max(...series.map((x) => x.values.length));
  return longest >= YEARLY_MIN_POINTS
    ? `the search also tries the yearly cycle (${DAYS_PER_YEAR} days) by harmonics and keeps the season the data support`
    : `not searched: it needs at least two years (${YEARLY_MIN_POINTS} days)`;
}

function orderedStats(s: SeriesStats): SeriesStats {
  return { min: s.min, max: s.max, mean: s.mean, sd: s.sd };
}

/** Numbers for people: up to 6 significant digits, no trailing zeros. */
function num(v: number | null): string {
  if (v === null) return '—';
  if (Number.isInteger(v) && Math.abs(v) < 1e15) return String(v);
  return String(Number(v.toPrecision(6)));
}

function quoted(names: string[]): string {
  return names.map((n) => `"${n}"`).join(', ');
}

export function renderText(doc: InspectDocument): string {
  const out: string[] = [];
  const line = (label: string, text: string): void => {
    out.push(`${label.padEnd(11)}${text}`);
  };
  const decimal = doc.decimal.mark === ',' ? `, decimal comma${doc.decimal.source === 'detected' ? ' (detected)' : ''}` : '';
  const fmt = doc.format.toUpperCase() + (doc.delimiter !== null ? `, ${delimiterName(doc.delimiter)}-delimited` : '') + decimal + (doc.sheet !== null ? `, sheet "${doc.sheet}"` : '');
  line('file', `${doc.file} (${fmt}, ${doc.rows} data row${doc.rows === 1 ? '' : 's'})`);
  if (doc.sheets.length > 1) line('sheets', doc.sheets.map((x) => `"${x.name}" (${x.rows} data row${x.rows === 1 ? '' : 's'})`).join(', '));
  const l = doc.layout;
  const layoutText =
    l.kind === 'wide'
      ? `wide: time ${quoted([l.time])}, ${l.values.length === 1 ? 'series' : `${l.values.length} series`} ${quoted(l.values)}`
      : `long: id ${quoted([l.id as string])}, time ${quoted([l.time])}, value ${quoted(l.values)}`;
  line('layout', layoutText + (l.inputs.length > 0 ? `; inputs ${quoted(l.inputs)}` : ''));
  const snap = doc.time_snapped;
  const offsets = snap ? (snap.min_offset_minutes === snap.max_offset_minutes ? offsetText(snap.min_offset_minutes) : `${offsetText(snap.min_offset_minutes)} to ${offsetText(snap.max_offset_minutes)}`) : '';
  line('times', doc.time_form + (l.passed_over.length > 0 ? ` (column chosen over ${quoted(l.passed_over)}: finer times)` : '') + (snap ? `; ${snap.moved} instant${snap.moved === 1 ? '' : 's'} at ${offsets} h from midnight snapped to it` : ''));
  line('frequency', doc.frequency.evidence);
  if (doc.aggregated) line('aggregated', `${doc.aggregated.from} → ${doc.aggregated.to} by ${doc.aggregated.by}`);
  const f = (doc.aggregated ? doc.aggregated.to : doc.frequency.name) as Frequency;
  const step = doc.aggregated ? 1 : doc.frequency.step;
  const seasonText =
    doc.season.length === null
      ? 'none'
      : `${doc.season.length} observations${f === 'daily' && step === 1 && doc.season.length === 7 ? ' (weekly)' : ''}, ${doc.season.source === 'option' ? 'set by --season' : 'from the frequency'}`;
  line('season', seasonText + (doc.season.yearly ? `; yearly cycle: ${doc.season.yearly}` : ''));
  for (const s of doc.series) {
    out.push('');
    out.push(`series "${s.name}"`);
    const ind = (label: string, text: string): void => {
      out.push(`  ${label.padEnd(11)}${text}`);
    };
    ind('span', `${s.start} to ${s.end} (${step === 1 ? `${s.length} ${periodName(f, s.length)}` : `${s.length} observations, ${cadenceName(f, step)}`})`);
    ind('read', `${s.observations} observation${s.observations === 1 ? '' : 's'}; ${s.missing} missing in the span`);
    if (s.trimmed.leading + s.trimmed.trailing > 0) ind('trimmed', `${s.trimmed.leading} leading, ${s.trimmed.trailing} trailing (missing values)`);
    ind(
      'duplicates',
      s.duplicates.times.length === 0
        ? 'none'
        : `${s.duplicates.times.length} time stamp${s.duplicates.times.length === 1 ? '' : 's'} combined by ${s.duplicates.policy}: ` +
            s.duplicates.times.slice(0, 5).map((d) => `${d.time} (rows ${d.rows.join(', ')})`).join('; ') +
            (s.duplicates.times.length > 5 ? '; …' : ''),
    );
    if (s.filled.length === 0) ind('gaps', 'none');
    else {
      ind('gaps', `${s.filled.length} point${s.filled.length === 1 ? '' : 's'} filled:`);
      for (const p of s.filled) out.push(`    ${p.time}  ${p.column} = ${num(p.value)}`);
    }
    if (s.partial_periods.length > 0) {
      ind('partial', s.partial_periods.map((p) => `${p.time} (${p.observed} of ${p.expected}${p.dropped ? ', dropped' : ', kept'})`).join(', '));
    }
    ind('summary', statsText(s.stats));
    for (const x of s.inputs) ind('input', `"${x.name}": ${statsText(x.stats)}`);
  }
  if (doc.notes.length > 0) {
    out.push('');
    out.push('notes');
    for (const n of doc.notes) out.push(`  - ${n}`);
  }
  return `${out.join('\n')}\n`;
}

function statsText(s: SeriesStats): string {
  return `min ${num(s.min)}  max ${num(s.max)}  mean ${num(s.mean)}  sd ${num(s.sd)}`;
}
