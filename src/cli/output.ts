/**
 * Writing a command's output folder: every file replaced atomically (store/atomic.ts), the model
 * file through the model store (versioned, checksummed, previous version kept).
 */
import { join } from 'node:path';
import type { Series } from '../data/series.js';
import { writeFileAtomic } from '../store/atomic.js';

/** `output/<series>` unless the user gave `--out`; with several series, one folder each inside. */
export function outputFolder(series: Series, count: number, out: string | undefined): string {
  const safe = series.name.replace(/[^\p{L}\p{N}._-]+/gu, '_') || 'series';
  if (out === undefined) return join('output', safe);
  return count > 1 ? join(out, safe) : out;
}

/** Writes each named file into `dir` (created if missing), atomically, in name order. */
export async function writeFiles(dir: string, files: Record<string, string | Uint8Array>): Promise<string[]> {
  const names = Object.keys(files).sort();
  for (const name of names) await writeFileAtomic(join(dir, name), files[name], { mkdir: true });
  return names;
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
