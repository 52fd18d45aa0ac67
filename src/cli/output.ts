/**
 * Writing a command's output folder: every file replaced atomically (store/atomic.ts), the model
 * file through the model store (versioned, checksummed, previous version kept).
 */
import { join } from 'node:path';
import type { Series } from '../data/series.js';
import { mkdirSync } from 'node:fs';
import { StoreError } from '../data/errors.js';
import { syncFolder, writeFileAtomic } from '../store/atomic.js';
import { folderNames } from '../batch/folder-names.js';

/**
 * The folder of each series: with one series `--out` itself (default `output/<folder name>`);
 * with several, `<--out or output>/<folder name>`, folder names by the rule of
 * batch/folder-names.ts (injective, never outside the folder).
 */
export function outputFolders(series: readonly Series[], out: string | undefined): string[] {
  const names = folderNames(series.map((s) => s.name));
  if (series.length === 1 && out !== undefined) return [out];
  return names.map((n) => join(out ?? 'output', n));
}

/** The folder of a file's only series (see outputFolders). */
export function outputFolder(series: Series, out: string | undefined): string {
  return outputFolders([series], out)[0];
}

/**
 * Writes each named file into `dir` (created if missing), each atomically (its own temporary
 * file, fsync, rename), the files side by side, then one fsync of the folder for all the renames.
 * A file named in `before` is replaced only once its step has finished (e.g. keeping the
 * previous version of it); the other files do not wait for that step.
 */
export async function writeFiles(dir: string, files: Record<string, string | Uint8Array>, before: Record<string, () => Promise<unknown>> = {}): Promise<string[]> {
  const names = Object.keys(files).sort();
  if (names.length === 0) return names;
  mkdirFolder(dir);
  const write = async (name: string): Promise<void> => {
    const step = Object.prototype.hasOwnProperty.call(before, name) ? before[name] : undefined;
    if (step) await step();
    await writeFileAtomic(join(dir, name), files[name], { syncFolder: false });
  };
  await Promise.all(names.map(write));
  await syncFolder(dir);
  return names;
}

function mkdirFolder(dir: string): void {
  try {
    mkdirSync(dir, { recursive: true });
  } catch (e) {
    const err = e as NodeJS.ErrnoException;
    throw new StoreError('write-failed', `could not create the folder (${err.code ?? 'unknown'}: ${err.message})`, { file: dir });
  }
}

/**
 * The time of this run as an ISO string, for model files. `SOURCE_DATE_EPOCH` (seconds since the
 * epoch, the reproducible-builds convention) pins it, so repeated runs give identical bytes.
 */
export function runClock(env: NodeJS.ProcessEnv = process.env): string {
  const pinned = env.SOURCE_DATE_EPOCH;
  if (pinned !== undefined && /^\d+$/.test(pinned)) return new Date(Number(pinned) * 1000).toISOString();
  return new Date().toISOString();
}
