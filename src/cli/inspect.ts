/**
 * `certa inspect <file>`: what certa reads in a file — layout, series, frequency with its
 * evidence, span, length, gaps (filled, listed), duplicates, missing values and summary
 * statistics. `--json` prints the same as one JSON document with a fixed key order.
 */
import type { Command } from 'commander';
import { periodName } from '../data/calendar.js';
import { delimiterName } from '../data/csv.js';
import type { LoadReport } from '../data/load.js';
import { summaryStats, type SeriesStats } from '../data/regularise.js';
import type { Series } from '../data/series.js';
import { addDataOptions, loadSeriesFromCli } from './data-options.js';
import type { CliIO } from './main.js';

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
    io.out(opts.json ? `${JSON.stringify(doc, null, 2)}\n` : renderText(doc));
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
  rows: number;
  columns: string[];
  layout: { kind: 'wide' | 'long'; time: string; id: string | null; values: string[]; inputs: string[]; ignored: string[] };
  time_form: string;
  frequency: { name: string; evidence: string; steps: number; step_counts: { periods: number; count: number }[] };
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
    partial_periods: { time: string; observed: number; expected: number }[];
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
    rows: report.rows,
    columns: report.columns,
    layout: {
      kind: report.layout.kind,
      time: report.layout.time,
      id: report.layout.id,
      values: report.layout.values,
      inputs: report.layout.inputs,
      ignored: report.layout.ignored,
    },
    time_form: report.timeForm,
    frequency: {
      name: report.frequency.frequency,
      evidence: report.frequency.text,
      steps: report.frequency.steps,
      step_counts: report.frequency.counts.map((c) => ({ periods: c.periods, count: c.count })),
    },
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
      partial_periods: r.partialPeriods.map((p) => ({ time: p.time, observed: p.observed, expected: p.expected })),
      stats: orderedStats(r.stats),
      inputs: series[i].inputs.map((x) => ({ name: x.name, stats: orderedStats(summaryStats(x.values)) })),
    })),
    notes: report.notes,
  };
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
  const fmt = doc.format.toUpperCase() + (doc.delimiter !== null ? `, ${delimiterName(doc.delimiter)}-delimited` : '') + (doc.sheet !== null ? `, sheet "${doc.sheet}"` : '');
  line('file', `${doc.file} (${fmt}, ${doc.rows} data row${doc.rows === 1 ? '' : 's'})`);
  const l = doc.layout;
  const layoutText =
    l.kind === 'wide'
      ? `wide: time ${quoted([l.time])}, ${l.values.length === 1 ? 'series' : `${l.values.length} series`} ${quoted(l.values)}`
      : `long: id ${quoted([l.id as string])}, time ${quoted([l.time])}, value ${quoted(l.values)}`;
  line('layout', layoutText + (l.inputs.length > 0 ? `; inputs ${quoted(l.inputs)}` : ''));
  line('times', doc.time_form);
  line('frequency', doc.frequency.evidence);
  if (doc.aggregated) line('aggregated', `${doc.aggregated.from} → ${doc.aggregated.to} by ${doc.aggregated.by}`);
  const f = doc.aggregated ? doc.aggregated.to : doc.frequency.name;
  for (const s of doc.series) {
    out.push('');
    out.push(`series "${s.name}"`);
    const ind = (label: string, text: string): void => {
      out.push(`  ${label.padEnd(11)}${text}`);
    };
    ind('span', `${s.start} to ${s.end} (${s.length} ${periodName(f as never, s.length)})`);
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
      ind('partial', s.partial_periods.map((p) => `${p.time} (${p.observed} of ${p.expected})`).join(', '));
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
