/**
 * `certa merge <folders...> --out <folder>`: joins the batch folders of the shards of one file
 * (certa forecast --shard k/n) into the batch folder one run would have written (batch/merge.ts).
 */
import type { Command } from 'commander';
import { UsageError } from '../data/errors.js';
import { mergeBatches } from '../batch/merge.js';
import { CHART_ASSET } from '../report/html.js';
import type { CliIO } from './main.js';

export function register(program: Command, io: CliIO): void {
  program
    .command('merge')
    .description('join the batch folders of shards (forecast --shard k/n) into the one batch folder a single run writes')
    .argument('<folders...>', 'the batch folders of shards 1 … n, in any order')
    .requiredOption('--out <folder>', 'the merged batch folder (new or empty)')
    .option('--quiet', 'print nothing on standard output')
    .action(async (folders: string[], opts: Record<string, unknown>) => {
      const out = String(opts.out);
      if (folders.includes(out)) throw new UsageError('merge-target', '--out names one of the shard folders', { found: out, expected: 'a new or empty folder' });
      const r = await mergeBatches(folders, out);
      if (!opts.quiet) io.out(`merged ${r.shards} shards: ${r.series} series, ${r.folders} series folders, batch.csv, batch.json, forecasts.csv${r.report ? `, index.html and ${CHART_ASSET}` : ''} in ${out}\n`);
    });
  program.addHelpText('after', '\nJoin the shards of an array job:\n  certa merge out/shard-1 out/shard-2 out/shard-3 --out out/all\n');
}
