/**
 * `certa merge`: the batch folders of the shards of one file (`--shard k/n`, k = 1 … n) joined
 * into one batch folder with the same bytes one run over the whole file would have written: the
 * series folders copied, the records of batch.csv put back in file order, the records of
 * forecasts.csv grouped by series in that order, batch.json as an unsharded run writes it (its
 * rows joined in file order) and, when the shards wrote reports, index.html made from those rows
 * and the chart library the series' reports share (`CHART_ASSET`), which every shard holds alike.
 *
 * Checked first, each a one-line error: every folder is a batch folder of the same kind (same
 * format, number of series in the file, interval levels, table headers), the shards are exactly
 * 1 … n of one n, no series and no folder appears twice, every series of the file is accounted
 * for, the shards with reports hold the same chart library, and the target folder is empty or
 * new.
 */
import { promises as fsp } from 'node:fs';
import { join } from 'node:path';
import { DataError, UsageError } from '../data/errors.js';
import { isAnyTemporaryName, writeFileAtomic } from '../store/atomic.js';
import { CHART_ASSET } from '../report/html.js';
import { BATCH_FORMAT, BATCH_VERSION, batchIndexHtml, batchManifest, batchRowFromJson, type BatchRow } from './batch-table.js';
import { byFirstField, rawRecords, type RawRecord } from './csv-records.js';
import { TOP_LEVEL_NAMES } from './folder-names.js';

/** What batch.json says of a batch folder (`readBatchManifest`). */
export interface Manifest {
  seriesInFile: number;
  shard: { k: number; n: number } | null;
  levels: number[];
  report: boolean;
  rows: BatchRow[];
}

const TOP_LEVEL = new Set(TOP_LEVEL_NAMES);

const SHARD_FOLDER = 'a batch folder written by certa forecast --shard k/n';

async function readBytes(file: string, what: string, expected = SHARD_FOLDER): Promise<Buffer> {
  try {
    return await fsp.readFile(file);
  } catch {
    throw new DataError('merge-missing', `${what} is missing`, { file, expected });
  }
}

async function readText(file: string, what: string, expected = SHARD_FOLDER): Promise<string> {
  return (await readBytes(file, what, expected)).toString('utf8');
}

/** The chart library the shards' reports share: the same bytes in every shard, or a one-line error. */
async function sharedChartLibrary(dirs: readonly string[]): Promise<Buffer> {
  let first: Buffer | null = null;
  for (const dir of dirs) {
    const file = join(dir, CHART_ASSET);
    const bytes = await readBytes(file, CHART_ASSET);
    if (first === null) first = bytes;
    else if (!bytes.equals(first)) throw new DataError('merge-asset', `${CHART_ASSET} differs from that of the other shards`, { file, expected: `shards written by one version of certa (the same ${CHART_ASSET} as in ${dirs[0]})` });
  }
  return first!;
}

/** batch.json of a batch folder, checked; `expected` says what the folder should have been when it is missing. */
export async function readBatchManifest(dir: string, expected = SHARD_FOLDER): Promise<Manifest> {
  const file = join(dir, 'batch.json');
  const text = await readText(file, 'batch.json', expected);
  let doc: Record<string, unknown>;
  try {
    doc = JSON.parse(text) as Record<string, unknown>;
  } catch {
    throw new DataError('merge-manifest', 'batch.json is not JSON', { file });
  }
  const shard = doc.shard as { k?: unknown; n?: unknown } | null | undefined;
  const ok =
    doc.format === BATCH_FORMAT &&
    doc.version === BATCH_VERSION &&
    Number.isInteger(doc.series_in_file) &&
    Array.isArray(doc.levels) &&
    typeof doc.report === 'boolean' &&
    Array.isArray(doc.series) &&
    (doc.series as unknown[]).every((r) => typeof r === 'object' && r !== null && Number.isInteger((r as Record<string, unknown>).position) && typeof (r as Record<string, unknown>).series === 'string') &&
    (shard === null || (typeof shard === 'object' && Number.isInteger(shard.k) && Number.isInteger(shard.n)));
  if (!ok) throw new DataError('merge-manifest', 'batch.json is not a certa batch description', { file, found: `format ${String(doc.format)}, version ${String(doc.version)}`, expected: `format ${BATCH_FORMAT}, version ${BATCH_VERSION}` });
  return {
    seriesInFile: doc.series_in_file as number,
    shard: shard ? { k: shard.k as number, n: shard.n as number } : null,
    levels: doc.levels as number[],
    report: doc.report as boolean,
    rows: (doc.series as Record<string, unknown>[]).map(batchRowFromJson),
  };
}

/**
 * The records of one of a shard's tables after its header, which must be the header of the
 * shards read before (`seen`, set from the first shard); a one-line error naming the file else.
 */
async function shardRecords(dir: string, name: string, seen: { header: RawRecord | null }): Promise<RawRecord[]> {
  const file = join(dir, name);
  const [head, ...records] = rawRecords(await readText(file, name));
  if (!head) throw new DataError('merge-empty', `${name} is empty`, { file });
  if (seen.header && head.text !== seen.header.text) throw new DataError('merge-header', `${name} has another header than the other shards`, { file, found: head.text.trim() });
  seen.header = head;
  return records;
}

async function copyTree(from: string, to: string): Promise<void> {
  for (const entry of (await fsp.readdir(from, { withFileTypes: true })).sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0))) {
    const src = join(from, entry.name);
    if (entry.isDirectory()) await copyTree(src, join(to, entry.name));
    else if (entry.isFile() && !isAnyTemporaryName(entry.name)) {
      await writeFileAtomic(join(to, entry.name), await fsp.readFile(src), { mkdir: true });
    }
  }
}

export interface MergeResult {
  report: boolean;
  shards: number;
  series: number;
  folders: number;
}

export async function mergeBatches(dirs: readonly string[], out: string): Promise<MergeResult> {
  if (dirs.length === 0) throw new UsageError('merge-nothing', 'no batch folders to merge', { expected: 'the folders written by certa forecast --shard k/n' });
  try {
    const existing = await fsp.readdir(out);
    if (existing.length > 0) throw new UsageError('merge-target', 'the target folder is not empty', { file: out, expected: 'a new or empty folder for the merged batch' });
  } catch (e) {
    if (e instanceof UsageError) throw e;
  }
  const manifests: Manifest[] = [];
  for (const dir of dirs) manifests.push(await readBatchManifest(dir));
  const first = manifests[0];
  const seen = new Map<number, string>();
  manifests.forEach((m, i) => {
    const file = join(dirs[i], 'batch.json');
    if (m.shard === null) throw new UsageError('merge-unsharded', 'this batch folder is not a shard', { file, expected: 'folders written with --shard k/n' });
    if (m.shard.n !== first.shard!.n || m.seriesInFile !== first.seriesInFile || JSON.stringify(m.levels) !== JSON.stringify(first.levels) || m.report !== first.report) {
      throw new UsageError('merge-mismatch', 'this shard is of another run', {
        file,
        found: `shard ${m.shard.k}/${m.shard.n} of ${m.seriesInFile} series, levels ${m.levels.join(',')}, ${m.report ? 'with' : 'without'} reports`,
        expected: `shards of ${first.shard!.n} over ${first.seriesInFile} series, levels ${first.levels.join(',')}, ${first.report ? 'with' : 'without'} reports, as in ${join(dirs[0], 'batch.json')}`,
      });
    }
    if (seen.has(m.shard.k)) throw new UsageError('merge-duplicate', `shard ${m.shard.k}/${m.shard.n} is given twice`, { file, found: `${seen.get(m.shard.k)} and ${dirs[i]}` });
    seen.set(m.shard.k, dirs[i]);
  });
  const n = first.shard!.n;
  const missing = Array.from({ length: n }, (_, j) => j + 1).filter((k) => !seen.has(k));
  if (missing.length > 0) throw new UsageError('merge-incomplete', `shard${missing.length === 1 ? '' : 's'} ${missing.map((k) => `${k}/${n}`).join(', ')} missing`, { found: `${dirs.length} of ${n} shards`, expected: 'every shard 1 … n' });

  const batchTable = { header: null as RawRecord | null };
  const forecastsTable = { header: null as RawRecord | null };
  const rows: { position: number; record: RawRecord }[] = [];
  const groups = new Map<string, RawRecord[]>();
  const folders = new Map<string, string>();
  for (const dir of dirs) {
    for (const r of await shardRecords(dir, 'batch.csv', batchTable)) {
      const position = Number(r.fields[0]);
      if (!Number.isInteger(position) || position < 1) throw new DataError('merge-position', 'a batch.csv record has no position', { file: join(dir, 'batch.csv'), found: r.fields[0] });
      rows.push({ position, record: r });
    }
    byFirstField(await shardRecords(dir, 'forecasts.csv', forecastsTable), groups);
    for (const entry of await fsp.readdir(dir, { withFileTypes: true })) {
      if (!entry.isDirectory() || TOP_LEVEL.has(entry.name)) continue;
      const other = folders.get(entry.name);
      if (other !== undefined) throw new DataError('merge-folder-twice', `the series folder "${entry.name}" is in two shards`, { found: `${other} and ${dir}`, expected: 'each series in one shard' });
      folders.set(entry.name, dir);
    }
  }
  const library = first.report ? await sharedChartLibrary(dirs) : null;
  rows.sort((a, b) => a.position - b.position);
  for (let i = 1; i < rows.length; i++) {
    if (rows[i].position === rows[i - 1].position) throw new DataError('merge-series-twice', `the series at position ${rows[i].position} is in two shards`, { found: rows[i].record.fields[1] });
  }
  if (rows.length !== first.seriesInFile) {
    throw new DataError('merge-count', 'the shards do not hold every series of the file', { found: `${rows.length} series`, expected: `${first.seriesInFile}, as batch.json says` });
  }
  let forecasts = forecastsTable.header!.text;
  for (const r of rows) {
    const list = groups.get(r.record.fields[1]);
    if (list) forecasts += list.map((x) => x.text).join('');
  }
  for (const [name, dir] of [...folders.entries()].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0))) await copyTree(join(dir, name), join(out, name));
  await writeFileAtomic(join(out, 'batch.csv'), batchTable.header!.text + rows.map((r) => r.record.text).join(''), { mkdir: true });
  await writeFileAtomic(join(out, 'forecasts.csv'), forecasts, { mkdir: true });
  const merged = manifests.flatMap((m) => m.rows).sort((a, b) => a.position - b.position);
  await writeFileAtomic(join(out, 'batch.json'), batchManifest({ seriesInFile: first.seriesInFile, shard: null, levels: first.levels, report: first.report, rows: merged }), { mkdir: true });
  if (first.report) await writeFileAtomic(join(out, 'index.html'), batchIndexHtml(merged), { mkdir: true });
  if (library) await writeFileAtomic(join(out, CHART_ASSET), library, { mkdir: true });
  return { report: first.report, shards: n, series: rows.length, folders: folders.size };
}
