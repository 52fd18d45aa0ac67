/**
 * The climate check's data, read straight from the vega-datasets copies of two public records:
 * - global-temp.csv: yearly global mean temperature anomaly (°C);
 * - co2-concentration.csv: monthly mean atmospheric CO₂ at Mauna Loa (ppm), first column used.
 * Months missing from the CO₂ file are filled by linear interpolation in time between the
 * neighbouring months; each year's concentration is the mean of its 12 months.
 * Radiative forcing of CO₂: F = 5.35·ln(C/278) W m⁻² (Myhre et al. 1998, "New estimates of
 * radiative forcing due to well mixed greenhouse gases", Geophys. Res. Lett. 25(14), Table 3;
 * 278 ppm the pre-industrial concentration).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Series } from '../../src/data/series.js';

const dataDir = fileURLToPath(new URL('../../node_modules/vega-datasets/data/', import.meta.url));

function rows(file: string): string[][] {
  return readFileSync(join(dataDir, file), 'utf8')
    .trim()
    .split(/\r?\n/)
    .slice(1)
    .map((l) => l.split(','));
}

export interface ClimateData {
  years: number[];
  temperature: number[];
  co2: number[];
  forcing: number[];
  /** Months absent from the CO₂ file within the span it covers, as yyyy-mm. */
  filledMonths: string[];
}

export function climateData(firstYear = 1959, lastYear = 2019): ClimateData {
  const temp = new Map(rows('global-temp.csv').map(([y, t]) => [Number(y), Number(t)]));
  const monthly = new Map<number, number>(); // month number y·12 + m → ppm
  for (const [date, ppm] of rows('co2-concentration.csv')) {
    const [y, m] = date.split('-').map(Number);
    monthly.set(y * 12 + (m - 1), Number(ppm));
  }
  const months = [...monthly.keys()].sort((a, b) => a - b);
  const filledMonths: string[] = [];
  for (let i = 0; i + 1 < months.length; i++) {
    const a = months[i];
    const b = months[i + 1];
    for (let k = a + 1; k < b; k++) {
      const w = (k - a) / (b - a);
      monthly.set(k, (1 - w) * (monthly.get(a) as number) + w * (monthly.get(b) as number));
      filledMonths.push(`${Math.floor(k / 12)}-${String((k % 12) + 1).padStart(2, '0')}`);
    }
  }
  const years: number[] = [];
  const temperature: number[] = [];
  const co2: number[] = [];
  for (let y = firstYear; y <= lastYear; y++) {
    let sum = 0;
    for (let m = 0; m < 12; m++) {
      const v = monthly.get(y * 12 + m);
      if (v === undefined) throw new Error(`no CO₂ value for ${y}-${m + 1}`);
      sum += v;
    }
    const t = temp.get(y);
    if (t === undefined) throw new Error(`no temperature for ${y}`);
    years.push(y);
    temperature.push(t);
    co2.push(sum / 12);
  }
  return { years, temperature, co2, forcing: co2.map((c) => 5.35 * Math.log(c / 278)), filledMonths };
}

export function climateSeries(d: ClimateData): Series {
  return {
    name: 'temp',
    frequency: 'yearly',
    season: null,
    time: Float64Array.from(d.years, (y) => Date.UTC(y, 0, 1)),
    values: Float64Array.from(d.temperature),
    inputs: [{ name: 'forcing', values: Float64Array.from(d.forcing) }],
    source: 'vega-datasets global-temp.csv + co2-concentration.csv',
  };
}
