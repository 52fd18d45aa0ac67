/**
 * Atomic file replacement: a reader (or a crash) sees either the old content or the new, never
 * a mix or a truncated file.
 *
 * Procedure: write the data to a temporary file in the target's own folder (same file system,
 * so the rename cannot turn into a copy), fsync that file so its bytes are on disk, rename it
 * over the target (rename(2) replaces the directory entry atomically on POSIX file systems),
 * then fsync the folder so the new entry itself survives a power loss. On any failure before
 * the rename the temporary file is removed and the target is untouched.
 *
 * Temporary names are `.<target name>.<pid>.<counter>.tmp`: unique per process (pid) and per
 * call (counter), so concurrent writers never share a temporary file. They start with a dot and
 * end in `.tmp`, so a stray one left by a killed process is easy to recognise and is never
 * mistaken for a model file.
 */
import * as fs from 'node:fs';
import * as nodePath from 'node:path';
import { StoreError } from '../data/errors.js';

export interface AtomicWriteOptions {
  /** Create the target's folder (and its parents) when missing. Default false. */
  mkdir?: boolean;
  /** Permission bits of a newly created file. Default 0o644 (before the umask). */
  mode?: number;
  /**
   * fsync the folder after the rename (default true). A caller writing several files into one
   * folder may pass false for each and call `syncFolder` once after the last.
   */
  syncFolder?: boolean;
}

let counter = 0;

/** The temporary file name used for one write to `target` (exported for tests and cleanup). */
export function temporaryPath(target: string): string {
  counter += 1;
  const dir = nodePath.dirname(target);
  const base = nodePath.basename(target);
  return nodePath.join(dir, `.${base}.${process.pid}.${counter}.tmp`);
}

/** True for a name `temporaryPath` produces for `targetBase` (any pid, any counter). */
export function isTemporaryName(name: string, targetBase: string): boolean {
  if (!name.startsWith(`.${targetBase}.`) || !name.endsWith('.tmp')) return false;
  const middle = name.slice(targetBase.length + 2, -4);
  return /^\d+\.\d+$/.test(middle);
}

/** True for a name `temporaryPath` produces for any target: a write cut short left it behind. */
export function isAnyTemporaryName(name: string): boolean {
  return /^\..+\.\d+\.\d+\.tmp$/.test(name);
}

/**
 * Replaces `path` with `data` atomically (see the module comment). Creating the temporary file,
 * writing it (into the page cache), closing and renaming it are quick and are made in this
 * thread; the fsyncs, which wait for the disk, go to the thread pool, so a caller writing
 * several files has their fsyncs under way side by side while it goes on.
 */
export async function writeFileAtomic(path: string, data: string | Uint8Array, options: AtomicWriteOptions = {}): Promise<void> {
  const dir = nodePath.dirname(path);
  if (options.mkdir) {
    try {
      fs.mkdirSync(dir, { recursive: true });
    } catch (e) {
      throw writeError(path, e, 'could not create its folder');
    }
  }
  const tmp = temporaryPath(path);
  let fd: number | undefined;
  try {
    fd = fs.openSync(tmp, 'wx', options.mode ?? 0o644);
    writeAll(fd, data);
    const open = fd;
    await call<void>((done) => fs.fsync(open, done));
    fd = undefined;
    fs.closeSync(open);
    fs.renameSync(tmp, path);
  } catch (e) {
    if (fd !== undefined) closeQuietly(fd);
    try {
      fs.rmSync(tmp, { force: true });
    } catch {
      // already failing; the original error is the one to report
    }
    throw writeError(path, e);
  }
  if (options.syncFolder !== false) await syncDirectory(dir);
}

/** A callback-style fs call as a promise. */
function call<T>(start: (done: (error: NodeJS.ErrnoException | null, value: T) => void) => void): Promise<T> {
  return new Promise<T>((resolve, reject) => start((error, value) => (error ? reject(error) : resolve(value))));
}

/** Writes all of `data` at the descriptor's position (a text as UTF-8, encoded by the write itself). */
function writeAll(fd: number, data: string | Uint8Array): void {
  let bytes: Uint8Array;
  if (typeof data === 'string') {
    if (data.length === 0) return;
    const written = fs.writeSync(fd, data, null, 'utf8');
    const total = Buffer.byteLength(data, 'utf8');
    if (written === total) return;
    // a short write (rare on a regular file): the rest from the encoded bytes
    bytes = Buffer.from(data, 'utf8').subarray(written);
  } else bytes = data;
  let offset = 0;
  while (offset < bytes.length) {
    const n = fs.writeSync(fd, bytes, offset, bytes.length - offset, null);
    if (n <= 0) throw Object.assign(new Error('the file system accepted no bytes'), { code: 'EIO' });
    offset += n;
  }
}

function closeQuietly(fd: number): void {
  try {
    fs.closeSync(fd);
  } catch {
    // already failing; the original error is the one to report
  }
}

/** fsync of a folder, making the renames done in it durable (see `syncFolder` above). */
export async function syncFolder(dir: string): Promise<void> {
  await syncDirectory(dir);
}

/** Synchronous twin of `writeFileAtomic`, same procedure and guarantees. */
export function writeFileAtomicSync(path: string, data: string | Uint8Array, options: AtomicWriteOptions = {}): void {
  const dir = nodePath.dirname(path);
  if (options.mkdir) {
    try {
      fs.mkdirSync(dir, { recursive: true });
    } catch (e) {
      throw writeError(path, e, 'could not create its folder');
    }
  }
  const tmp = temporaryPath(path);
  let fd: number | undefined;
  try {
    fd = fs.openSync(tmp, 'wx', options.mode ?? 0o644);
    fs.writeFileSync(fd, data);
    fs.fsyncSync(fd);
    fs.closeSync(fd);
    fd = undefined;
    fs.renameSync(tmp, path);
  } catch (e) {
    if (fd !== undefined) {
      try {
        fs.closeSync(fd);
      } catch {
        // already failing; the original error is the one to report
      }
    }
    fs.rmSync(tmp, { force: true });
    throw writeError(path, e);
  }
  syncDirectorySync(dir);
}

/**
 * fsync of a folder, so a rename inside it is durable. Some platforms cannot open a folder for
 * syncing (Windows: EISDIR/EPERM); there the rename is still atomic, only its durability across
 * a power loss is up to the file system, so those codes are ignored.
 */
async function syncDirectory(dir: string): Promise<void> {
  let fd: number | undefined;
  try {
    fd = fs.openSync(dir, 'r');
    const open = fd;
    await call<void>((done) => fs.fsync(open, done));
  } catch (e) {
    if (!isIgnorableDirSyncError(e)) throw writeError(dir, e, 'could not sync the folder after writing');
  } finally {
    if (fd !== undefined) closeQuietly(fd);
  }
}

function syncDirectorySync(dir: string): void {
  let fd: number | undefined;
  try {
    fd = fs.openSync(dir, 'r');
    fs.fsyncSync(fd);
  } catch (e) {
    if (!isIgnorableDirSyncError(e)) throw writeError(dir, e, 'could not sync the folder after writing');
  } finally {
    if (fd !== undefined) fs.closeSync(fd);
  }
}

function isIgnorableDirSyncError(e: unknown): boolean {
  const code = (e as NodeJS.ErrnoException | undefined)?.code;
  return code === 'EISDIR' || code === 'EPERM' || code === 'EINVAL' || code === 'ENOTSUP';
}

function writeError(path: string, e: unknown, what = 'could not write the file'): StoreError {
  if (e instanceof StoreError) return e;
  const err = e as NodeJS.ErrnoException;
  const code = err?.code ?? 'unknown';
  const hint =
    code === 'ENOENT'
      ? 'the folder does not exist; create it first (or let certa create it)'
      : code === 'EACCES' || code === 'EPERM'
        ? 'check the permissions of the file and its folder'
        : code === 'ENOSPC'
          ? 'the disk is full; free some space and retry'
          : undefined;
  const error = new StoreError('write-failed', `${what} (${code}: ${err?.message ?? String(e)})`, {
    file: path,
    ...(hint ? { hint } : {}),
  });
  (error as { cause?: unknown }).cause = e;
  return error;
}
