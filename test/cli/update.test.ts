/**
 * `certa update` through the built CLI: text summary, files written, 0 new rows, refusals
 * (revised history, a gap, a missing input), --json, --fail-on-drift (exit 3), --on-drift
 * research, and the lock held by another process (exit 2 naming the holder).
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { acquireLock } from '../../src/store/lock.js';
import { parseModel, serializeModel } from '../../src/store/model-file.js';
import { bodyOn, simulateArx } from '../forecast/update-fixtures.js';
import { ensureBuilt, runCli } from './run-cli.js';
import { parseResult } from './result.js';
import { csvRows } from './update-data.js';

let work: string;

beforeAll(() => {
  ensureBuilt();
  work = mkdtempSync(join(tmpdir(), 'certa-update-cli-'));
});

afterAll(() => {
  rmSync(work, { recursive: true, force: true });
});

function setup(name: string, seed: number, options: { shiftAt?: number; levelShift?: number; n?: number } = {}) {
  const dir = join(work, name);
  const sim = simulateArx(options.n ?? 140, seed, options);
  return { dir, sim, model: join(dir, 'model.json'), initial: serializeModel(bodyOn(sim.series, 100)) };
}

/** A fresh folder holding only the model file. */
function place(dir: string, model: string, text: string): void {
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  writeFileSync(model, text);
}

describe('certa update', () => {
  it('learns the new rows, prints the summary and writes forecast.csv, summary.json, the model and model.prev.json; a repeat says 0 new rows and writes nothing', () => {
    const { dir, sim, model, initial } = setup('basic', 21);
    place(dir, model, initial);
    const data = join(work, 'basic.csv');
    writeFileSync(data, csvRows(sim.series, 90, 112));
    const r = runCli(['update', model, data, '--no-charts']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('12 new rows (2008-05 to 2009-04)');
    expect(r.stdout).toContain('Parameter change ‖θ_after − θ_before‖₂ = ');
    expect(r.stdout).toContain('Drift: no alarm');
    expect(r.stdout).toMatch(/Forecast \(calibrated bands/);
    expect(r.stdout).toContain('Forecasts are statistical extrapolations');
    expect(existsSync(join(dir, 'forecast.csv'))).toBe(true);
    expect(existsSync(join(dir, 'forecast.png'))).toBe(false);
    expect(readFileSync(join(dir, 'model.prev.json'), 'utf8')).toBe(initial);
    const body = parseModel(readFileSync(model, 'utf8'), model);
    expect(body.series.lastTimeLabel).toBe('2009-04');
    expect(body.log).toHaveLength(1);
    const csv = readFileSync(join(dir, 'forecast.csv'), 'utf8').split(/\r?\n/);
    expect(csv[0]).toBe('series,time,kind,value,point,rolling_point,lower_80,upper_80,lower_95,upper_95');
    expect(csv.filter((l) => l.includes(',forecast,'))).toHaveLength(12);
    const summary = JSON.parse(readFileSync(join(dir, 'summary.json'), 'utf8'));
    expect(summary.update.rows_added).toBe(12);
    expect(summary.files).toEqual(['forecast.csv', 'model.json', 'report.html', 'summary.json']);
    // report.html is made anew by the update: its forecast is the one of forecast.csv.
    const html = readFileSync(join(dir, 'report.html'), 'utf8');
    expect(html).toContain('certa update report');
    expect(html).toContain('12 new observations (2008-05 to 2009-04) learnt by recursive least squares; the model now runs to 2009-04.');
    const firstForecast = csv.find((l) => l.includes(',forecast,'))!.split(',');
    expect(html).toContain(`<td>${firstForecast[1]}</td>`);
    expect(html).toContain('not physical climate projections and not financial advice');

    const bytes = readFileSync(model, 'utf8');
    const again = runCli(['update', model, data, '--no-charts']);
    expect(again.code).toBe(0);
    expect(again.stdout).toContain('0 new rows');
    expect(readFileSync(model, 'utf8')).toBe(bytes);
  });

  it('--no-report leaves report.html out', () => {
    const { dir, sim, model, initial } = setup('no-report', 22);
    place(dir, model, initial);
    const data = join(work, 'no-report.csv');
    writeFileSync(data, csvRows(sim.series, 90, 106));
    const r = runCli(['update', model, data, '--no-charts', '--no-report']);
    expect(r.code, r.stderr).toBe(0);
    expect(existsSync(join(dir, 'report.html'))).toBe(false);
    expect(JSON.parse(readFileSync(join(dir, 'summary.json'), 'utf8')).files).toEqual(['forecast.csv', 'model.json', 'summary.json']);
  });

  it('refuses a revised history naming the time and column (exit 2, one certa: line and a hint); --accept-revisions re-estimates', () => {
    const { dir, sim, model, initial } = setup('revised', 22);
    place(dir, model, initial);
    const data = join(work, 'revised.csv');
    writeFileSync(data, csvRows(sim.series, 95, 105, (t, cells) => t === 97 && (cells[1] = String(sim.series.values[t] + 1))));
    const r = runCli(['update', model, data]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^certa: .*revised\.csv: column "sales": the new data revise 2008-02/);
    expect(r.stderr).toContain('hint: ');
    expect(r.stderr).toContain('--accept-revisions');
    expect(r.stderr).not.toMatch(/at .*\.js:\d+/);
    expect(readFileSync(model, 'utf8')).toBe(initial);
    const ok = runCli(['update', model, data, '--accept-revisions', '--no-charts', '--json']);
    expect(ok.code).toBe(0);
    const summary = parseResult(ok.stdout).results[0].detail;
    expect(summary.update.revisions).toEqual([{ time: '2008-02', column: 'sales', found: sim.series.values[97] + 1, expected: sim.series.values[97] }]);
    expect(summary.update.rows_added).toBe(5);
  });

  it('refuses a gap after the model and a file without the model input', () => {
    const { dir, sim, model, initial } = setup('gap', 23);
    place(dir, model, initial);
    const gap = join(work, 'gap.csv');
    writeFileSync(gap, csvRows(sim.series, 103, 110));
    const r = runCli(['update', model, gap]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('the new data do not continue the model: after 2008-04 comes 2008-08');
    const noInput = join(work, 'noinput.csv');
    writeFileSync(noInput, csvRows(sim.series, 100, 110).replace(/,[^,\n]*$/gm, '').replace('month,sales', 'month,sales'));
    const r2 = runCli(['update', model, noInput]);
    expect(r2.code).toBe(2);
    expect(r2.stderr).toMatch(/^certa: /);
    expect(r2.stderr).toContain('price');
    expect(readFileSync(model, 'utf8')).toBe(initial);
  });

  it('--fail-on-drift exits 3 after a level shift, having written the model; --on-drift research re-searches', () => {
    const { dir, sim, model, initial } = setup('drift', 24, { shiftAt: 102, levelShift: 8 });
    place(dir, model, initial);
    const data = join(work, 'drift.csv');
    writeFileSync(data, csvRows(sim.series, 100, 120));
    const r = runCli(['update', model, data, '--fail-on-drift', '--no-charts']);
    expect(r.code).toBe(3);
    expect(r.stdout).toMatch(/Drift: \d alarms?: mean-up at 2008-0[7-9]/);
    expect(r.stdout).toContain('Policy: warn');
    expect(parseModel(readFileSync(model, 'utf8'), model).log[0].alarms.length).toBeGreaterThan(0);
    place(dir, model, initial);
    const rs = runCli(['update', model, data, '--on-drift', 'research', '--no-charts']);
    expect(rs.code).toBe(0);
    expect(rs.stdout).toContain('Policy: research: re-searched');
    expect(rs.stdout).toContain('Before: ');
    expect(rs.stdout).toContain('After: ');
  });

  it('refuses to run while another process holds the model lock, naming the holder (exit 2)', async () => {
    const { dir, sim, model, initial } = setup('locked', 25);
    place(dir, model, initial);
    const data = join(work, 'locked.csv');
    writeFileSync(data, csvRows(sim.series, 100, 110));
    const lock = await acquireLock(model, { command: 'test holder' });
    try {
      const r = runCli(['update', model, data]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(new RegExp(`^certa: .*the model is locked by process ${process.pid} on host .*\\(test holder\\)`));
    } finally {
      await lock.release();
    }
    expect(readFileSync(model, 'utf8')).toBe(initial);
  });

  it('rejects an unknown drift policy as a usage error', () => {
    const r = runCli(['update', 'model.json', 'x.csv', '--on-drift', 'panic']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('option --on-drift has an unusable value (found "panic", expected warn, adapt, research)');
  });
});
