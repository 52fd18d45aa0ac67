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
 * m_t is the month of the year (0 = January). Randomness comes from certa's one seeded random
 * source (src/linalg/random.ts), so the same seed writes the same file.
 *
 * Run: npx tsx datasets/demo/generate.ts
 */
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createRng } from '../../src/linalg/random.js';

const SEED = 20_150_101;

export function generate(seed = SEED): string {
  const rng = createRng(seed);
  const gauss = () => rng.normal();
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
