import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt, runCli } from './run-cli.js';
import { parseResult } from './result.js';

const CO2 = 'node_modules/vega-datasets/data/co2-concentration.csv';
const DEMO = 'datasets/demo/vallmark-heatpumps.csv';

beforeAll(() => ensureBuilt());

describe('certa inspect', () => {
  it('prints layout, frequency evidence and the five filled CO2 months (vega-datasets co2-concentration.csv)', () => {
    const r = runCli(['inspect', CO2, '--series', 'CO2']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('layout     wide: time "Date"');
    expect(r.stdout).toContain('frequency  monthly: 737 of 740 steps are 1 month; 2 steps of 2 months; 1 step of 4 months');
    expect(r.stdout).toContain('span       1958-03 to 2020-04 (746 months)');
    for (const m of ['1958-06', '1958-10', '1964-02', '1964-03', '1964-04']) expect(r.stdout).toMatch(new RegExp(`^    ${m}  CO2 = `, 'm'));
  });
  it('--json gives a stable key order and the same facts', () => {
    const r = runCli(['inspect', CO2, '--json']);
    expect(r.code, r.stderr).toBe(0);
    const result = parseResult(r.stdout);
    expect(Object.keys(result)).toEqual(['format', 'version', 'command', 'totals', 'file', 'results']);
    expect(Object.keys(result.file)).toEqual(['file', 'format', 'delimiter', 'sheet', 'sheets', 'decimal', 'rows', 'columns', 'layout', 'time_form', 'time_snapped', 'frequency', 'season', 'aggregated', 'notes']);
    const doc = { ...result.file, series: result.results.map((e: { detail: unknown }) => e.detail) };
    expect(Object.keys(doc.series[0])).toEqual(['name', 'start', 'end', 'length', 'observations', 'missing', 'trimmed', 'duplicates', 'filled', 'partial_periods', 'stats', 'inputs']);
    expect(doc.series.map((s: { name: string }) => s.name)).toEqual(['CO2', 'adjusted CO2']);
    expect(doc.series[0].filled.map((p: { time: string }) => p.time)).toEqual(['1958-06', '1958-10', '1964-02', '1964-03', '1964-04']);
    expect(doc.frequency.step_counts).toEqual([{ periods: 1, count: 737 }, { periods: 2, count: 2 }, { periods: 4, count: 1 }]);
    // Same input, same bytes.
    expect(runCli(['inspect', CO2, '--json']).stdout).toBe(r.stdout);
  });
  it('reads standard input with -', () => {
    const r = runCli(['inspect', '-', '--json', '--inputs', 'subsidy,frost_index'], { stdin: readFileSync(join(process.cwd(), DEMO)) });
    expect(r.code, r.stderr).toBe(0);
    const result = parseResult(r.stdout);
    const doc = { ...result.file, series: result.results.map((e: { detail: unknown }) => e.detail) };
    expect(doc.file).toBe('-');
    expect(doc.series[0]).toMatchObject({ name: 'installations', start: '2015-01', end: '2024-12', length: 120 });
    expect(doc.series[0].inputs.map((x: { name: string }) => x.name)).toEqual(['subsidy', 'frost_index']);
  });
  it('summary statistics of the demo match an independent computation with mathjs', async () => {
    const { mean, std, min, max } = await import('mathjs');
    const lines = readFileSync(join(process.cwd(), DEMO), 'utf8').trim().split('\n').slice(1);
    const y = lines.map((l) => Number(l.split(',')[1]));
    const result = parseResult(runCli(['inspect', DEMO, '--json', '--inputs', 'subsidy,frost_index']).stdout);
    const doc = { series: result.results.map((e: { detail: unknown }) => e.detail) };
    const s = doc.series[0].stats;
    expect(s.min).toBe(min(y));
    expect(s.max).toBe(max(y));
    expect(s.mean).toBeCloseTo(mean(y) as number, 10);
    expect(s.sd).toBeCloseTo(std(y) as unknown as number, 10); // mathjs std: unbiased (n − 1) by default
  });
  it('top-level --help shows certa inspect first', () => {
    const r = runCli(['--help']);
    expect(r.code).toBe(0);
    const commands = r.stdout.slice(r.stdout.indexOf('Commands:'));
    expect(commands.split('\n')[1]).toMatch(/^\s+inspect /);
    expect(r.stdout).toContain('certa inspect <file>');
  });
});
