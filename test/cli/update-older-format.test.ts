/**
 * `certa update` on a model file of an older format version: the fixture
 * test/store/fixtures/model-v2-demo.json was written by the previous release (format version 2,
 * with the ARX spec of its time) from the demo data up to 2024-06; the update reads it, learns
 * the demo's rows 2024-07 to 2024-12 and writes the current format with the input effects.
 */
import { copyFileSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt, runCli } from './run-cli.js';
import { MODEL_VERSION, parseModel } from '../../src/store/model-file.js';

const fixture = 'test/store/fixtures/model-v2-demo.json';
const demo = 'datasets/demo/vallmark-heatpumps.csv';

beforeAll(() => ensureBuilt());

describe('certa update on a format-version 2 model file', () => {
  it('reads it, learns the 6 new rows and writes the current version with each input’s delay, lags and gain', () => {
    const text = readFileSync(fixture, 'utf8');
    expect(JSON.parse(text).version).toBe(2);
    const before = parseModel(text, fixture);
    expect(before.effects).toBeUndefined();
    const dir = mkdtempSync(join(tmpdir(), 'certa-v2-'));
    const model = join(dir, 'model.json');
    copyFileSync(fixture, model);
    const r = runCli(['update', model, demo, '--inputs', 'subsidy,frost_index', '--no-charts']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('6 new rows (2024-07 to 2024-12)');
    const written = JSON.parse(readFileSync(model, 'utf8'));
    expect(written.version).toBe(MODEL_VERSION);
    const after = parseModel(readFileSync(model, 'utf8'), model);
    expect(after.structure).toEqual(before.structure);
    expect(after.effects?.map((e) => [e.input, e.role, e.delay, e.lags])).toEqual([
      ['subsidy', 'lags', 0, 2],
      ['frost_index', 'lags', 0, 2],
    ]);
    for (const e of after.effects ?? []) expect(Number.isFinite(e.gain)).toBe(true);
    // The previous file is kept as it was.
    expect(readFileSync(join(dir, 'model.prev.json'), 'utf8')).toBe(text);
  });
});
