/**
 * Writes vallmark-heatpumps.csv: SYNTHETIC monthly installations of the "Heatwell" home heat
 * pump in the invented region of Vallmark, 2015-01 to 2024-12, with two inputs.
 *
 *   level_t        = 420 / (1 + exp(−0.08 · (t − 50)))               logistic adoption, t = 0 … 119
 *   season_t       = 1 + 0.22 · cos(2π (m_t − 9) / 12)                busiest in October (m = 9)
 *   frost_index_t  = max(0, 45 + 30 · cos(2π m_t / 12) + N(0, 6))     coldest in January
 *   subsidy_t      = 1 from 2019-07 on, else 0
 *   installations  = round(max(0, level_t · season_t + 55 · subsidy_t + 0.9 · frost_index_t + N(0, 10)))
 *
 * m_t is the month of the year (0 = January). Randomness comes from one seeded xorshift32
 * generator (shifts 13, 17, 5; G. Marsaglia, "Xorshift RNGs", Journal of Statistical Software
 * 8(14), 2003), turned into normal draws by the Box–Muller transform. Same seed, same file.
 *
 * Run: npx tsx datasets/demo/generate.ts
 */
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const SEED = 20_150_101;

/** xorshift32: a 32-bit state, never zero; returns uniform draws in (0, 1). */
function xorshift32(seed: number): () => number {
  let state = seed >>> 0 || 1;
  return () => {
    state ^= state << 13;
    state >>>= 0;
    state ^= state >>> 17;
    state ^= state << 5;
    state >>>= 0;
    return (state + 0.5) / 4_294_967_296;
  };
}

/** Standard normal draws by Box–Muller: √(−2 ln u₁) · cos(2π u₂). */
function normal(uniform: () => number): () => number {
  return () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
}

export function generate(seed = SEED): string {
  const gauss = normal(xorshift32(seed));
  const lines = ['month,installations,subsidy,frost_index'];
  for (let t = 0; t < 120; t++) {
    const year = 2015 + Math.floor(t / 12);
    const m = t % 12;
    const level = 420 / (1 + Math.exp(-0.08 * (t - 50)));
    const season = 1 + 0.22 * Math.cos((2 * Math.PI * (m - 9)) / 12);
    const frost = Math.max(0, 45 + 30 * Math.cos((2 * Math.PI * m) / 12) + 6 * gauss());
    const subsidy = year > 2019 || (year === 2019 && m >= 6) ? 1 : 0;
    const installs = Math.round(Math.max(0, level * season + 55 * subsidy + 0.9 * frost + 10 * gauss()));
    lines.push(`${year}-${String(m + 1).padStart(2, '0')},${installs},${subsidy},${frost.toFixed(1)}`);
  }
  return `${lines.join('\n')}\n`;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const here = dirname(fileURLToPath(import.meta.url));
  writeFileSync(join(here, 'vallmark-heatpumps.csv'), generate());
}
