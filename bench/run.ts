/**
 * `npm run bench`: runs every `bench/*.bench.ts` in name order, one child process each (so one
 * benchmark's memory does not colour the next), or only those whose name contains an argument:
 * `npm run bench -- linalg`. Each benchmark prints its own table of numbers.
 */
import { readdirSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const filters = process.argv.slice(2);
const files = readdirSync(here)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => filters.length === 0 || filters.some((s) => f.includes(s)))
  .sort();

let failed = 0;
for (const f of files) {
  process.stdout.write(`\n== ${f}\n`);
  const r = spawnSync(process.execPath, ['--expose-gc', '--import', 'tsx', join(here, f)], { stdio: 'inherit' });
  if (r.status !== 0) failed++;
}
process.exitCode = failed > 0 ? 1 : 0;
