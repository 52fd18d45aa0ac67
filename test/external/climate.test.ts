/**
 * Global temperature against CO₂ forcing, 1959–2019 (data: vega-datasets global-temp.csv and
 * co2-concentration.csv; forcing F = 5.35·ln(C/278) W m⁻², Myhre et al. 1998). With the trend
 * term disabled, the search must pick a structure that uses the forcing, beat the best
 * input-free structure (trend allowed) by more than 10 AICc units on the same sample, and imply
 * a steady-state warming per CO₂ doubling (gain × 5.35·ln 2) inside 1.5–4.5 °C, the IPCC AR5
 * "likely" range of equilibrium climate sensitivity (IPCC 2013, WG I, Summary for Policymakers
 * D.2; range from memory).
 */
import { describe, expect, it } from 'vitest';
import { search } from '../../src/select/search.js';
import { climateData, climateSeries } from './climate-data.js';

describe('climate: temperature anomaly against CO₂ forcing', () => {
  const data = climateData(1959, 2019);
  const series = climateSeries(data);

  it('fills exactly the 5 months missing from the CO₂ record and covers 61 years', () => {
    expect(data.filledMonths).toEqual(['1958-06', '1958-10', '1964-02', '1964-03', '1964-04']);
    expect(data.years.length).toBe(61);
  });

  it('finds the forcing, beats the best input-free structure by > 10 AICc, and implies 1.5–4.5 °C per doubling', () => {
    const withForcing = search(series, { trend: 'off', families: ['arx'] });
    const spec = withForcing.winner.structure.spec as unknown as { inputs: { name: string }[] };
    expect(spec.inputs.map((i) => i.name)).toEqual(['forcing']);
    const noInput = search(series, { trend: 'auto', inputs: [], families: ['arx'], sampleStart: withForcing.sample.from });
    expect(noInput.sample).toEqual(withForcing.sample);
    const delta = noInput.winner.result.aicc - withForcing.winner.result.aicc;
    expect(delta).toBeGreaterThan(10);
    const gain = withForcing.winner.derived.find((d) => d.name === 'gain forcing')?.value as number;
    const perDoubling = gain * 5.35 * Math.log(2);
    expect(perDoubling).toBeGreaterThan(1.5);
    expect(perDoubling).toBeLessThan(4.5);
  });
});
