/**
 * The list of commands. Each command file exports `register(program, io)`; add one line here.
 */
import type { Command } from 'commander';
import type { CliIO } from './main.js';

export function registerCommands(program: Command, io: CliIO): void {
  void program;
  void io;
}
