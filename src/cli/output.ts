/**
 * Writing a command's output folder: every file replaced atomically (store/atomic.ts), the model
 * file through the model store (versioned, checksummed, previous version kept).
 */
import { join } from 'node:path';
import type { Series } from '../data/series.js';
import { mkdir } from 'node:fs/promises';
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
 */
export async function writeFiles(dir: string, files: Record<string, string | Uint8Array>): Promise<string[]> {
  const names = Object.keys(files).sort();
  if (names.length === 0) return names;
  await mkdirFolder(dir);
  await Promise.all(names.map((name) => writeFileAtomic(join(dir, name), files[name], { syncFolder: false })));
  await syncFolder(dir);
  return names;
}

async function mkdirFolder(dir: string): Promise<void> {
  try {
    await mkdir(dir, { recursive: true });
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
