/**
 * The list of commands. Each command file exports `register(program, io)`; add one line here.
 */
import type { Command } from 'commander';
import type { CliIO } from './main.js';
import { register as registerInspect } from './inspect.js';
import { register as registerSearch } from './search.js';
import { register as registerForecast } from './forecast.js';
import { register as registerUpdate } from './update.js';

export function registerCommands(program: Command, io: CliIO): void {
  registerInspect(program, io);
  registerSearch(program, io);
  registerForecast(program, io);
  registerUpdate(program, io);
}
