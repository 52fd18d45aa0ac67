/**
 * Harmonics of a season that is a whole number of quarter periods (the yearly cycle of daily
 * data, s = 365.25 days). The tabulated values must equal sin(2πkt/s), cos(2πkt/s) evaluated
 * directly (an identity), and the families accept such a season for harmonics alone. ODE
 * harmonics on a series observed every few periods take the season in base periods.
 */
import { describe, expect, it } from 'vitest';
import { deterministicFiller, deterministicNames, deterministicRowsFiller, harmonicRepeat, isHarmonicSeason } from '../../src/models/terms.js';
import { validateArxSpec } from '../../src/models/arx.js';
import { validateDampedSpec } from '../../src/models/damped.js';
import { structureFromSpec } from '../../src/models/registry.js';
import { odeCandidates, odeSpec } from '../../src/models/ode.js';
import { loadSeries } from '../../src/data/load.js';
import { resolveBounds } from '../../src/select/search.js';

describe('harmonics of s = 365.25', () => {
  const d = { intercept: true, trend: false, harmonics: 2, season: 365.25 };

  it('repeat every 1461 samples (four years of days) and are whole-quarter seasons', () => {
    expect(harmonicRepeat(365.25)).toBe(1461);
    expect(harmonicRepeat(12)).toBe(12);
    expect(harmonicRepeat(3.5)).toBe(7);
    expect(isHarmonicSeason(365.25)).toBe(true);
    expect(isHarmonicSeason(365.2422)).toBe(false);
  });

  it('equal sin and cos of 2πkt/365.25 evaluated directly, one row at a time and by rows', () => {
    expect(deterministicNames(d)).toEqual(['const', 'sin(2π·1·t/365.25)', 'cos(2π·1·t/365.25)', 'sin(2π·2·t/365.25)', 'cos(2π·2·t/365.25)']);
    const one = deterministicFiller(d);
    const rows = deterministicRowsFiller(d);
    const block = new Float64Array(5 * 40);
    rows(3000, 40, block, 5, 0);
    const out = new Float64Array(5);
    for (const t of [0, 1, 365, 366, 1460, 1461, 3000, 3039, -7]) {
      one(t, out, 0);
      const direct = [1, Math.sin((2 * Math.PI * t) / 365.25), Math.cos((2 * Math.PI * t) / 365.25), Math.sin((4 * Math.PI * t) / 365.25), Math.cos((4 * Math.PI * t) / 365.25)];
      direct.forEach((v, j) => expect(out[j], `t = ${t}, column ${j}`).toBeCloseTo(v, 10));
      if (t >= 3000 && t < 3040) direct.forEach((v, j) => expect(block[(t - 3000) * 5 + j]).toBeCloseTo(v, 10));
    }
  });

  it('are accepted by the ARX, change and ODE families, but a seasonal lag or seasonal differences need a whole season', () => {
    const arx = { family: 'arx', ar: 1, inputs: [], trend: false, harmonics: 2, season: 365.25, seasonalLag: false, differencing: 'none', transform: 'none' };
    expect(validateArxSpec(arx).season).toBe(365.25);
    expect(() => validateArxSpec({ ...arx, seasonalLag: true })).toThrow(/season/);
    expect(() => validateArxSpec({ ...arx, differencing: 'seasonal' })).toThrow(/season/);
    expect(validateDampedSpec({ family: 'damped', damped: false, transform: 'none', harmonics: 1, season: 365.25 }).season).toBe(365.25);
    const ode = structureFromSpec(odeSpec({ state: 'level', powers: [1, 2], harmonics: 1, season: 365.25, dt: 1 }));
    expect(ode.terms).toContain('sin(2π·1·t/365.25)');
  });
});

describe('ODE harmonics on a series observed every 2 months', () => {
  it('take the season in base periods (6 observations × 2 months = 12), so sin(2πτ/12) at τ = 2t is sin(2πt/6)', async () => {
    // Invented bimonthly registrations, 2019-01 to 2022-11: level 50 + 5·sin(2πt/6) + 0.5·t.
    const rows = Array.from({ length: 24 }, (_, t) => `${2019 + Math.floor((2 * t) / 12)}-${String(((2 * t) % 12) + 1).padStart(2, '0')},${(50 + 5 * Math.sin((2 * Math.PI * t) / 6) + 0.5 * t).toFixed(4)}`);
    const { series } = await loadSeries({ name: 'bimonthly.csv', bytes: Buffer.from(`month,registrations\n${rows.join('\n')}\n`) });
    expect(series[0]).toMatchObject({ frequency: 'monthly', step: 2, season: 6 });
    const withHarmonics = odeCandidates(series[0], resolveBounds(series[0], { harmonics: 1 })).filter((s) => ((s.spec as { harmonics?: number }).harmonics ?? 0) > 0);
    expect(withHarmonics.length).toBeGreaterThan(0);
    for (const s of withHarmonics) expect(s.spec).toMatchObject({ season: 12, dt: 2 });
  });
});
