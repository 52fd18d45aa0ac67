/**
 * What `certa forecast` says it forecasts, through the built CLI: the headline, summary.json and
 * model.json name the point forecast and where the bands come from, and the holdout verdict
 * against the baselines.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt, runCli } from './run-cli.js';

const demoArgs = ['datasets/demo/vallmark-heatpumps.csv', '--inputs', 'subsidy,frost_index', '--no-charts'];

beforeAll(() => ensureBuilt());

function run(extra: string[]): { stdout: string; summary: Record<string, any>; model: Record<string, any> } {
  const out = join(mkdtempSync(join(tmpdir(), 'certa-story-')), 'o');
  const r = runCli(['forecast', ...demoArgs, '--out', out, ...extra]);
  expect(r.code, r.stderr).toBe(0);
  return {
    stdout: r.stdout,
    summary: JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')),
    model: JSON.parse(readFileSync(join(out, 'model.json'), 'utf8')),
  };
}

describe('certa forecast: the headline is what is forecast', () => {
  it('says when the model beat every baseline, without a warning', () => {
    const { stdout, summary } = run([]);
    expect(summary.evaluation.beaten_by_baseline).toBe(false);
    expect(stdout).toMatch(/^Verdict: the model beat every baseline on the holdout \(MASE /m);
    expect(summary.warnings.some((w: string) => /baseline beat the model/.test(w))).toBe(false);
  });

  it('by default names the combination with its members and shares, and calibrated bands', () => {
    const { stdout, summary, model } = run([]);
    expect(stdout).toMatch(/^Point forecast: a combination of \d+ structures’ forecasts/m);
    expect(stdout).toMatch(/^Point forecast members \(share of the point, group, structure\):/m);
    expect(stdout).toMatch(/\[asserted\]/);
    const point = summary.forecast.point;
    expect(point.kind).toBe('combined');
    const total = point.members.reduce((s: number, m: { share: number }) => s + m.share, 0);
    expect(total).toBeCloseTo(1, 9);
    expect(point.members.find((m: { asserted: boolean }) => m.asserted).share).toBeCloseTo(point.asserted_share, 12);
    expect(summary.forecast.bands.method).toBe('calibrated');
    expect(summary.forecast.bands.calibration.origins).toBeGreaterThan(10);
    expect(model.body.meta.point.kind).toBe('combined');
    expect(model.body.meta.intervalMethod).toBe('calibrated');
  });

  it('--point asserted forecasts the asserted equation alone and says so', () => {
    const { stdout, summary, model } = run(['--point', 'asserted']);
    expect(stdout).toMatch(/^Point forecast: the asserted equation’s own path\./m);
    expect(stdout).not.toMatch(/Point forecast members/);
    expect(summary.forecast.point.kind).toBe('asserted');
    expect(summary.forecast.point.asserted_share).toBe(1);
    expect(model.body.combination).toBeUndefined();
  });

  it('--bands analytic takes the asserted equation’s own bands and says they ignore estimation and structure uncertainty', () => {
    const { stdout, summary, model } = run(['--bands', 'analytic']);
    expect(stdout).toMatch(/^Bands: 50 % and 90 %, from the asserted equation alone \(analytic, under certainty equivalence/m);
    expect(summary.forecast.bands.method).toBe('analytic');
    expect(summary.forecast.bands.calibration).toBeNull();
    expect(model.body.meta.intervalMethod).toBe('analytic');
  });

  it('warns when a baseline beats the model on the holdout and flags it in summary.json', () => {
    // With the ARX family alone, the demo's linear trend overshoots the saturating data and the
    // seasonal naive forecast wins the 24-month holdout.
    const { stdout, summary } = run(['--families', 'arx']);
    expect(summary.evaluation.beaten_by_baseline).toBe(true);
    expect(summary.evaluation.best_baseline.name).toBe('last-season');
    expect(summary.evaluation.best_baseline.mase).toBeLessThan(summary.evaluation.model_mase);
    expect(summary.warnings.some((w: string) => /^the last-season baseline beat the model on the holdout: MASE \d/.test(w))).toBe(true);
    expect(stdout).toMatch(/^Verdict: the last-season baseline beat the model on the holdout/m);
  });

  it('rejects an unknown --point or --bands with one line and exit 2', () => {
    const a = runCli(['forecast', ...demoArgs, '--point', 'mean']);
    expect(a.code).toBe(2);
    expect(a.stderr).toMatch(/--point has an unusable value/);
    const b = runCli(['forecast', ...demoArgs, '--bands', 'wide']);
    expect(b.code).toBe(2);
    expect(b.stderr).toMatch(/--bands has an unusable value/);
  });
});
