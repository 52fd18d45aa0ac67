import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Series } from '../../src/data/series.js';
import { createRng } from '../../src/linalg/random.js';
import { search } from '../../src/select/search.js';
import { forecastSeries } from '../../src/forecast/pipeline.js';
import { combinationMembers, combineForecasts, combineRanking, groupOf, isExplosivePath, leavesPositive, leavesRecord, usesInputs } from '../../src/forecast/combine.js';
import { akaikeWeights } from '../../src/select/criteria.js';

function series(values: number[]): Series {
  return {
    name: 'y',
    frequency: 'index',
    season: null,
    time: Float64Array.from(values, (_, i) => i),
    values: Float64Array.from(values),
    inputs: [],
  };
}

const rng = createRng(7);
const noisy = series(Array.from({ length: 40 }, (_, t) => 10 + 0.3 * t + rng.normal()));

describe('isExplosivePath', () => {
  it('accepts a path continuing the trend and refuses one that moves more than k·range in k steps', () => {
    expect(isExplosivePath([1, 2, 3], [4, 5])).toBe(false);
    expect(isExplosivePath([1, 2, 3], [4, 1e6])).toBe(true);
    expect(isExplosivePath([1, 2, 3], [Infinity])).toBe(true);
  });
});

describe('leavesPositive', () => {
  it('refuses a path that reaches zero or below only when the whole history is positive', () => {
    expect(leavesPositive([3, 2, 1], [0.5, 0.2])).toBe(false);
    expect(leavesPositive([3, 2, 1], [0.5, -0.2])).toBe(true);
    expect(leavesPositive([3, 2, 1], [0])).toBe(true);
    expect(leavesPositive([3, 0, 1], [-1])).toBe(false);
    expect(leavesPositive([-3, -2], [-5])).toBe(false);
  });

  it('leaves such a member out of the combination', () => {
    const found = search(noisy, { families: ['arx'], transform: 'none' });
    const members = combinationMembers(found.ranking, { maxMembers: 3 });
    const bad = members[1].key;
    const history = [10, 1, 10, 1, 5];
    const c = combineForecasts(members, 2, (s) => (s.key === bad ? Float64Array.of(4, -1) : Float64Array.of(6, 6)), history);
    expect(c.members[1].excluded).toMatch(/zero or below/);
    expect(c.members[1].share).toBe(0);
    for (const v of c.point) expect(v).toBeCloseTo(6, 12);
  });
});

describe('leavesRecord', () => {
  it('refuses a path beyond twice the largest or below half the smallest value of a positive history', () => {
    expect(leavesRecord([4, 5, 8], [9, 16])).toBe(false);
    expect(leavesRecord([4, 5, 8], [9, 16.01])).toBe(true);
    expect(leavesRecord([4, 5, 8], [2])).toBe(false);
    expect(leavesRecord([4, 5, 8], [1.99])).toBe(true);
    expect(leavesRecord([4, 5, 8], [30], 4)).toBe(false);
    expect(leavesRecord([4, 5, 8], [1e9], Infinity)).toBe(false);
    // A history with a value ≤ 0 has no record range on the ratio scale.
    expect(leavesRecord([4, 0, 8], [100])).toBe(false);
  });

  it('leaves such a member out of the combination unless the factor allows it', () => {
    const found = search(noisy, { families: ['arx'], transform: 'none' });
    const members = combinationMembers(found.ranking, { maxMembers: 3 });
    const bad = members[1].key;
    // Range 15, so the bad path (41 > 2·20) does not explode (|41 − 19| ≤ 2·15) but leaves the record.
    const history = [5, 20, 18, 19];
    const path = (s: { key: string }) => (s.key === bad ? Float64Array.of(33, 41) : Float64Array.of(15, 15));
    const c = combineForecasts(members, 2, path, history);
    expect(c.members[1].excluded).toMatch(/twice the largest/);
    for (const v of c.point) expect(v).toBeCloseTo(15, 12);
    const wide = combineForecasts(members, 2, path, history, { recordFactor: 3 });
    expect(wide.members[1].excluded).toBeUndefined();
    expect(() => combineForecasts(members, 2, path, history, { recordFactor: 0.5 })).toThrow(RangeError);
  });
});

describe('combinationMembers', () => {
  it('takes candidates best first until their Akaike weights cover the mass', () => {
    const found = search(noisy, { families: ['arx'], transform: 'none' });
    const members = combinationMembers(found.ranking, { mass: 0.9 });
    expect(members[0].key).toBe(found.winner.result.key);
    let before = 0;
    for (let i = 0; i < members.length - 1; i++) before += members[i].weight;
    expect(before).toBeLessThan(0.9);
    expect(members.length).toBeLessThanOrEqual(found.fitted);
  });

  it('with mass 0 keeps the winner alone, so the combination is the winner’s forecast', () => {
    const found = search(noisy, { families: ['arx'], transform: 'none' });
    const c = combineRanking(found.ranking, noisy, 5, { mass: 0 });
    const own = found.winner.structure.simulate(found.winner.estimate.theta, noisy, [], 5);
    expect(c.members.length).toBe(1);
    expect(Array.from(c.point)).toEqual(Array.from(own));
  });
});

describe('combineForecasts', () => {
  const found = search(noisy, { families: ['arx'], transform: 'none' });
  const members = combinationMembers(found.ranking, { maxMembers: 3 });

  it('is the weight-normalised mean of the members’ forecasts', () => {
    const c = combineForecasts(members, 2, (s, e) => s.simulate(e.theta, noisy, [], 2), noisy.values);
    const total = members.reduce((a, m) => a + m.weight, 0);
    for (let k = 0; k < 2; k++) {
      const want = members.reduce((a, m) => a + (m.weight / total) * m.structure.simulate(m.estimate.theta, noisy, [], 2)[k], 0);
      expect(c.point[k]).toBeCloseTo(want, 10);
    }
    expect(c.members.reduce((a, m) => a + m.share, 0)).toBeCloseTo(1, 12);
  });

  it('leaves out an exploding member and renormalises the others', () => {
    const bad = members[0].key;
    const c = combineForecasts(
      members,
      2,
      (s, e) => (s.key === bad ? Float64Array.of(1e9, 1e18) : s.simulate(e.theta, noisy, [], 2)),
      noisy.values,
    );
    expect(c.members[0].excluded).toBe('explosive simulated path');
    expect(c.members[0].share).toBe(0);
    expect(c.members.slice(1).reduce((a, m) => a + m.share, 0)).toBeCloseTo(1, 12);
    expect(c.point.every(Number.isFinite)).toBe(true);
  });
});

describe('two-level weights: Akaike weights within a group, tempered weights across groups', () => {
  const found = search(noisy, { families: ['arx', 'damped'] });
  const groups = ['arx', 'arx|log', 'damped', 'damped|log'];

  it('groups candidates by family and the scale of their equation', () => {
    const members = combinationMembers(found.ranking, { maxDelta: Infinity });
    expect([...new Set(members.map((m) => m.group))].sort()).toEqual(groups);
    for (const m of members) expect(m.group).toBe(groupOf(m.structure));
    // An ODE scored on the log scale has the same dynamics as on the original scale: one group.
    const odes = combinationMembers(search(noisy, { families: ['ode'] }).ranking, { mass: 1, maxMembers: 1000 });
    expect(odes.some((m) => m.structure.transform === 'log')).toBe(true);
    expect(new Set(odes.map((m) => m.group))).toEqual(new Set(['ode']));
  });

  it('weights each group’s candidates by Akaike weights over that group alone', () => {
    const members = combinationMembers(found.ranking, { mass: 1, maxMembers: 1000, maxDelta: Infinity });
    for (const group of groups) {
      const mine = members.filter((m) => m.group === group);
      const all = found.ranking.filter((r) => r.status === 'fitted' && groupOf(r.structure) === group);
      // Members are the group's ranking from its best on (the tail past the covered mass left out).
      expect(mine.length).toBeGreaterThan(0);
      expect(mine.map((m) => m.key)).toEqual(all.slice(0, mine.length).map((r) => r.key));
      const want = akaikeWeights(all.map((r) => r.score));
      mine.forEach((m, i) => expect(m.weight).toBeCloseTo(want[i], 12));
    }
  });

  /** The distance of each group's best candidate to the overall best. */
  const groupBest = new Map<string, number>();
  for (const r of found.ranking) if (r.status === 'fitted' && !groupBest.has(groupOf(r.structure))) groupBest.set(groupOf(r.structure), r.delta);
  const groupPoints = groups.map((group) => {
    const own = combineRanking(found.ranking.filter((r) => groupOf(r.structure) === group), noisy, 3);
    expect(own.groups).toBe(1);
    return own.point;
  });

  it('with across: equal gives each group an equal share, so the point is the mean of the group forecasts', () => {
    const c = combineRanking(found.ranking, noisy, 3, { across: 'equal' });
    expect(c.groups).toBe(groups.length);
    for (let k = 0; k < 3; k++) expect(c.point[k]).toBeCloseTo(groupPoints.reduce((a, p) => a + p[k], 0) / groups.length, 10);
    for (const group of groups) {
      expect(c.members.filter((m) => m.group === group).reduce((a, m) => a + m.share, 0)).toBeCloseTo(1 / groups.length, 12);
    }
  });

  // The tempered weights written out by hand: v_g ∝ exp(−Δ_g/(2τ)) over the groups' best Δ.
  it('by default weights group g by exp(−Δ_g/20), Δ_g its best candidate behind the overall best', () => {
    const c = combineRanking(found.ranking, noisy, 3);
    expect(c.groups).toBe(groups.length);
    const raw = groups.map((g) => Math.exp(-(groupBest.get(g) as number) / 20));
    const total = raw.reduce((a, v) => a + v, 0);
    groups.forEach((group, i) => {
      expect(c.members.filter((m) => m.group === group).reduce((a, m) => a + m.share, 0)).toBeCloseTo(raw[i] / total, 12);
      for (const m of c.members.filter((x) => x.group === group)) expect(m.groupWeight).toBeCloseTo(raw[i], 12);
    });
    for (let k = 0; k < 3; k++) expect(c.point[k]).toBeCloseTo(groupPoints.reduce((a, p, i) => a + (raw[i] / total) * p[k], 0), 10);
    // A stronger tempering moves the weights towards equal ones.
    const flat = combineRanking(found.ranking, noisy, 3, { temper: 1e12 });
    for (const group of groups) expect(flat.members.filter((m) => m.group === group).reduce((a, m) => a + m.share, 0)).toBeCloseTo(1 / groups.length, 9);
    expect(() => combinationMembers(found.ranking, { temper: 0.5 })).toThrow(RangeError);
  });

  it('leaves out the groups whose best candidate is more than maxDelta behind the overall best', () => {
    for (const maxDelta of [0, 10, Infinity]) {
      const kept = new Set(combinationMembers(found.ranking, { maxDelta }).map((m) => m.group));
      const want = [...groupBest].filter(([, d]) => d <= maxDelta).map(([g]) => g);
      expect([...kept].sort()).toEqual(want.sort());
    }
    expect(new Set(combinationMembers(found.ranking, { maxDelta: 0 }).map((m) => m.group))).toEqual(new Set([groupOf(found.winner.structure)]));
    // The default keeps every group (with its tempered weight), and this series has one more than 10 behind.
    expect(new Set(combinationMembers(found.ranking).map((m) => m.group)).size).toBe(groupBest.size);
    expect([...groupBest.values()].some((d) => d > 10)).toBe(true);
  });

  it('with across: evidence uses one Akaike weighting over all candidates', () => {
    const members = combinationMembers(found.ranking, { across: 'evidence', mass: 1, maxMembers: 1000 });
    expect(new Set(members.map((m) => m.group))).toEqual(new Set(['all']));
    const byKey = new Map(found.ranking.map((r) => [r.key, r.weight]));
    members.forEach((m) => expect(m.weight).toBeCloseTo(byKey.get(m.key) as number, 12));
  });

  it('drops a group whose every member is left out, and the others share its weight', () => {
    const members = combinationMembers(found.ranking);
    const c = combineForecasts(members, 2, (s, e) => (s.family === 'damped' ? Float64Array.of(NaN, NaN) : s.simulate(e.theta, noisy, [], 2)), noisy.values);
    expect(c.groups).toBe(2);
    const arx = Math.exp(-(groupBest.get('arx') as number) / 20);
    const log = Math.exp(-(groupBest.get('arx|log') as number) / 20);
    expect(c.members.filter((m) => m.group === 'arx').reduce((a, m) => a + m.share, 0)).toBeCloseTo(arx / (arx + log), 12);
    expect(c.members.filter((m) => m.group.startsWith('damped')).every((m) => m.share === 0)).toBe(true);
  });

  it('when the winner uses inputs, combines only candidates that use inputs', () => {
    const r = createRng(3);
    const u = Array.from({ length: 60 }, () => r.normal());
    const y = Array.from({ length: 60 }, (_, t) => 20 + 4 * (t > 0 ? u[t - 1] : 0) + 0.2 * r.normal());
    const s: Series = { ...series(y), inputs: [{ name: 'u', values: Float64Array.from(u) }] };
    const withInputs = search(s, { families: ['arx', 'damped'] });
    expect(usesInputs(withInputs.winner.structure)).toBe(true);
    const members = combinationMembers(withInputs.ranking);
    expect(members.length).toBeGreaterThan(0);
    expect(members.every((m) => usesInputs(m.structure))).toBe(true);
    expect(members.some((m) => m.structure.family === 'damped')).toBe(false);
  });
});

describe('forecastSeries with combination', () => {
  it('forecasts the combination and, with the asserted equation’s own bands, moves them with it; combine: false keeps the winner’s path', () => {
    const own = forecastSeries(noisy, { holdout: 0, horizon: 4, combine: false, intervals: { method: 'analytic' } });
    const mixed = forecastSeries(noisy, { holdout: 0, horizon: 4, intervals: { method: 'analytic' } });
    expect(own.forecast.combination).toBeNull();
    const c = mixed.forecast.combination;
    expect(c).not.toBeNull();
    expect(Array.from(mixed.forecast.paths.point)).toEqual(Array.from(c!.point));
    expect(Array.from(own.forecast.paths.point)).toEqual(Array.from(own.asserted.structure.simulate(own.asserted.estimate.theta, noisy, [], 4)));
    for (let j = 0; j < 4; j++) {
      const shift = mixed.forecast.paths.point[j] - own.forecast.paths.point[j];
      expect(mixed.forecast.paths.bands[0].lower[j]).toBeCloseTo(own.forecast.paths.bands[0].lower[j] + shift, 9);
      expect(mixed.forecast.paths.bands[0].upper[j] - mixed.forecast.paths.bands[0].lower[j]).toBeCloseTo(
        own.forecast.paths.bands[0].upper[j] - own.forecast.paths.bands[0].lower[j],
        9,
      );
    }
    expect(mixed.asserted.structure.key).toBe(own.asserted.structure.key);
  });
});

describe('combination invariants (property)', () => {
  const found = search(noisy, { families: ['arx', 'damped'] });
  const members = combinationMembers(found.ranking, { maxDelta: Infinity });

  // A weighted mean with non-negative shares summing to one lies between the smallest and the
  // largest member forecast at every step, whatever the members' paths.
  it('shares sum to one and the point lies within the members’ range at every step', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 1, max: 1e4, noNaN: true }), { minLength: members.length * 2, maxLength: members.length * 2 }), (values) => {
        const paths = new Map(members.map((m, i) => [m.key, Float64Array.of(values[2 * i], values[2 * i + 1])]));
        const c = combineForecasts(members, 2, (s) => paths.get(s.key) as Float64Array);
        const used = c.members.filter((m) => !m.excluded);
        expect(used.reduce((a, m) => a + m.share, 0)).toBeCloseTo(1, 9);
        for (let k = 0; k < 2; k++) {
          const xs = used.map((m) => m.forecast[k]);
          expect(c.point[k]).toBeGreaterThanOrEqual(Math.min(...xs) * (1 - 1e-12));
          expect(c.point[k]).toBeLessThanOrEqual(Math.max(...xs) * (1 + 1e-12));
        }
      }),
      { numRuns: 200, seed: 11 },
    );
  });
});
