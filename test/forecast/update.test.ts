/**
 * update(body, rows, options): continuation equal to a batch fit, idempotence, overlap checks,
 * bad new data, the adapt policy's saved state, the log and the forecast.
 */
import { describe, expect, it } from 'vitest';
import { DataError, UsageError } from '../../src/data/errors.js';
import { lstsq } from '../../src/linalg/lstsq.js';
import { ArxStructure } from '../../src/models/arx.js';
import { odeStructure } from '../../src/models/ode.js';
import { sliceSeries } from '../../src/data/series.js';
import { Learner } from '../../src/forecast/online.js';
import { modelBody } from '../../src/store/asserted.js';
import { ADAPT, update } from '../../src/forecast/update.js';
import { parseModel, serializeModel, type ModelBody } from '../../src/store/model-file.js';
import { fingerprintSeries } from '../../src/store/fingerprint.js';
import { windowSeries } from '../../src/store/asserted.js';
import { bodyOn, NOW, rowsOf, simulateArx, TRUE_SPEC } from './update-fixtures.js';

const roundTrip = (body: ModelBody) => parseModel(serializeModel(body), 'model.json');

describe('update: continuation equals a batch fit', () => {
  it('100 points fitted, 50 added one row at a time through the model file (λ = 1, window 30): θ equals least squares on all 150 to 1e-8', () => {
    const { series } = simulateArx(150, 7);
    let body = roundTrip(bodyOn(series, 100, TRUE_SPEC, { windowCapacity: 30 }));
    for (let k = 100; k < 150; k++) {
      const r = update(body, rowsOf(series, k, k + 1), { now: NOW, skipForecast: k < 149 });
      expect(r.added).toBe(1);
      body = roundTrip(r.body);
    }
    const s = new ArxStructure(TRUE_SPEC);
    const reg = s.regression(series, s.history, 150);
    // independent truth: QR least squares on all 150 rows (RLS at λ = 1 equals it exactly in exact arithmetic)
    const batch = lstsq(reg.phi, reg.y, s.terms).theta;
    for (let j = 0; j < batch.length; j++) expect(Math.abs(body.theta[j] - batch[j])).toBeLessThan(1e-8 * Math.max(1, Math.abs(batch[j])));
    expect(body.window.values.length).toBe(30);
    expect(body.state.before).toBe(120);
    expect(body.series.lastTime).toBe(series.time[149]);
    // the fingerprint chain over 150 rows equals the fingerprint of the full series
    expect(body.fingerprint).toEqual(fingerprintSeries(series));
    expect(body.log).toHaveLength(50);
    // the window series continues the trend: positions in the window plus `before` are absolute times
    expect(windowSeries(body).before?.count).toBe(120);
  });

  it('a cumulative-state ODE (Bass-type, one harmonic) updated row by row through the file (window 30) ends at the batch fit on all 150 points (to 1e-8)', () => {
    // per-period adoptions of a seeded series: positive values with a yearly pattern
    const { series: raw } = simulateArx(150, 15);
    const series = { ...raw, inputs: [], values: raw.values.map((v) => Math.abs(v) + 1) };
    const s = odeStructure({ state: 'cumulative', powers: [0, 1, 2], harmonics: 1, season: 12, initialCumulative: 40 });
    const head = sliceSeries(series, 0, 100);
    const est = s.estimate(head, 1, 100);
    const learner = Learner.start(s, est.active, head, 1, 100, { lambda: 1 });
    let body = roundTrip(modelBody({ structure: s, learner, se: est.se }, head, { criterion: 'aicc', criterionValue: 0, now: NOW, windowCapacity: 30 }));
    for (let k = 100; k < 150; k++) body = roundTrip(update(body, rowsOf(series, k, k + 1), { now: NOW, skipForecast: k < 149 }).body);
    const reg = s.regression(series, 1, 150);
    const batch = lstsq(reg.phi, reg.y, s.terms).theta;
    for (let j = 0; j < batch.length; j++) expect(Math.abs(body.theta[j] - batch[j])).toBeLessThan(1e-8 * Math.max(1, Math.abs(batch[j])));
    let before = 0;
    for (let t = 0; t < 120; t++) before += series.values[t];
    expect(body.state.before).toBe(120);
    expect(Math.abs(Number(body.state.beforeSum) - before)).toBeLessThan(1e-9 * before);
  });

  it('the same 50 rows in one file give the same θ as 50 single-row updates (to 1e-12)', () => {
    const { series } = simulateArx(150, 8);
    const start = bodyOn(series, 100);
    const once = update(start, rowsOf(series, 100, 150), { now: NOW, skipForecast: true }).body;
    let step = start;
    for (let k = 100; k < 150; k++) step = update(step, rowsOf(series, k, k + 1), { now: NOW, skipForecast: true }).body;
    for (let j = 0; j < once.theta.length; j++) expect(Math.abs(once.theta[j] - step.theta[j])).toBeLessThan(1e-12 * Math.max(1, Math.abs(once.theta[j])));
    expect(once.fingerprint).toEqual(step.fingerprint);
  });
});

describe('update: overlap and idempotence', () => {
  it('a second identical update is a no-op: 0 new rows, the same body object, byte-identical file', () => {
    const { series } = simulateArx(130, 9);
    const first = update(bodyOn(series, 100), rowsOf(series, 0, 120), { now: NOW });
    expect(first.added).toBe(20);
    const again = update(first.body, rowsOf(series, 0, 120), { now: '2030-01-01T00:00:00.000Z' });
    expect(again.added).toBe(0);
    expect(again.changed).toBe(false);
    expect(again.body).toBe(first.body);
    expect(again.policy.note).toContain('0 new rows');
    expect(serializeModel(again.body)).toBe(serializeModel(first.body));
    expect(again.forecast?.paths.point).toEqual(first.forecast?.paths.point);
  });

  it('a revised overlapping value is refused with the time and column named', () => {
    const { series } = simulateArx(130, 10);
    const body = bodyOn(series, 100);
    const rows = rowsOf(series, 90, 110);
    rows.values[5] += 0.001; // June 2007 (observation 95)
    let error: unknown;
    try {
      update(body, rows, { now: NOW });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(DataError);
    const e = error as DataError;
    expect(e.code).toBe('revised-history');
    expect(e.message).toContain('2007-12');
    expect(e.context.column).toBe('sales');
    expect(e.context.found).toBe(String(rows.values[5]));
    expect(e.context.hint).toContain('--accept-revisions');
    // a revised input is named by its column
    const rows2 = rowsOf(series, 90, 110);
    rows2.inputs[0].values[2] = 99;
    expect(() => update(body, rows2, { now: NOW })).toThrow(/column "price" is 99/);
  });

  it('acceptRevisions re-estimates the same structure on the revised window, then continues', () => {
    const { series } = simulateArx(130, 11);
    const body = bodyOn(series, 100);
    const rows = rowsOf(series, 0, 110);
    rows.values[50] += 5;
    const r = update(body, rows, { now: NOW, acceptRevisions: true });
    expect(r.revisions).toHaveLength(1);
    expect(r.revisions[0].label).toBe('2004-03');
    expect(r.added).toBe(10);
    // truth: batch least squares on the revised 110 points (the window holds all of them)
    const revised = { ...series, values: series.values.slice(0, 110), time: series.time.slice(0, 110), inputs: series.inputs.map((i) => ({ name: i.name, values: i.values.slice(0, 110) })) };
    revised.values[50] += 5;
    const s = new ArxStructure(TRUE_SPEC);
    const reg = s.regression(revised, s.history, 110);
    const batch = lstsq(reg.phi, reg.y, s.terms).theta;
    for (let j = 0; j < batch.length; j++) expect(Math.abs(r.body.theta[j] - batch[j])).toBeLessThan(1e-8 * Math.max(1, Math.abs(batch[j])));
    expect(r.body.window.values[50]).toBe(revised.values[50]);
    expect(r.entry?.note).toContain('revised');
  });
});

describe('update: bad new data', () => {
  const { series } = simulateArx(130, 12);
  const body = bodyOn(series, 100);

  it('a gap between the model and the new rows is refused naming the expected period', () => {
    expect(() => update(body, rowsOf(series, 102, 110), { now: NOW })).toThrow(/after 2008-04 comes 2008-07/);
    try {
      update(body, rowsOf(series, 102, 110), { now: NOW });
    } catch (e) {
      expect((e as DataError).code).toBe('gap-in-new-data');
      expect((e as DataError).context.expected).toContain('2008-05');
    }
  });

  it('a missing input, another frequency or a missing value are refused', () => {
    const noInput = { ...rowsOf(series, 100, 110), inputs: [] };
    expect(() => update(body, noInput, { now: NOW })).toThrow(expect.objectContaining({ code: 'missing-input', context: expect.objectContaining({ column: 'price' }) }));
    const quarterly = { ...rowsOf(series, 100, 110), frequency: 'quarterly' as const };
    expect(() => update(body, quarterly, { now: NOW })).toThrow(expect.objectContaining({ code: 'frequency-mismatch' }));
    const hole = rowsOf(series, 100, 110);
    hole.values[3] = NaN;
    expect(() => update(body, hole, { now: NOW })).toThrow(expect.objectContaining({ code: 'missing-value', message: expect.stringContaining('2008-08') }));
    expect(() => update(body, rowsOf(series, 100, 101), { now: NOW, onDrift: 'panic' as never })).toThrow(UsageError);
  });
});

describe('update: drift policies and the log', () => {
  it('adapt: after an alarm λ = 0.9 for 24 observations (saved across updates) and P ×10 at the alarm', () => {
    // a level shift of 8σ at observation 110: an alarm within a few rows
    const { series } = simulateArx(160, 13, { shiftAt: 110, levelShift: 8 });
    let body = bodyOn(series, 100);
    let alarmAt = -1;
    const lambdas: number[] = [];
    for (let k = 100; k < 160; k++) {
      const r = update(body, rowsOf(series, k, k + 1), { now: NOW, onDrift: 'adapt', skipForecast: true });
      lambdas.push(r.steps[0].lambda);
      if (r.alarms.length > 0 && alarmAt < 0) {
        alarmAt = k;
        expect(r.policy.name).toBe('adapt');
        expect(r.entry?.policy).toBe('adapt');
        // P inflated: trace grows by about the factor (one RLS step at λ = 1 shrinks it a little first)
        const tr = (b: ModelBody) => b.P.reduce((s, row, i) => s + row[i], 0);
        expect(tr(r.body) / tr(body)).toBeGreaterThan(ADAPT.inflate * 0.5);
        expect(r.body.state.adaptRemaining).toBe(ADAPT.steps);
      }
      body = roundTrip(r.body);
    }
    expect(alarmAt).toBeGreaterThanOrEqual(110);
    expect(alarmAt).toBeLessThan(113);
    const i = alarmAt - 100;
    expect(lambdas[i]).toBe(1); // the alarm's own step used the body's λ
    expect(lambdas.slice(i + 1, i + 1 + ADAPT.steps).every((l) => l === ADAPT.lambda)).toBe(true);
    if (i + 1 + ADAPT.steps < lambdas.length) expect(lambdas[i + 1 + ADAPT.steps]).toBe(1);
    expect(body.lambda).toBe(1);
  });

  it('warn: the alarm is logged with the policy, θ change and equations; the forecast has the model horizon and levels', () => {
    const { series } = simulateArx(130, 14, { shiftAt: 110, levelShift: 8 });
    const body = bodyOn(series, 110);
    const r = update(body, rowsOf(series, 110, 120), { now: '2024-02-01T00:00:00.000Z' });
    expect(r.alarms.length).toBeGreaterThan(0);
    expect(r.policy.name).toBe('warn');
    const entry = r.body.log[r.body.log.length - 1];
    expect(entry.time).toBe('2024-02-01T00:00:00.000Z');
    expect(entry.rowsAdded).toBe(10);
    expect(entry.alarms[0].at).toBe(r.alarms[0].at);
    // ‖θ_after − θ_before‖₂ from the two bodies
    const norm = Math.hypot(...r.body.theta.map((v, j) => v - body.theta[j]));
    expect(entry.parameterChange).toBeCloseTo(norm, 12);
    expect(entry.note).toContain('before: ');
    expect(r.forecast?.horizon).toBe(12);
    expect(r.forecast?.levels).toEqual([80, 95]);
    expect(r.forecast?.paths.method).toBe('calibrated');
    expect(r.forecast?.paths.calibration?.origins).toBeGreaterThan(0);
    expect(r.body.updated).toBe('2024-02-01T00:00:00.000Z');
    expect(r.body.created).toBe(NOW);
  });
});
