/**
 * The one error module of certa.
 *
 * Every failure a user can cause (a bad file, a bad option, a series no model can be fitted to)
 * is a `CertaError` subclass carrying what a person needs to fix it: the file, row and column,
 * what was found, what was expected and, where useful, a hint. The library only throws; the CLI's
 * top-level handler (and nothing else) turns these into one printed line plus an optional hint
 * line, and exit code 2. Any other exception is a bug: exit 1, stack only with `--debug`.
 */

/** Where and what: every field optional, the message builder uses those present. */
export interface ErrorContext {
  /** File path as the user gave it (`-` for standard input). */
  file?: string;
  /** 1-based row number in the file as a person counts it (the header is row 1 in CSV/TSV/XLSX). */
  row?: number;
  /** Column name (or 1-based column number when the file has no header). */
  column?: string;
  /** What was found, quoted in the message as it appeared. */
  found?: string;
  /** What was expected, in words. */
  expected?: string;
  /** What to do about it: an option to pass, a command to run. */
  hint?: string;
}

/** Base of all user-caused errors. `code` is a stable kebab-case identifier tests can match. */
export class CertaError extends Error {
  readonly code: string;
  readonly context: ErrorContext;
  /** Exit code the CLI uses for this error (2 for user-caused errors). */
  readonly exitCode: number;

  constructor(code: string, message: string, context: ErrorContext = {}, exitCode = 2) {
    super(message);
    this.name = new.target.name;
    this.code = code;
    this.context = context;
    this.exitCode = exitCode;
  }

  /** The one line the CLI prints: `file:row: column "c": message (found "x", expected y)`. */
  line(): string {
    const c = this.context;
    const where: string[] = [];
    if (c.file !== undefined) where.push(c.row !== undefined ? `${c.file}:${c.row}` : c.file);
    else if (c.row !== undefined) where.push(`row ${c.row}`);
    if (c.column !== undefined) where.push(`column "${c.column}"`);
    const detail: string[] = [];
    if (c.found !== undefined) detail.push(`found "${truncate(c.found, 60)}"`);
    if (c.expected !== undefined) detail.push(`expected ${c.expected}`);
    const head = where.length > 0 ? `${where.join(': ')}: ` : '';
    const tail = detail.length > 0 ? ` (${detail.join(', ')})` : '';
    return `${head}${this.message}${tail}`;
  }
}

/** A problem with input data: unreadable file, bad value, bad date, gap, duplicate... */
export class DataError extends CertaError {}

/** A problem with the options or arguments given (bad horizon, unknown column name...). */
export class UsageError extends CertaError {}

/** The data are valid but no model can be built or asserted on them (too short, constant...). */
export class ModelError extends CertaError {}

/** A model file or other file certa reads back is unreadable, from a newer schema or tampered. */
export class StoreError extends CertaError {}

/** True for errors a user caused (and can fix); false for bugs. */
export function isCertaError(e: unknown): e is CertaError {
  return e instanceof CertaError;
}

function truncate(s: string, n: number): string {
  const clean = s.replace(/[\u0000-\u001f\u007f-\u009f]/g, (ch) => `\\x${ch.charCodeAt(0).toString(16).padStart(2, '0')}`);
  return clean.length > n ? `${clean.slice(0, n - 1)}…` : clean;
}
