/**
 * The `certa` program: a thin shell over the library. Each command lives in a file of its own
 * (`inspect.ts`, `search.ts`, ...) exporting `register(program, io)`. Commands never print errors
 * or exit: they throw, and only `main` turns an error into a message and an exit code.
 *
 * Exit codes: 0 success; 2 a user-caused error (bad file, bad option, unfit data); 3 a condition
 * a scheduler asked to fail on (drift with --fail-on-drift); 1 a bug (stack only with --debug).
 */
import { Command, CommanderError } from 'commander';
import { isCertaError } from '../data/errors.js';
import { registerCommands } from './commands.js';

/** Where commands write; tests pass their own to capture output. */
export interface CliIO {
  out: (text: string) => void;
  err: (text: string) => void;
  /** Standard input as a buffer, read on demand (for `-` as a file name). */
  stdin: () => Promise<Buffer>;
  isTTY: boolean;
}

export const processIO: CliIO = {
  out: (text) => process.stdout.write(text),
  err: (text) => process.stderr.write(text),
  stdin: readStdin,
  isTTY: Boolean(process.stderr.isTTY),
};

/** Thrown by commands that finished but must exit non-zero (e.g. drift with --fail-on-drift). */
export class ExitRequest extends Error {
  constructor(readonly exitCode: number) {
    super(`exit ${exitCode}`);
  }
}

export function buildProgram(io: CliIO): Command {
  const program = new Command();
  program
    .name('certa')
    .description(
      'Identify the equation behind a time series, assert it, forecast with it and keep it learning.\n' +
        'Start with:  certa inspect <file>   (what certa reads in your file)',
    )
    .option('--debug', 'print stack traces of internal errors')
    .showHelpAfterError('(run with --help for usage)')
    .configureOutput({ writeOut: (s) => io.out(s), writeErr: (s) => io.err(s) })
    .exitOverride();
  registerCommands(program, io);
  return program;
}

/** Runs the CLI and resolves to the exit code; never calls process.exit. */
export async function main(argv: string[], io: CliIO = processIO): Promise<number> {
  const program = buildProgram(io);
  const debug = argv.includes('--debug');
  try {
    await program.parseAsync(argv);
    return 0;
  } catch (e) {
    if (e instanceof ExitRequest) return e.exitCode;
    if (e instanceof CommanderError) {
      // help and version are "errors" to commander; their text is already written.
      if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help') return 0;
      return 2;
    }
    if (isCertaError(e)) {
      io.err(`certa: ${e.line()}\n`);
      if (e.context.hint) io.err(`hint: ${e.context.hint}\n`);
      if (debug && e.stack) io.err(`${e.stack}\n`);
      return e.exitCode;
    }
    const err = e instanceof Error ? e : new Error(String(e));
    io.err(`certa: internal error: ${err.message}\n`);
    io.err(debug && err.stack ? `${err.stack}\n` : 'hint: this is a bug in certa; rerun with --debug for the stack trace\n');
    return 1;
  }
}

async function readStdin(): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}
