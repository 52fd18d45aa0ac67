/**
 * The list of commands. Each command file exports `register(program, io)`; add one line here.
 */
import type { Command } from 'commander';
import type { CliIO } from './main.js';
import { register as registerInspect } from './inspect.js';

export function registerCommands(program: Command, io: CliIO): void {
  registerInspect(program, io);
}
