/**
 * The demo's input effects against the generator's truth, through `certa forecast` as a user
 * runs it.
 *
 * Truth: datasets/demo/generate.ts writes
 *   installations = level_t·season_t + 55·subsidy_t + 0.9·frost_index_t + N(0, 10), rounded,
 * with level_t = 420/(1 + e^{−0.08(t − 50)}) logistic adoption: a subsidy effect of +55
 * installations while it runs and +0.9 installations per point of frost index, both immediate.
 * The gains certa reports (text, summary.json, model.json) must have these signs and lie within
 * 25 % of them.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt, runCli } from '../cli/run-cli.js';
import { parseModel } from '../../src/store/model-file.js';

const TRUTH: Record<string, number> = { subsidy: 55, frost_index: 0.9 };

beforeAll(() => ensureBuilt());

describe('certa forecast on the demo recovers the generator’s input effects (datasets/demo/generate.ts)', () => {
  it('reports gains with the generator’s signs within 25 % of +55 (subsidy) and +0.9 (frost index) in text, summary.json and model.json', () => {
    const out = mkdtempSync(join(tmpdir(), 'certa-demo-gains-'));
    const r = runCli(['forecast', 'datasets/demo/vallmark-heatpumps.csv', '--inputs', 'subsidy,frost_index', '--out', out, '--no-charts']);
    expect(r.code, r.stderr).toBe(0);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    const derived = summary.model.derived as { name: string; value: unknown }[];
    const model = parseModel(readFileSync(join(out, 'model.json'), 'utf8'), 'model.json');
    for (const [input, truth] of Object.entries(TRUTH)) {
      const gain = derived.find((d) => d.name === `gain ${input}`)?.value as number;
      expect(Math.sign(gain)).toBe(Math.sign(truth));
      expect(Math.abs(gain / truth - 1)).toBeLessThan(0.25);
      expect(r.stdout).toMatch(new RegExp(`gain ${input}: ${String(Number(gain.toPrecision(6))).replace('.', '\\.')} `));
      const effect = model.effects?.find((e) => e.input === input);
      expect(Math.abs((effect?.gain as number) / gain - 1)).toBeLessThan(1e-6);
      expect(effect?.delay).toBe(0);
    }
  });
});
