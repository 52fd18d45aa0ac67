/**
 * `certa forecast` as a user runs it: the built CLI as a child process.
 */
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt, runCli } from './run-cli.js';
import { parseResult } from './result.js';
import { parseModel } from '../../src/store/model-file.js';

const demo = 'datasets/demo/vallmark-heatpumps.csv';
const demoArgs = [demo, '--inputs', 'subsidy,frost_index'];

beforeAll(() => ensureBuilt());

function tmp(): string {
  return mkdtempSync(join(tmpdir(), 'certa-forecast-'));
}

describe('certa forecast', () => {
  it('writes every output file, and two runs with the same seed write identical bytes', () => {
    process.env.SOURCE_DATE_EPOCH = '1764547200';
    try {
      // The same folder twice (summary.json names it): the second run must rewrite every byte alike.
      const a = join(tmp(), 'a');
      const ra = runCli(['forecast', ...demoArgs, '--out', a, '--seed', '7']);
      expect(ra.code, ra.stderr).toBe(0);
      const files = readdirSync(a).sort();
      expect(files).toEqual(['candidates.csv', 'forecast.csv', 'forecast.png', 'history.png', 'holdout.png', 'metrics.csv', 'model.json', 'ranking.png', 'report.html', 'residuals.png', 'summary.json']);
      const first = new Map(files.map((f) => [f, readFileSync(join(a, f))]));
      const rb = runCli(['forecast', ...demoArgs, '--out', a, '--seed', '7']);
      expect(rb.code, rb.stderr).toBe(0);
      // The second write keeps the first model as model.prev.json; everything else is identical.
      expect(readdirSync(a).sort()).toEqual([...files, 'model.prev.json'].sort());
      for (const f of files) expect(readFileSync(join(a, f)).equals(first.get(f)!), f).toBe(true);
      expect(readFileSync(join(a, 'model.prev.json')).equals(first.get('model.json')!)).toBe(true);
      expect(ra.stdout).toBe(rb.stdout);
    } finally {
      delete process.env.SOURCE_DATE_EPOCH;
    }
  });

  it('prints the asserted equation, the holdout table against baselines, the forecast and the caution', () => {
    const out = join(tmp(), 'o');
    const r = runCli(['forecast', ...demoArgs, '--out', out, '--no-charts']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/Asserted model( \(share of the point forecast: \d+ %\))?: /);
    expect(r.stdout).toMatch(/Point forecast: /);
    expect(r.stdout).toMatch(/Bands: 50 % and 90 %, calibrated on this point forecast’s own/);
    expect(r.stdout).toMatch(/y\[t\] = /);
    expect(r.stdout).toMatch(/fixed-origin\s+last-season/);
    expect(r.stdout).toMatch(/rolling-one-step\s+model, frozen/);
    expect(r.stdout).toMatch(/not financial advice/);
    expect(readdirSync(out).some((f) => f.endsWith('.png'))).toBe(false);
    expect(readdirSync(out)).toContain('report.html');
    const noReport = join(tmp(), 'n');
    expect(runCli(['forecast', ...demoArgs, '--out', noReport, '--no-charts', '--no-report']).code).toBe(0);
    expect(readdirSync(noReport)).not.toContain('report.html');
    // forecast.csv: tidy, with every kind, the holdout rows carrying fixed and rolling forecasts.
    const csv = readFileSync(join(out, 'forecast.csv'), 'utf8').trim().split('\r\n');
    expect(csv[0]).toBe('series,time,kind,value,point,rolling_point,lower_50,upper_50,lower_90,upper_90');
    const kinds = new Set(csv.slice(1).map((l) => l.split(',')[2]));
    expect([...kinds].sort()).toEqual(['fitted', 'forecast', 'history', 'holdout']);
    const holdout = csv.filter((l) => l.split(',')[2] === 'holdout');
    expect(holdout.length).toBe(24); // default: min(2 seasons, 20 % of 120)
    for (const l of holdout) expect(l.split(',').every((c) => c !== '')).toBe(true);
    expect(csv.filter((l) => l.split(',')[2] === 'forecast').length).toBe(24); // default horizon: 2 seasons
    // model.json reads back through the model store.
    const body = parseModel(readFileSync(join(out, 'model.json'), 'utf8'), 'model.json');
    expect(body.series.lastTimeLabel).toBe('2024-12');
    expect(body.series.inputs).toEqual(['subsidy', 'frost_index']);
    // summary.json holds what a scheduler needs.
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.model.equation).toMatch(/y\[t\]/);
    expect(summary.forecast.rows.length).toBe(24);
    expect(Array.isArray(summary.warnings)).toBe(true);
    expect(summary.caution).toMatch(/statistical extrapolations/);
    // the coefficient table in summary.json: the bounds the text table prints, estimate ∓ z·se
    // with z = Φ⁻¹(0.95) = 1.6448536269514722 (the 90 % level; Abramowitz & Stegun, Table 26.5)
    expect(summary.model.coefficient_level).toBe(90);
    expect(r.stdout).toMatch(/term\s+estimate\s+std\. error\s+90 % interval/);
    expect(summary.model.terms.length).toBeGreaterThan(0);
    for (const t of summary.model.terms) {
      expect(Object.keys(t).sort()).toEqual(['active', 'estimate', 'lower', 'name', 'se', 'upper']);
      if (!t.active) {
        expect([t.lower, t.upper]).toEqual([null, null]);
        continue;
      }
      expect(t.lower).toBeCloseTo(t.estimate - 1.6448536269514722 * t.se, 9);
      expect(t.upper).toBeCloseTo(t.estimate + 1.6448536269514722 * t.se, 9);
      const six = (x: number) => String(Number(x.toPrecision(6)));
      const row = r.stdout.split('\n').find((l) => l.trimStart().startsWith(`${t.name} `));
      expect(row, t.name).toContain(`${six(t.lower)} to ${six(t.upper)}`);
    }
  });

  it('--json prints the one result document, whose detail is summary.json', () => {
    const out = join(tmp(), 'j');
    const r = runCli(['forecast', ...demoArgs, '--out', out, '--no-charts', '--json', '--holdout', '0', '--horizon', '6']);
    expect(r.code, r.stderr).toBe(0);
    const doc = parseResult(r.stdout);
    expect(doc.totals).toEqual({ series: 1, succeeded: 1, failed: 0 });
    const detail = doc.results[0].detail;
    expect(detail.evaluation).toBeNull();
    expect(detail.forecast.rows.length).toBe(6);
    expect(detail).toEqual(JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')));
  });

  it('takes future inputs from a file and says so', () => {
    const dir = tmp();
    const rows = ['month,subsidy,frost_index', '2025-01,0,80', '2025-02,0,75', '2025-03,0,60'];
    writeFileSync(join(dir, 'future.csv'), `${rows.join('\n')}\n`);
    const r = runCli(['forecast', ...demoArgs, '--out', join(dir, 'o'), '--no-charts', '--future', join(dir, 'future.csv'), '--horizon', '3', '--holdout', '0']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/inputs from .*future\.csv/);
  });
});

describe('certa forecast: bad input', () => {
  const dir = mkdtempSync(join(tmpdir(), 'certa-forecast-bad-'));
  writeFileSync(join(dir, 'short.csv'), 'month,sales\n2020-01,5\n2020-02,6\n2020-03,7\n');
  writeFileSync(join(dir, 'fut-cols.csv'), 'month,subsidy\n2025-01,1\n2025-02,1\n2025-03,1\n');
  writeFileSync(join(dir, 'fut-dates.csv'), 'month,subsidy,frost_index\n2026-01,1,50\n2026-02,1,60\n2026-03,1,60\n');
  const cases: { name: string; args: string[]; says: RegExp[] }[] = [
    { name: 'horizon 0', args: [...demoArgs, '--horizon', '0'], says: [/--horizon/, /found "0"/] },
    { name: 'negative horizon', args: [...demoArgs, '--horizon', '-3'], says: [/--horizon/, /found "-3"/] },
    { name: 'holdout longer than the series', args: [...demoArgs, '--holdout', '500'], says: [/--holdout 500 leaves no training data/, /120 points/] },
    { name: 'future file without an input column', args: [...demoArgs, '--future', join(dir, 'fut-cols.csv')], says: [/fut-cols\.csv/, /no column named "frost_index"/] },
    { name: 'future file with the wrong dates', args: [...demoArgs, '--future', join(dir, 'fut-dates.csv'), '--horizon', '3'], says: [/fut-dates\.csv/, /does not cover the forecast horizon/] },
    { name: 'series too short for any candidate', args: [join(dir, 'short.csv'), '--holdout', '0'], says: [/short\.csv|"sales"/, /3 points/, /needs at least/] },
    { name: 'bad forgetting factor', args: [...demoArgs, '--forgetting', '1.5'], says: [/--forgetting/, /found "1.5"/] },
    { name: 'bad interval level', args: [...demoArgs, '--levels', '80,100'], says: [/--levels/, /found "100"/] },
  ];
  for (const c of cases) {
    it(c.name, () => {
      const r = runCli(['forecast', ...c.args, '--no-charts', '--out', join(dir, 'out')]);
      expect(r.code).toBe(2);
      const lines = r.stderr.trim().split('\n');
      expect(lines[0]).toMatch(/^certa: /);
      expect(lines.length).toBeLessThanOrEqual(2);
      if (lines[1]) expect(lines[1]).toMatch(/^hint: /);
      expect(r.stderr).not.toMatch(/\n\s+at /);
      for (const re of c.says) expect(lines[0]).toMatch(re);
    });
  }
});
