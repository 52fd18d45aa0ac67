/**
 * A saved model carries the members of `certa forecast`'s combined point forecast, and updates
 * forecast with the same combination: the same point when nothing new arrived, the asserted
 * member learning while the others keep their coefficients, and a re-search replacing them.
 */
import { describe, expect, it } from 'vitest';
import { sliceSeries } from '../../src/data/series.js';
import { forecastSeries } from '../../src/forecast/pipeline.js';
import { replacesOwn } from '../../src/forecast/combine.js';
import { update } from '../../src/forecast/update.js';
import { modelBody, storedCombination } from '../../src/store/asserted.js';
import { MODEL_VERSION, parseModel, serializeModel, type ModelBody } from '../../src/store/model-file.js';
import { NOW, rowsOf, simulateArx } from './update-fixtures.js';

const roundTrip = (body: ModelBody) => parseModel(serializeModel(body), 'model.json');

/** `certa forecast`'s model file for the first n points, combination included. */
function forecastBody(n: number, shift: { levelShift: number; shiftAt: number } | null = null): { body: ModelBody; point: Float64Array; run: ReturnType<typeof forecastSeries> } {
  const { series } = simulateArx(160, 5, shift ?? {});
  const head = sliceSeries(series, 0, n);
  const plain = { ...head, inputs: [] };
  const run = forecastSeries(plain, { holdout: 0, horizon: 12 });
  const c = run.forecast.combination;
  expect(c !== null && replacesOwn(c, run.asserted.structure.key)).toBe(true);
  const a = run.asserted;
  const body = modelBody({ structure: a.structure, learner: a.learner, se: a.estimate.se }, plain, {
    criterion: run.search.criterion,
    criterionValue: run.search.winner.result.score,
    now: NOW,
    meta: { horizon: 12, levels: [80, 95] },
    combination: storedCombination(c!.members),
  });
  return { body: roundTrip(body), point: run.forecast.paths.point, run };
}

describe('update with a saved combination', () => {
  it('writes the current format version (3) with the used members, each with spec, coefficients, group and weight', () => {
    const { body, run } = forecastBody(120);
    expect(JSON.parse(serializeModel(body)).version).toBe(MODEL_VERSION);
    expect(MODEL_VERSION).toBe(3);
    const used = run.forecast.combination!.members.filter((m) => !m.excluded && m.weight > 0);
    expect(body.combination!.members.map((m) => m.key)).toEqual(used.map((m) => m.key));
    expect(body.combination!.members.some((m) => m.key === run.asserted.structure.key)).toBe(true);
  });

  it('with no new rows forecasts exactly the point certa forecast delivered', () => {
    const { body, point } = forecastBody(120);
    const { series } = simulateArx(160, 5);
    const same = { ...rowsOf(series, 100, 120), inputs: [] };
    const r = update(body, same, { now: NOW });
    expect(r.added).toBe(0);
    expect(r.forecast!.combination).not.toBeNull();
    for (let k = 0; k < 12; k++) expect(r.forecast!.paths.point[k]).toBeCloseTo(point[k], 9);
  });

  it('after new rows: the point is the combination continued from the new data, the bands the asserted ones moved onto it', () => {
    const { body } = forecastBody(120);
    const { series } = simulateArx(160, 5);
    const next = { ...rowsOf(series, 120, 130), inputs: [] };
    const r = update(body, next, { now: NOW, intervals: { method: 'analytic' } });
    expect(r.added).toBe(10);
    const c = r.forecast!.combination!;
    expect(c).not.toBeNull();
    // The stored members are carried into the new body unchanged.
    expect(r.body.combination).toEqual(body.combination);
    // The asserted member forecasts with the learnt θ: its path is the asserted structure's own.
    const own = update(body, next, { now: NOW, intervals: { method: 'analytic' } });
    const assertedKey = r.policy.after.key;
    const member = c.members.find((m) => m.key === assertedKey)!;
    expect(Array.from(member.theta)).toEqual(Array.from(own.body.theta));
    // Shares sum to one; the point lies within the members' forecasts; band widths unchanged by the move.
    const used = c.members.filter((m) => !m.excluded);
    expect(used.reduce((a, m) => a + m.share, 0)).toBeCloseTo(1, 12);
    for (let k = 0; k < 12; k++) {
      const xs = used.map((m) => m.forecast[k]);
      expect(r.forecast!.paths.point[k]).toBeGreaterThanOrEqual(Math.min(...xs) - 1e-9);
      expect(r.forecast!.paths.point[k]).toBeLessThanOrEqual(Math.max(...xs) + 1e-9);
      expect(r.forecast!.paths.point[k]).toBeCloseTo(c.point[k], 12);
    }
  });

  it('a model without a combination (format version 1) still reads and forecasts from the asserted equation', () => {
    const { body } = forecastBody(120);
    const { combination: _dropped, ...plain } = body;
    void _dropped;
    const env = JSON.parse(serializeModel(plain as ModelBody));
    env.version = 1;
    const old = parseModel(JSON.stringify(env), 'model.json');
    expect(old.combination).toBeUndefined();
    const { series } = simulateArx(160, 5);
    const r = update(old, { ...rowsOf(series, 120, 121), inputs: [] }, { now: NOW });
    expect(r.forecast!.combination).toBeNull();
    expect(r.body.combination).toBeUndefined();
  });

  it('leaves out, with the reason, a stored member whose coefficients do not fit its structure', () => {
    const { body, run } = forecastBody(120);
    const i = body.combination!.members.findIndex((m) => m.theta.length > 0 && m.key !== run.asserted.structure.key);
    expect(i).toBeGreaterThanOrEqual(0);
    const bad = structuredClone(body);
    bad.combination!.members[i].theta = bad.combination!.members[i].theta.slice(1);
    const { series } = simulateArx(160, 5);
    const r = update(roundTrip(bad), { ...rowsOf(series, 120, 121), inputs: [] }, { now: NOW });
    const left = r.forecast!.combination!.members[i];
    expect(left.excluded).toMatch(/saved coefficients/);
    expect(left.share).toBe(0);
  });

  it('refuses an empty member list in the model file', () => {
    const { body } = forecastBody(120);
    expect(() => roundTrip({ ...body, combination: { members: [] } })).toThrow(/combination/);
  });

  it('a re-search after a drift alarm replaces the members by the new search’s, estimated on the window', () => {
    const shift = { levelShift: 40, shiftAt: 120 };
    const { body } = forecastBody(120, shift);
    const { series } = simulateArx(160, 5, shift);
    const r = update(body, { ...rowsOf(series, 120, 150), inputs: [] }, { now: NOW, onDrift: 'research' });
    expect(r.alarms.length).toBeGreaterThan(0);
    expect(r.policy.name).toBe('research');
    const members = r.body.combination!.members;
    expect(members).not.toEqual(body.combination!.members);
    expect(members.some((m) => m.key === r.policy.after.key)).toBe(true);
    expect(r.forecast!.combination).not.toBeNull();
    // The new members read back from the file.
    expect(roundTrip(r.body).combination).toEqual(r.body.combination);
  });
});
