import { describe, expect, it } from 'vitest';
import { update } from '../../src/forecast/update.js';
import { serializeModel, type ModelBody } from '../../src/store/model-file.js';
import { bodyOn, NOW, rowsOf, simulateArx } from './update-fixtures.js';

// A body returned by `update` is read back by the next update; these check that the result
// never depends on whether that body is fresh, reused, copied or edited in place.
describe('update of a body a previous update returned', () => {
  const sim = simulateArx(300, 11);
  const first = () => update(bodyOn(sim.series, 240), rowsOf(sim.series, 240, 241), { now: NOW, skipForecast: true }).body;
  const next = (body: ModelBody) => update(body, rowsOf(sim.series, 241, 242), { now: NOW });

  it('gives the same body and forecast as an update of a structured copy, also when repeated', () => {
    const body = first();
    const copy = structuredClone(body);
    const a = next(body);
    const b = next(body);
    const c = next(copy);
    expect(serializeModel(a.body)).toBe(serializeModel(c.body));
    expect(serializeModel(b.body)).toBe(serializeModel(c.body));
    expect(Array.from(a.forecast!.paths.point)).toEqual(Array.from(c.forecast!.paths.point));
    expect(a.steps).toEqual(c.steps);
  });

  it('follows learning state and spec edited in place', () => {
    const body = first();
    body.theta[0] += 0.25;
    body.P[0][0] *= 2;
    body.state.rlsRss = Number(body.state.rlsRss) * 3;
    const edited = next(body);
    const fresh = next(structuredClone(body));
    expect(serializeModel(edited.body)).toBe(serializeModel(fresh.body));
    expect(edited.steps[0].innovation).toBe(fresh.steps[0].innovation);

    const other = first();
    (other.structure as Record<string, unknown>).trend = false;
    expect(() => next(other)).toThrow();
  });
});
