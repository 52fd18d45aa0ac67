import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { sliceSeries, type Series } from '../../src/data/series.js';
import { parseM3 } from '../../src/evaluate/m3.js';
import { searchSeasons } from '../../src/select/seasons.js';
import { combinationMembers } from '../../src/forecast/combine.js';
import { createRng } from '../../src/linalg/random.js';
import { ArxStructure, validateArxSpec } from '../../src/models/arx.js';
import { structureFromSpec } from '../../src/models/registry.js';
import { calibrate, calibratedBands, calibrationSubset, memberSpread, originGrid, OriginPaths, profileOf, rollingErrors, type RollingErrors } from '../../src/forecast/calibrate.js';
import { forecastSeries } from '../../src/forecast/pipeline.js';
import { normalQuantile } from '../../src/forecast/normal.js';

function asSeries(values: Float64Array): Series {
  return { name: 'sim', frequency: 'index', season: null, time: Float64Array.from(values, (_, i) => i), values, inputs: [] };
}

function ar1(seed: number, n: number, phi: number, c: number, sigma = 1): Float64Array {
  const rng = createRng(seed);
  const y = new Float64Array(n);
  let prev = c / (1 - phi);
  for (let burn = 0; burn < 50; burn++) prev = c + phi * prev + sigma * rng.normal();
  for (let t = 0; t < n; t++) {
    prev = c + phi * prev + sigma * rng.normal();
    y[t] = prev;
  }
  return y;
}

const ar1Structure = new ArxStructure(
  validateArxSpec({ family: 'arx', ar: 1, inputs: [], trend: false, harmonics: 0, season: null, seasonalLag: false, differencing: 'none', transform: 'none' }),
);
const randomWalk = structureFromSpec({ family: 'damped', damped: false, transform: 'none' });

/** Hand-made rolling errors on one scale, no members' spread. */
function rolled(errors: number[][]): RollingErrors {
  return {
    actual: errors.map((l) => l.map(() => 1)),
    point: errors.map((l) => l.map(() => 1)),
    none: { scale: 'none', errors, spreads: errors.map((l) => l.map(() => 0)) },
    log: null,
    origins: errors[0].length,
    firstOrigin: 0,
  };
}

describe('profileOf', () => {
  it('fits the power law exactly when the mean squared error grows as k (a random walk: variance kσ²)', () => {
    // Lead k errors ±√k: MS_k = k exactly, so ln MS_k = 0 + 1·ln k and s_k = √k.
    const errors = [1, 2, 3, 4].map((k) => [Math.sqrt(k), -Math.sqrt(k), Math.sqrt(k), -Math.sqrt(k)]);
    const c = profileOf(rolled(errors).none, rolled(errors), [80], { smallSample: false, spread: 'none' });
    expect(c.growth).toBeCloseTo(1, 12);
    for (let k = 1; k <= 4; k++) expect(c.profile[k - 1]).toBeCloseTo(Math.sqrt(k), 12);
  });

  it('takes the ⌈(N+1)L⌉-th smallest score as the conformal multiplier', () => {
    // Lead-1 errors 1 … 19 with a flat profile; the profile is their RMS, so scores are e / RMS.
    const e = Array.from({ length: 19 }, (_, i) => i + 1);
    const c = profileOf(rolled([e]).none, rolled([e]), [50, 95], { smallSample: false, spread: 'none', prior: 0 });
    const rms = Math.sqrt(e.reduce((s, x) => s + x * x, 0) / e.length);
    expect(c.profile[0]).toBeCloseTo(rms, 12);
    // N = 19: L = 0.5 → rank 10, L = 0.95 → rank 19.
    expect(c.multipliers[0]).toMatchObject({ rule: 'conformal' });
    expect(c.multipliers[0].q).toBeCloseTo(10 / rms, 12);
    expect(c.multipliers[1].q).toBeCloseTo(19 / rms, 12);
  });

  it('falls back to a Gaussian multiplier when there are too few scores for the rank', () => {
    const e = [1, -1, 1];
    const c = profileOf(rolled([e]).none, rolled([e]), [95], { smallSample: false, spread: 'none', prior: 0 });
    // ⌈4·0.95⌉ = 4 > 3 scores; every score is 1, so q = z·1·√(1 + 1/3).
    expect(c.multipliers[0].rule).toBe('gaussian');
    expect(c.multipliers[0].q).toBeCloseTo(normalQuantile(0.975) * Math.sqrt(4 / 3), 12);
  });
});

describe('rollingErrors', () => {
  it('refits each origin on its past only: a random walk’s lead-k errors are the sums of k later shocks', () => {
    const rng = createRng(3);
    const y = new Float64Array(60);
    for (let t = 1; t < 60; t++) y[t] = y[t - 1] + rng.normal();
    const r = rollingErrors([{ structure: randomWalk, estimate: { active: [] }, share: 1 }], asSeries(y), 1, 3);
    expect(r).not.toBeNull();
    // Without coefficients the random walk forecasts y_{o−1} at every lead: e_{o,k} = y_{o+k−1} − y_{o−1}.
    const o = r!.firstOrigin;
    expect(r!.none.errors[0][0]).toBeCloseTo(y[o] - y[o - 1], 12);
    expect(r!.none.errors[2][0]).toBeCloseTo(y[o + 2] - y[o - 1], 12);
    expect(r!.log).toBeNull(); // the walk crosses zero: no log scale
  });

  it('gives a random walk the √k profile of its error variance kσ² (Box & Jenkins 1970, §5.2), within sampling error', () => {
    const rng = createRng(11);
    const n = 3000;
    const y = new Float64Array(n);
    for (let t = 1; t < n; t++) y[t] = y[t - 1] + 2 * rng.normal();
    const c = calibrate([{ structure: randomWalk, estimate: { active: [] }, share: 1 }], asSeries(y), 1, 6, [95], { smallSample: false, maxOrigins: 5000 });
    expect(c).not.toBeNull();
    expect(c!.scale).toBe('none');
    expect(c!.growth).toBeGreaterThan(0.85);
    expect(c!.growth).toBeLessThan(1.15);
    for (let k = 1; k <= 6; k++) {
      // Within 10 %: about 3000 overlapping errors per lead.
      expect(c!.profile[k - 1] / (2 * Math.sqrt(k))).toBeGreaterThan(0.9);
      expect(c!.profile[k - 1] / (2 * Math.sqrt(k))).toBeLessThan(1.1);
    }
    // Gaussian shocks: the 95 % multiplier of the scores is near z = 1.96.
    expect(c!.multipliers[0].q).toBeGreaterThan(1.8);
    expect(c!.multipliers[0].q).toBeLessThan(2.15);
  });
});

describe('calibrated bands on simulated AR(1) series (known truth)', () => {
  it('cover the next values about as often as their level says, over 300 seeded series', () => {
    // AR(1) y_t = 2 + 0.7 y_{t−1} + e_t, e ~ N(0, 1), 80 points; one 6-step forecast from the end.
    let in80 = 0;
    let in95 = 0;
    let count = 0;
    for (let seed = 1; seed <= 300; seed++) {
      const y = ar1(seed, 86, 0.7, 2);
      const train = asSeries(y.slice(0, 80));
      const est = ar1Structure.estimate(train, 1, 80);
      const c = calibrate([{ structure: ar1Structure, estimate: est, share: 1 }], train, 1, 6, [80, 95]);
      expect(c).not.toBeNull();
      const point = ar1Structure.simulate(est.theta, train, [], 6);
      const [b80, b95] = calibratedBands(point, c!, [80, 95]);
      for (let k = 0; k < 6; k++) {
        const x = y[80 + k];
        if (x >= b80.lower[k] && x <= b80.upper[k]) in80++;
        if (x >= b95.lower[k] && x <= b95.upper[k]) in95++;
        count++;
      }
    }
    // Nominal 80 % and 95 %; the bands may err a little on the safe side (the small-sample widening).
    expect(in80 / count).toBeGreaterThan(0.76);
    expect(in80 / count).toBeLessThan(0.88);
    expect(in95 / count).toBeGreaterThan(0.93);
    expect(in95 / count).toBeLessThan(0.985);
  });

  it('picks the log scale for multiplicative noise on a growing series and the original scale for additive noise near zero', () => {
    const rng = createRng(5);
    const grow = Float64Array.from({ length: 120 }, (_, t) => 100 * Math.exp(0.03 * t + 0.1 * rng.normal()));
    const logAr = structureFromSpec({ family: 'damped', damped: false, drift: true, transform: 'log' });
    const g = calibrate([{ structure: logAr, estimate: logAr.estimate(asSeries(grow), 1, 120), share: 1 }], asSeries(grow), 1, 4, [95]);
    expect(g!.scale).toBe('log');
    const flat = Float64Array.from({ length: 120 }, () => 3 + rng.normal());
    const positive = flat.map((v) => Math.max(v, 0.05));
    const est = ar1Structure.estimate(asSeries(positive), 1, 120);
    const f = calibrate([{ structure: ar1Structure, estimate: est, share: 1 }], asSeries(positive), 1, 4, [95]);
    expect(f!.scale).toBe('none');
  });
});

describe('memberSpread', () => {
  it('is the share-weighted root mean square distance of the members from the point', () => {
    const point = Float64Array.of(10);
    const s = memberSpread([{ share: 0.5, forecast: [8] }, { share: 0.5, forecast: [12] }], point, 'none');
    expect(s[0]).toBeCloseTo(2, 12);
    const l = memberSpread([{ share: 0.5, forecast: [5] }, { share: 0.5, forecast: [20] }], point, 'log');
    expect(l[0]).toBeCloseTo(Math.sqrt(0.5 * Math.log(0.5) ** 2 + 0.5 * Math.log(2) ** 2), 12);
  });
});

describe('forecastSeries with calibrated bands (the default)', () => {
  it('says the bands are calibrated and keeps the delivered point inside them', () => {
    const y = ar1(9, 60, 0.6, 4);
    const run = forecastSeries(asSeries(y), { holdout: 0, horizon: 5 });
    expect(run.forecast.paths.method).toBe('calibrated');
    expect(run.forecast.paths.calibration?.origins).toBeGreaterThan(10);
    for (const b of run.forecast.paths.bands) {
      for (let k = 0; k < 5; k++) {
        expect(b.lower[k]).toBeLessThan(run.forecast.paths.point[k]);
        expect(b.upper[k]).toBeGreaterThan(run.forecast.paths.point[k]);
      }
    }
    const [b80, b95] = run.forecast.paths.bands;
    for (let k = 0; k < 5; k++) expect(b95.upper[k] - b95.lower[k]).toBeGreaterThan(b80.upper[k] - b80.lower[k]);
  });

  it('keeps the asserted equation’s own bands when asked (analytic)', () => {
    const y = ar1(9, 60, 0.6, 4);
    const run = forecastSeries(asSeries(y), { holdout: 0, horizon: 5, combine: false, intervals: { method: 'analytic' } });
    expect(run.forecast.paths.method).toBe('analytic');
    expect(run.forecast.paths.calibration).toBeUndefined();
  });
});

describe('originGrid / calibrationSubset', () => {
  it('takes every origin when few, else every s-th from the anchor with s the smallest power of two leaving at most the limit', () => {
    expect(originGrid(1, 5, 9, 10)).toEqual([5, 6, 7, 8]);
    // 100 positions 10 … 109 from anchor 2: s = 4 leaves 25 > 24, s = 8 leaves 13.
    const o = originGrid(2, 10, 110, 24);
    expect(o).toHaveLength(13);
    expect(o[0]).toBe(10);
    for (let i = 1; i < o.length; i++) expect(o[i] - o[i - 1]).toBe(8);
    expect(o[o.length - 1]).toBe(106);
    expect(originGrid(0, 3, 3, 24)).toEqual([]);
  });

  it('gives a shorter history of the same series (a superset of) the origins of a longer one up to its end', () => {
    for (const [first, short, long] of [
      [12, 96, 120],
      [30, 50, 51],
      [7, 40, 200],
    ]) {
      const a = originGrid(4, first, short, 24);
      const b = originGrid(4, first, long, 24).filter((o) => o < short);
      for (const o of b) expect(a).toContain(o);
    }
  });

  it('keeps each group’s largest members and gives them the whole group’s share', () => {
    const m = (share: number, group: string) => ({ structure: ar1Structure, estimate: { active: [true, true] }, share, group });
    const kept = calibrationSubset([m(0.3, 'a'), m(0.15, 'a'), m(0.05, 'a'), m(0.4, 'b'), m(0.1, 'b')], 2, 0.9);
    // Group a (0.5): 0.3 and 0.15 kept (0.45 = 90 %), scaled by 0.5/0.45; group b (0.5): 0.4 then 0.1 (80 % < 90 %).
    expect(kept.map((k) => k.share)).toEqual([0.3 / 0.9, 0.15 / 0.9, 0.4, 0.1].map((x) => expect.closeTo(x, 12)));
    expect(kept.reduce((s, k) => s + k.share, 0)).toBeCloseTo(1, 12);
  });
});

describe('OriginPaths: the holdout’s and the final calibration share members’ paths', () => {
  // M3 monthly series N 1402 (datasets/m3, development half): 20 % held out as the pipeline does.
  const m3 = parseM3(readFileSync(new URL('../../datasets/m3/M3Month-dev.csv', import.meta.url), 'utf8'), 'monthly', 'M3Month-dev.csv');
  const whole = m3[0].series;
  const n = whole.values.length;
  const nTrain = n - Math.min(24, Math.floor(0.2 * n));
  const train = sliceSeries(whole, 0, nTrain);
  const found = searchSeasons(train);
  const members = combinationMembers(found.ranking).map((m) => ({ ...m, share: m.weight }));
  const from = found.sample.from;

  it('gives every structure of the search a path over fewer steps that is the first steps of a longer one (what sharing relies on)', () => {
    let checked = 0;
    for (const c of found.ranking) {
      if (c.estimate === undefined || c.structure === undefined) continue;
      const past = sliceSeries(whole, 0, nTrain);
      const future = whole.inputs.map((i) => i.values.subarray(nTrain));
      let long: Float64Array;
      try {
        long = c.structure.simulate(c.estimate.theta, past, future, 18);
      } catch {
        continue;
      }
      const short = c.structure.simulate(c.estimate.theta, past, future, 7);
      expect(Array.from(long.subarray(0, 7))).toEqual(Array.from(short));
      checked++;
    }
    expect(checked).toBeGreaterThan(50);
    expect(new Set(found.ranking.map((c) => c.structure?.family)).size).toBeGreaterThanOrEqual(4);
  });

  it('leaves the calibration of the shorter history exactly as it is alone, though its paths were simulated past its end', () => {
    const shared = new OriginPaths(whole, from, 24);
    const alone = calibrate(members, train, from, 24, [80, 95]);
    const withShared = calibrate(members, train, from, 24, [80, 95], {}, shared);
    expect(alone).not.toBeNull();
    expect(withShared).toEqual(alone);
  });

  it('serves the final calibration mostly from paths already made, within rounding of a fresh one', () => {
    const shared = new OriginPaths(whole, from, 24);
    calibrate(members, train, from, 24, [80, 95], {}, shared);
    let simulations = 0;
    const counting = members.map((m) => ({
      ...m,
      structure: Object.assign(Object.create(Object.getPrototypeOf(m.structure)), m.structure, {
        simulate: (...a: Parameters<typeof m.structure.simulate>) => {
          simulations++;
          return m.structure.simulate(...a);
        },
      }),
    }));
    const fresh = calibrate(members, whole, from, 24, [80, 95])!;
    const reused = calibrate(counting, whole, from, 24, [80, 95], {}, shared)!;
    expect(reused.origins).toBe(fresh.origins);
    expect(reused.scale).toBe(fresh.scale);
    for (let k = 0; k < 24; k++) expect(reused.profile[k]).toBeCloseTo(fresh.profile[k], 6);
    reused.multipliers.forEach((m, i) => expect(m.q).toBeCloseTo(fresh.multipliers[i].q, 6));
    // Only the origins after the shorter history's last shared one needed new simulations.
    expect(simulations).toBeGreaterThan(0);
    expect(simulations).toBeLessThan(0.5 * fresh.origins * calibrationSubset(members, 1, 0.9).length);
  });
});
