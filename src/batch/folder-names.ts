/**
 * Folder names of series, one per series of a file: a documented, injective rule whose results
 * never leave the output folder.
 *
 * Rule. A series name is kept as its folder name when it is already safe: made only of letters,
 * digits, `.`, `_` and `-`, in Unicode NFC form, not starting with `.`, at most 64 characters,
 * not a device name some systems reserve (CON, PRN, AUX, NUL, COM0–COM9, LPT0–LPT9, with or
 * without an extension, any case), not a name the batch folder itself uses at its top
 * (`TOP_LEVEL_NAMES`, any case), and no other series of the file has the same name ignoring
 * case. Otherwise the folder is `<cleaned>~<hash>`: `cleaned` is the name with every run of other
 * characters replaced by `_`, leading dots removed, cut to 64 characters (`series` when nothing
 * is left), and `hash` the first 8 hex digits of the SHA-256 of the name's UTF-8 bytes, longer
 * (12, 16, … 64 digits) only in the unlikely event that two changed names would still meet.
 *
 * Why injective: kept names are distinct (even ignoring case) and contain no `~`; changed names
 * all contain `~`, so they never meet a kept one, and among themselves the hash tells them apart.
 * Why contained: a folder name is one path segment without `/`, `\`, `..`, control characters or a
 * leading dot. The rule depends only on the set of names in the file, so every shard of a file
 * (batch/shard.ts) gives a series the same folder as one run over the whole file.
 *
 * @example folderNames(['a_b', 'a b', 'a/b']) → ['a_b', 'a_b~<8 hex>', 'a_b~<8 hex>']
 */
import { createHash } from 'node:crypto';
import { CHART_ASSET_FOLDER } from '../report/html.js';

export const FOLDER_NAME_MAX = 64;

/**
 * The names at the top of a batch folder that are not series folders: its tables (updates.csv
 * from `certa update` on the batch), its index page and the folder of the chart library the
 * reports share.
 */
export const TOP_LEVEL_NAMES: readonly string[] = ['batch.csv', 'batch.json', 'forecasts.csv', 'updates.csv', 'index.html', CHART_ASSET_FOLDER];

const TOP_LEVEL = new Set(TOP_LEVEL_NAMES.map((n) => n.toLowerCase()));

const SAFE = /^[\p{L}\p{N}._-]+$/u;
const UNSAFE_RUN = /[^\p{L}\p{N}._-]+/gu;
const RESERVED = /^(con|prn|aux|nul|com[0-9]|lpt[0-9])(\..*)?$/i;

/** True when `name` may be a folder name as it is (before looking at the other names). */
export function isSafeFolderName(name: string): boolean {
  return (
    name.length > 0 &&
    name.length <= FOLDER_NAME_MAX &&
    SAFE.test(name) &&
    name === name.normalize('NFC') &&
    !name.startsWith('.') &&
    !RESERVED.test(name) &&
    !TOP_LEVEL.has(name.toLowerCase())
  );
}

/** The cleaned stem of a changed name (see the module comment). */
export function cleanedStem(name: string): string {
  const cleaned = Array.from(name.normalize('NFC').replace(UNSAFE_RUN, '_').replace(/^\.+/, ''))
    .slice(0, FOLDER_NAME_MAX)
    .join('');
  return cleaned.length > 0 ? cleaned : 'series';
}

function hashHex(name: string): string {
  return createHash('sha256').update(name, 'utf8').digest('hex');
}

/** The folder name of each series, in the order given (see the module comment). */
export function folderNames(names: readonly string[]): string[] {
  const lowerCount = new Map<string, number>();
  for (const n of names) {
    const key = n.toLowerCase();
    lowerCount.set(key, (lowerCount.get(key) ?? 0) + 1);
  }
  const kept = names.map((n) => isSafeFolderName(n) && lowerCount.get(n.toLowerCase()) === 1);
  const out = names.map((n, i) => (kept[i] ? n : ''));
  const changed = names.map((_, i) => i).filter((i) => !kept[i]);
  const stems = new Map<number, string>();
  const hashes = new Map<number, string>();
  for (const i of changed) {
    stems.set(i, cleanedStem(names[i]));
    hashes.set(i, hashHex(names[i]));
  }
  // Lengthen the hash only for the names that would still meet (two different names never
  // share all 64 hex digits; equal names are one series, so they cannot both be in a file).
  let pending = changed;
  for (let digits = 8; pending.length > 0; digits += 4) {
    const seen = new Map<string, number[]>();
    for (const i of pending) {
      const candidate = `${stems.get(i)}~${hashes.get(i)!.slice(0, digits)}`;
      const key = candidate.toLowerCase();
      seen.set(key, [...(seen.get(key) ?? []), i]);
      out[i] = candidate;
    }
    pending = [...seen.values()].filter((group) => group.length > 1).flat();
    if (digits >= 64) break;
  }
  return out;
}
