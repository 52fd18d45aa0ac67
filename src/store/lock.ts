/**
 * An advisory lock beside a model file, so two updates (say a scheduled job and a person at a
 * terminal) never read-modify-write the same `model.json` at once.
 *
 * The lock is the file `<model>.lock`, created exclusively with its content in place (a private
 * file hard-linked to the lock name, which fails when the name exists; where hard links are not
 * available, open with O_CREAT|O_EXCL, flag `wx`, then write): of two processes racing, exactly
 * one creation succeeds, and the other reads a complete holder. It holds one JSON object
 * `{ pid, host, started, command }` naming the holder, which is what a refused process reports.
 *
 * Stale-lock rule (a lock left behind by a process that died without releasing it):
 * - the holder ran on this host and its pid is no longer alive (`process.kill(pid, 0)` fails with
 *   ESRCH; EPERM means the process exists under another user, so it is alive), or
 * - the lock is older than `maxAgeMs` (default one hour; no update of a model takes that long), or
 * - the lock file cannot be read as a lock and was last modified more than `GRACE_MS` ago (a
 *   holder writes its content immediately after creating the file, so an unreadable lock older
 *   than that was cut short by a crash).
 * A stale lock is taken over: it is first renamed aside (so of two processes taking over the
 * same stale lock only one succeeds), then a fresh lock is created exclusively, and the caller
 * receives a note saying whose lock was taken over and why.
 *
 * Release removes the lock only while it still holds this holder's content, so a process whose
 * lock was (wrongly) taken over never deletes its successor's lock.
 */
import { promises as fsp } from 'node:fs';
import { hostname } from 'node:os';
import { StoreError } from '../data/errors.js';

/** Content of a lock file. */
export interface LockInfo {
  pid: number;
  host: string;
  /** ISO 8601 time the lock was taken. */
  started: string;
  /** What the holder is doing, e.g. `certa update model.json sales.csv`. */
  command: string;
}

export interface LockOptions {
  /** Recorded in the lock so a refused process can say what holds it. Default `process.argv` joined. */
  command?: string;
  /** A lock older than this is stale and taken over. Default 3 600 000 (one hour). */
  maxAgeMs?: number;
  /** Clock in epoch milliseconds. Default `Date.now`. */
  now?: () => number;
}

/** A held lock. */
export interface LockHandle {
  /** Path of the lock file. */
  readonly lockPath: string;
  readonly info: LockInfo;
  /** The stale lock this acquisition replaced, or null. */
  readonly takenOver: LockInfo | null;
  /** One sentence for the user when a stale lock was taken over, else null. */
  readonly note: string | null;
  /** Removes the lock if it is still ours; safe to call twice. */
  release(): Promise<void>;
}

export interface LockResult<T> {
  value: T;
  /** Set when a stale lock was taken over (see `LockHandle.note`). */
  note: string | null;
}

export const DEFAULT_MAX_LOCK_AGE_MS = 3_600_000;
/** An unreadable lock younger than this may be in the middle of being written. */
export const GRACE_MS = 60_000;

/** The lock file that guards `path`. */
export function lockPathFor(path: string): string {
  return `${path}.lock`;
}

/** Runs `fn` while holding the lock beside `path`; releases it afterwards, also when `fn` throws. */
export async function withLock<T>(path: string, fn: (lock: LockHandle) => Promise<T> | T, options: LockOptions = {}): Promise<LockResult<T>> {
  const lock = await acquireLock(path, options);
  try {
    const value = await fn(lock);
    return { value, note: lock.note };
  } finally {
    await lock.release();
  }
}

let takeoverCounter = 0;

/** Takes the lock beside `path`, or throws StoreError `locked` naming the holder. */
export async function acquireLock(path: string, options: LockOptions = {}): Promise<LockHandle> {
  const now = options.now ?? Date.now;
  const maxAgeMs = options.maxAgeMs ?? DEFAULT_MAX_LOCK_AGE_MS;
  const lockPath = lockPathFor(path);
  const info: LockInfo = {
    pid: process.pid,
    host: hostname(),
    started: new Date(now()).toISOString(),
    command: options.command ?? process.argv.join(' '),
  };
  const content = `${JSON.stringify(info)}\n`;
  let takenOver: LockInfo | null = null;
  let reason = '';

  // Bounded: each round either creates the lock, throws, or removes one stale lock.
  for (let attempt = 0; attempt < 4; attempt += 1) {
    if (await createExclusive(lockPath, content)) {
      return makeHandle(lockPath, info, content, takenOver, takenOver ? takeoverNote(takenOver, reason) : null);
    }
    const held = await readLock(lockPath);
    if (held === 'gone') continue; // released between our attempt and our read
    const verdict = staleness(held, now(), maxAgeMs);
    if (verdict === null) throw lockedError(path, lockPath, held, maxAgeMs);
    if (!(await removeIfUnchanged(lockPath, held.raw))) continue; // someone else took it over first
    takenOver = held.info ?? { pid: 0, host: 'unknown', started: new Date(held.mtimeMs).toISOString(), command: 'unreadable lock file' };
    reason = verdict;
  }
  const last = await readLock(lockPath);
  if (last !== 'gone') throw lockedError(path, lockPath, last, maxAgeMs);
  throw new StoreError('locked', 'could not take the model lock: other processes keep taking it', {
    file: path,
    hint: 'retry when the other certa processes have finished',
  });
}

interface HeldLock {
  raw: string;
  info: LockInfo | null;
  mtimeMs: number;
}

/**
 * Creates the lock with its content in one step where the file system allows it: the content is
 * written to a private file first and hard-linked to the lock name (link fails with EEXIST when
 * the lock exists), so no other process ever reads a lock without its holder. Where hard links
 * are not supported, falls back to an exclusive create followed by the write.
 */
async function createExclusive(lockPath: string, content: string): Promise<boolean> {
  takeoverCounter += 1;
  const staged = `${lockPath}.new.${process.pid}.${takeoverCounter}`;
  let linked: boolean | null = null;
  try {
    await fsp.writeFile(staged, content, { flag: 'wx', mode: 0o644 });
    try {
      await fsp.link(staged, lockPath);
      linked = true;
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      if (code === 'EEXIST') linked = false;
      else if (code !== 'EPERM' && code !== 'ENOTSUP' && code !== 'ENOSYS' && code !== 'EOPNOTSUPP') throw ioError(lockPath, e, 'could not create the lock file');
    }
  } catch (e) {
    if (e instanceof StoreError) throw e;
    throw ioError(lockPath, e, 'could not create the lock file');
  } finally {
    await fsp.rm(staged, { force: true }).catch(() => undefined);
  }
  if (linked !== null) return linked;
  return createExclusiveOpen(lockPath, content);
}

async function createExclusiveOpen(lockPath: string, content: string): Promise<boolean> {
  let handle: fsp.FileHandle | undefined;
  try {
    handle = await fsp.open(lockPath, 'wx', 0o644);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'EEXIST') return false;
    throw ioError(lockPath, e, 'could not create the lock file');
  }
  try {
    await handle.writeFile(content);
    await handle.sync();
  } catch (e) {
    await handle.close().catch(() => undefined);
    await fsp.rm(lockPath, { force: true }).catch(() => undefined);
    throw ioError(lockPath, e, 'could not write the lock file');
  }
  await handle.close();
  return true;
}

async function readLock(lockPath: string): Promise<HeldLock | 'gone'> {
  let raw: string;
  let mtimeMs: number;
  try {
    raw = await fsp.readFile(lockPath, 'utf8');
    mtimeMs = (await fsp.stat(lockPath)).mtimeMs;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') return 'gone';
    throw ioError(lockPath, e, 'could not read the lock file');
  }
  return { raw, info: parseLockInfo(raw), mtimeMs };
}

/** The lock content, or null when it is not a complete lock object. */
export function parseLockInfo(raw: string): LockInfo | null {
  try {
    const v = JSON.parse(raw) as Partial<LockInfo> | null;
    if (
      v !== null &&
      typeof v === 'object' &&
      Number.isInteger(v.pid) &&
      typeof v.host === 'string' &&
      typeof v.started === 'string' &&
      Number.isFinite(Date.parse(v.started)) &&
      typeof v.command === 'string'
    ) {
      return { pid: v.pid as number, host: v.host, started: v.started, command: v.command };
    }
    return null;
  } catch {
    return null;
  }
}

/** Why the lock is stale (a phrase for the note), or null when it is live. */
function staleness(held: HeldLock, nowMs: number, maxAgeMs: number): string | null {
  if (held.info === null) {
    return nowMs - held.mtimeMs > GRACE_MS ? 'its file was unreadable (cut short by a crash)' : null;
  }
  const age = nowMs - Date.parse(held.info.started);
  if (held.info.host === hostname() && !isProcessAlive(held.info.pid)) return `process ${held.info.pid} is no longer running`;
  if (age > maxAgeMs) return `it was older than ${describeDuration(maxAgeMs)}`;
  return null;
}

/** Signal 0 checks existence without signalling: ESRCH = no such process, EPERM = exists. */
export function isProcessAlive(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code !== 'ESRCH';
  }
}

/**
 * Moves the stale lock aside and deletes it, but only if the moved file is the one judged stale;
 * if a fresh lock was moved by mistake (another process replaced the stale one in between), it is
 * put back with an exclusive link. Returns whether the stale lock is gone.
 */
async function removeIfUnchanged(lockPath: string, staleRaw: string): Promise<boolean> {
  takeoverCounter += 1;
  const aside = `${lockPath}.stale.${process.pid}.${takeoverCounter}`;
  try {
    await fsp.rename(lockPath, aside);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') return false;
    throw ioError(lockPath, e, 'could not take over the stale lock file');
  }
  const moved = await fsp.readFile(aside, 'utf8').catch(() => null);
  if (moved === staleRaw) {
    await fsp.rm(aside, { force: true });
    return true;
  }
  await fsp.link(aside, lockPath).catch(() => undefined);
  await fsp.rm(aside, { force: true });
  return false;
}

function makeHandle(lockPath: string, info: LockInfo, content: string, takenOver: LockInfo | null, note: string | null): LockHandle {
  let released = false;
  return {
    lockPath,
    info,
    takenOver,
    note,
    async release() {
      if (released) return;
      released = true;
      const current = await fsp.readFile(lockPath, 'utf8').catch(() => null);
      if (current === content) await fsp.rm(lockPath, { force: true });
    },
  };
}

function describeHolder(info: LockInfo): string {
  return `process ${info.pid} on host "${info.host}" since ${info.started}${info.command ? ` (${info.command})` : ''}`;
}

function takeoverNote(previous: LockInfo, reason: string): string {
  return `took over a stale lock held by ${describeHolder(previous)}: ${reason}`;
}

function lockedError(path: string, lockPath: string, held: HeldLock, maxAgeMs: number): StoreError {
  const who = held.info ? describeHolder(held.info) : `an unreadable lock file written at ${new Date(held.mtimeMs).toISOString()}`;
  return new StoreError('locked', `the model is locked by ${who}`, {
    file: path,
    found: held.raw.trim(),
    expected: 'no other certa process using this model',
    hint:
      `wait for it to finish and retry; a lock is taken over automatically once its process is no longer running on this host ` +
      `or it is older than ${describeDuration(maxAgeMs)}; delete ${lockPath} by hand only if no certa process is using the model`,
  });
}

function describeDuration(ms: number): string {
  if (ms % 3_600_000 === 0) return `${ms / 3_600_000} hour${ms === 3_600_000 ? '' : 's'}`;
  if (ms % 60_000 === 0) return `${ms / 60_000} minute${ms === 60_000 ? '' : 's'}`;
  return `${ms / 1000} seconds`;
}

function ioError(path: string, e: unknown, what: string): StoreError {
  const err = e as NodeJS.ErrnoException;
  const error = new StoreError('lock-failed', `${what} (${err?.code ?? 'unknown'}: ${err?.message ?? String(e)})`, {
    file: path,
    hint: 'check that the folder of the model exists and is writable',
  });
  (error as { cause?: unknown }).cause = e;
  return error;
}
