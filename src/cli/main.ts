/**
 * The `certa` program: a thin shell over the library. Each command lives in a file of its own
 * (`inspect.ts`, `search.ts`, ...) exporting `register(program, io)`. Commands never print errors
 * or exit: they throw, and only `main` turns an error into a message and an exit code.
 *
 * Exit codes (EXIT_CODES, also in --help and the README): 0 success; 1 a bug (stack only with
 * --debug); 2 a user-caused error (bad file, bad option, unfit data); 3 a condition a scheduler
 * asked to fail on (drift with --fail-on-drift); 4 a batch in which some series could not be
 * forecast, searched or updated (the others were completed, the failures listed on stderr and in
 * batch.csv or updates.csv).
 */
import { Command, CommanderError } from 'commander';
import { isCertaError } from '../data/errors.js';
import { registerCommands } from './commands.js';

/** Every exit code of certa with its meaning, as --help prints them. */
export const EXIT_CODES: ReadonlyArray<readonly [number, string]> = [
  [0, 'success'],
  [1, 'a bug in certa (rerun with --debug for the stack trace)'],
  [2, 'a user-caused error: bad file, bad option, data no model can be fitted to'],
  [3, 'a condition asked to fail on: a drift alarm with certa update --fail-on-drift'],
  [4, 'some series of a file failed: the others were completed; see stderr (and batch.csv of a forecast batch, updates.csv of a batch update)'],
];

/** The exit codes as a help section (the program's and each command's --help end with it). */
export function exitCodesHelp(): string {
  return `\nExit codes:\n${EXIT_CODES.map(([c, t]) => `  ${c}  ${t}`).join('\n')}\n`;
}

/** Where commands write; tests pass their own to capture output. */
export interface CliIO {
  out: (text: string) => void;
  err: (text: string) => void;
  /** Standard input as a buffer, read on demand (for `-` as a file name). */
  stdin: () => Promise<Buffer>;
  isTTY: boolean;
}

/**
 * A writer to a process stream that stops writing, quietly, once the reader has gone (EPIPE:
 * `certa forecast lines.csv | head` closes the pipe after ten lines). The command goes on and
 * writes its files; only the text nobody reads is dropped. Other stream errors are left to Node.
 */
export function pipeWriter(stream: NodeJS.WriteStream): (text: string) => void {
  let closed = false;
  stream.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code !== 'EPIPE') throw e;
    closed = true;
  });
  return (text) => {
    if (!closed) stream.write(text);
  };
}

export const processIO: CliIO = {
  out: pipeWriter(process.stdout),
  err: pipeWriter(process.stderr),
  stdin: readStdin,
  isTTY: Boolean(process.stderr.isTTY),
};

/** Thrown by commands that finished but must exit non-zero (e.g. drift with --fail-on-drift). */
export class ExitRequest extends Error {
  constructor(readonly exitCode: number) {
    super(`exit ${exitCode}`);
  }
}

/** The program with the commands `argv` needs (see commands.ts: only the one it names). */
export async function buildProgram(io: CliIO, argv: string[] = []): Promise<Command> {
  const program = new Command();
  program
    .name('certa')
    .description(
      'Identify the equation behind a time series, assert it, forecast with it and keep it learning.\n' +
        'Start with:  certa inspect <file>   (what certa reads in your file)',
    )
    .option('--debug', 'print stack traces of internal errors')
    .addHelpText('after', exitCodesHelp());
  await registerCommands(program, io, argv);
  for (const sub of program.commands) sub.addHelpText('after', exitCodesHelp());
  configureTree(program, io);
  return program;
}

/**
 * Every command, however it was added, writes through io and throws instead of exiting; its
 * own usage errors (unknown option, missing argument) are not printed here but by `main`, as
 * one `certa:` line.
 */
function configureTree(command: Command, io: CliIO): void {
  command
    .configureOutput({ writeOut: (s) => io.out(s), writeErr: (s) => io.err(s), outputError: () => undefined })
    .showHelpAfterError(false)
    .exitOverride();
  for (const sub of command.commands) configureTree(sub, io);
}

/** Runs the CLI and resolves to the exit code; never calls process.exit. */
export async function main(argv: string[], io: CliIO = processIO): Promise<number> {
  const debug = argv.includes('--debug');
  let program: Command | undefined;
  try {
    program = await buildProgram(io, argv);
    await program.parseAsync(argv);
    return 0;
  } catch (e) {
    if (e instanceof ExitRequest) return e.exitCode;
    if (e instanceof CommanderError) {
      // help and version are "errors" to commander; their text is already written.
      if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help') return 0;
      if (e.code === 'commander.executeSubCommandAsync') return e.exitCode;
      io.err(`certa: ${e.message.replace(/^error: /, '').split('\n')[0]}\n`);
      io.err(`hint: run certa ${program ? commandPath(program, argv) : ''}--help for usage\n`);
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

/** `inspect ` when argv names a known command, '' otherwise (for the usage hint). */
function commandPath(program: Command, argv: string[]): string {
  const words = argv.slice(2).filter((a) => !a.startsWith('-'));
  const sub = words.length > 0 ? program.commands.find((c) => c.name() === words[0] || c.aliases().includes(words[0])) : undefined;
  return sub ? `${sub.name()} ` : '';
}

async function readStdin(): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}
