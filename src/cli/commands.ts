/**
 * The list of commands. Each command file exports `register(program, io)`; add one line here.
 * Command files are imported on demand: a run that names a command loads only that command's
 * code (and what it imports), so `certa inspect` never loads the chart renderer; any other
 * command line (help, an unknown word) loads them all, in this order.
 */
import type { Command } from 'commander';
import type { CliIO } from './main.js';

type Register = (program: Command, io: CliIO) => void;

const COMMANDS: ReadonlyArray<readonly [string, () => Promise<{ register: Register }>]> = [
  ['inspect', () => import('./inspect.js')],
  ['search', () => import('./search.js')],
  ['forecast', () => import('./forecast.js')],
  ['update', () => import('./update.js')],
  ['merge', () => import('./merge.js')],
];

/** Registers the command `argv` names, or every command when it names none of them. */
export async function registerCommands(program: Command, io: CliIO, argv: string[] = []): Promise<void> {
  const word = argv.slice(2).find((a) => !a.startsWith('-'));
  const named = COMMANDS.filter(([name]) => name === word);
  const chosen = named.length > 0 ? named : COMMANDS;
  const modules = await Promise.all(chosen.map(([, load]) => load()));
  for (const m of modules) m.register(program, io);
}
