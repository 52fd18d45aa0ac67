/**
 * Invented demo data for chart tests and previews: monthly sales of "Lumo kettles", a made-up
 * product, 2016-01 to 2023-12, with growth, a winter and gift-season peak and seeded noise.
 * Nothing here comes from real data.
 */
import { stepTime } from '../../src/data/calendar.js';
import { createRng } from '../../src/linalg/random.js';
import type {
  ForecastChartInput,
  HistoryChartInput,
  HoldoutChartInput,
  RankingChartInput,
  ResidualChartInput,
} from '../../src/report/charts.js';

/** Standard normal draws from the project's seeded random source. */
function normals(seed: number, n: number): Float64Array {
  const rng = createRng(seed);
  return Float64Array.from({ length: n }, () => rng.normal());
}

const START = Date.UTC(2016, 0, 1);
const MONTHS = 96;
const HORIZON = 24;
const HOLDOUT = 12;

function times(from: number, n: number): Float64Array {
  return Float64Array.from({ length: n }, (_, i) => stepTime(from, 'monthly', i));
}

/** Underlying level × season of the invented product, month index i from 2016-01. */
function signal(i: number): number {
  const level = 1800 + 22 * i + 600 / (1 + Math.exp(-(i - 40) / 6));
  const month = i % 12;
  const season = 1 + 0.18 * Math.cos((2 * Math.PI * (month - 0.5)) / 12) + (month === 10 ? 0.12 : month === 11 ? 0.32 : 0);
  return level * season;
}

const noise = normals(20240611, MONTHS + HORIZON);
export const lumoTime = times(START, MONTHS);
export const lumoSales = Float64Array.from({ length: MONTHS }, (_, i) => Math.round(signal(i) + 95 * noise[i]));
const residualsRaw = Float64Array.from({ length: MONTHS }, (_, i) => 60 * noise[i] + (i > 0 ? 25 * noise[i - 1] : 0));
export const lumoFitted = Float64Array.from({ length: MONTHS }, (_, i) => (i < 13 ? Number.NaN : lumoSales[i] - residualsRaw[i]));

export const lumoHistory: HistoryChartInput = {
  title: 'Lumo kettles: monthly sales and fitted values',
  subtitle: 'invented demo series · fitted: one-step predictions of the asserted model',
  valueLabel: 'sales',
  unit: 'kettles / month',
  frequency: 'monthly',
  time: lumoTime,
  actual: lumoSales,
  fitted: lumoFitted,
  holdoutStart: lumoTime[MONTHS - HOLDOUT],
};

const fcTime = times(stepTime(START, 'monthly', MONTHS), HORIZON);
const fcMean = Float64Array.from({ length: HORIZON }, (_, k) => signal(MONTHS + k));
const spread = (z: number, k: number): number => z * 105 * Math.sqrt(1 + 0.35 * k);
export const lumoForecast: ForecastChartInput = {
  title: 'Lumo kettles: forecast for 2024–2025',
  subtitle: 'point forecast with 80 % and 95 % prediction intervals',
  valueLabel: 'sales',
  unit: 'kettles / month',
  frequency: 'monthly',
  history: { time: lumoTime, values: lumoSales },
  forecast: {
    time: fcTime,
    mean: fcMean,
    bands: [
      { level: 0.95, lower: fcMean.map((m, k) => m - spread(1.96, k)), upper: fcMean.map((m, k) => m + spread(1.96, k)) },
      { level: 0.8, lower: fcMean.map((m, k) => m - spread(1.2816, k)), upper: fcMean.map((m, k) => m + spread(1.2816, k)) },
    ],
  },
};

const hoFrom = MONTHS - HOLDOUT;
export const lumoHoldout: HoldoutChartInput = {
  title: 'Lumo kettles: holdout 2023, actuals against forecasts',
  subtitle: 'fixed origin: all 12 months forecast from 2022-12 · rolling origin: each month forecast one step ahead',
  valueLabel: 'sales',
  unit: 'kettles / month',
  frequency: 'monthly',
  context: { time: lumoTime.slice(hoFrom - 36, hoFrom + 1), values: lumoSales.slice(hoFrom - 36, hoFrom + 1) },
  time: lumoTime.slice(hoFrom),
  actual: lumoSales.slice(hoFrom),
  forecasts: [
    { label: 'fixed origin', values: Float64Array.from({ length: HOLDOUT }, (_, k) => signal(hoFrom + k) * (1 - 0.006 * k)) },
    { label: 'rolling origin (1 step)', values: Float64Array.from({ length: HOLDOUT }, (_, k) => lumoSales[hoFrom + k] - residualsRaw[hoFrom + k] * 0.9) },
  ],
};

const names = [
  'ARX(2,0) + trend + 2 harmonics',
  'ARX(1,0) + trend + 2 harmonics',
  'ARX(2,0) log + trend + 2 harmonics',
  'ARX(3,0) + trend + 2 harmonics',
  'ARX(1,0) + trend + 3 harmonics',
  'logistic ODE + 2 harmonics',
  'ARX(12,0) seasonal lag',
  'ARX(2,0) + trend + 1 harmonic',
  'Bass diffusion ODE + 2 harmonics',
  'ARX(1,0) + 2 harmonics',
  'polynomial ODE degree 2 + 2 harmonics',
  'ARX(2,0) log + trend',
  'ARX(1,0) + trend',
  'Gompertz ODE + 1 harmonic',
  'ARX(1,0)',
  'ARX(2,0)',
  'polynomial ODE degree 3',
  'logistic ODE',
];
export const lumoRanking: RankingChartInput = {
  title: 'Lumo kettles: candidate structures ranked by AICc',
  criterion: 'AICc',
  candidates: names.map((name, i) => ({ name, delta: i === 0 ? 0 : Math.round((0.9 * i + 0.35 * i * i + 3 * noise[i] ** 2) * 100) / 100 })),
  top: 15,
};

export const lumoResiduals: ResidualChartInput = {
  title: 'Lumo kettles: residuals of the asserted model',
  subtitle: 'one-step prediction errors, 2017-02 to 2023-12',
  residuals: lumoFitted.map((fv, i) => lumoSales[i] - fv),
  time: lumoTime,
  frequency: 'monthly',
};
