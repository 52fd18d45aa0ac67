/**
 * `certa update <batch folder> <file>` through the built CLI, on invented monthly kiosk sales of
 * the Corvel district: a batch forecast (one series too short to fit), then one file of new rows
 * for most series, one series without new rows, one absent and one never forecast. Checks the
 * outcome of every series (updates.csv, stdout, stderr, exit code 4), forecasts.csv brought up to
 * date, the series' files equal to those of `certa update` on each model alone, output
 * independent of the worker count, --json, --fail-fast, shards, --fail-on-drift, one new month
 * per series written as a date, and the one-line refusals of --levels and --out.
 */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { folderNames } from '../../src/batch/folder-names.js';
import { rawRecords } from '../../src/batch/csv-records.js';
import { shardOf } from '../../src/batch/shard.js';
import { ensureBuilt, runCli } from './run-cli.js';
import { parseResult } from './result.js';
import { fileTree, lcgNoise } from './in-process.js';

const NAMES = ['kiosk-1', 'a b', 'a/b', 'short', 'kiosk-2', 'kiosk-3'];
const FOLDERS = folderNames(NAMES);
const folderOf = (name: string): string => FOLDERS[NAMES.indexOf(name)];
let dir: string;
let original: string;
let newRows: string;

const month = (t: number): string => `${2021 + Math.floor(t / 12)}-${String((t % 12) + 1).padStart(2, '0')}`;
const level = (k: number, t: number, r: () => number): number => 80 + 6 * k + 0.4 * t + 7 * Math.sin((2 * Math.PI * t) / 12) + 3 * r();

/** The history: 36 months per series (4 for "short"). */
function history(): string {
  const rows = ['kiosk,month,sales'];
  NAMES.forEach((name, k) => {
    const r = lcgNoise(300 + k);
    for (let t = 0; t < (name === 'short' ? 4 : 36); t++) rows.push(`"${name}",${month(t)},${level(k, t, r).toFixed(2)}`);
  });
  const p = join(dir, 'kiosks.csv');
  writeFileSync(p, `${rows.join('\n')}\n`);
  return p;
}

/**
 * New rows: months 37 and 38 of kiosk-1, "a b" and "a/b"; two more months of "short" (it has no
 * model); kiosk-2's last month again (no new row); nothing of kiosk-3; a new kiosk-9.
 */
function newData(jump = 1): string {
  const rows = ['kiosk,month,sales'];
  NAMES.forEach((name, k) => {
    const r = lcgNoise(900 + k);
    if (name === 'kiosk-3') return;
    if (name === 'kiosk-2') {
      const again = lcgNoise(300 + k);
      let last = 0;
      for (let t = 0; t < 36; t++) last = level(k, t, again);
      rows.push(`"${name}",${month(35)},${last.toFixed(2)}`);
      return;
    }
    const from = name === 'short' ? 4 : 36;
    for (let t = from; t < from + 2; t++) rows.push(`"${name}",${month(t)},${(level(k, t, r) * (name === 'kiosk-1' ? jump : 1)).toFixed(2)}`);
  });
  for (let t = 0; t < 3; t++) rows.push(`kiosk-9,${month(t)},${50 + t}`);
  const p = join(dir, jump === 1 ? 'new.csv' : 'jump.csv');
  writeFileSync(p, `${rows.join('\n')}\n`);
  return p;
}

/** A fresh copy of the forecast batch at `to` (removed first). */
function copyBatch(to: string): string {
  rmSync(to, { recursive: true, force: true });
  cpSync(original, to, { recursive: true });
  return to;
}

beforeAll(() => {
  ensureBuilt();
  process.env.SOURCE_DATE_EPOCH = '1700000000';
  dir = mkdtempSync(join(tmpdir(), 'certa-batch-update-'));
  const file = history();
  newRows = newData();
  original = join(dir, 'original');
  const r = runCli(['forecast', file, '--id', 'kiosk', '--horizon', '6', '--no-charts', '--out', original]);
  expect(r.code, r.stderr).toBe(4);
}, 120_000);

const update = (batch: string, ...more: string[]) => runCli(['update', batch, newRows, '--id', 'kiosk', '--no-charts', ...more]);

describe('certa update on a batch folder', () => {
  it('updates the series with new rows, keeps the others, reports those without a model (exit 4)', () => {
    const batch = copyBatch(join(dir, 'b1'));
    const before = fileTree(batch);
    const r = update(batch);
    expect(r.code, r.stderr).toBe(4);
    const err = r.stderr.trim().split('\n');
    expect(err).toEqual([
      'certa: series "short": no model in this batch: its forecast failed (see batch.csv); forecast it again once it can be',
      'certa: series "kiosk-9": no model in this batch: the batch was not forecast for it; forecast it with certa forecast first',
    ]);

    const table = rawRecords(readFileSync(join(batch, 'updates.csv'), 'utf8'));
    expect(table[0].text).toBe('position,series,folder,status,reason,rows_added,last_time,alarms,policy,structure,warnings\r\n');
    const rows = table.slice(1).map((x) => ({ position: x.fields[0], series: x.fields[1].replace(/^"|"$/g, ''), status: x.fields[3], added: x.fields[5], last: x.fields[6] }));
    expect(rows.map((x) => [x.series, x.status])).toEqual([
      ['kiosk-1', 'updated'],
      ['a b', 'updated'],
      ['a/b', 'updated'],
      ['short', 'failed'],
      ['kiosk-2', 'unchanged'],
      ['kiosk-3', 'unchanged'],
      ['kiosk-9', 'failed'],
    ]);
    expect(rows.map((x) => x.position)).toEqual(['1', '2', '3', '4', '5', '6', '']);
    for (const x of rows.filter((y) => y.status === 'updated')) expect([x.added, x.last]).toEqual(['2', '2024-02']);
    expect(table[6].fields[4]).toBe('not in the new data');

    // The updated series' models now end two months later; the others are untouched.
    const after = fileTree(batch);
    for (const name of ['kiosk-1', 'a b', 'a/b']) {
      const model = JSON.parse(readFileSync(join(batch, folderOf(name), 'model.json'), 'utf8'));
      expect(model.body.series.lastTimeLabel).toBe('2024-02');
      expect(existsSync(join(batch, folderOf(name), 'model.prev.json'))).toBe(true);
    }
    for (const name of ['kiosk-2', 'kiosk-3']) {
      for (const [path, bytes] of before) if (path.startsWith(`${folderOf(name)}/`)) expect(after.get(path), path).toBe(bytes);
    }
    // index.html: the forecast run's page with what the update did
    const index = readFileSync(join(batch, 'index.html'), 'utf8');
    expect(index).toContain('Last update (updates.csv): 3 updated, 2 unchanged, 2 failed; 0 drift alarms; 1 series of the new data without a model here.');
    expect(index).toContain('<span class="tag good">updated</span> <span class="note">2 new rows to 2024-02</span>');
    expect(index).toContain('<span class="note">not in the new data</span>');
    expect(after.get('batch.csv')).toBe(before.get('batch.csv'));
    expect(after.get('batch.json')).toBe(before.get('batch.json'));
    expect(existsSync(join(batch, 'batch.json.lock'))).toBe(false);

    // forecasts.csv: the batch's series in order; an updated series' records are its new
    // forecast rows (its forecast.csv without rolling_point), the others' records are kept.
    const old = rawRecords(before.has('forecasts.csv') ? Buffer.from(before.get('forecasts.csv')!, 'base64').toString('utf8') : '');
    const now = rawRecords(readFileSync(join(batch, 'forecasts.csv'), 'utf8'));
    expect(now[0].text).toBe(old[0].text);
    const bySeries = (records: typeof now, name: string) => records.slice(1).filter((x) => x.fields[0].replace(/^"|"$/g, '') === name);
    for (const name of ['kiosk-1', 'a b', 'a/b']) {
      const own = rawRecords(readFileSync(join(batch, folderOf(name), 'forecast.csv'), 'utf8')).filter((x) => x.fields[2] === 'forecast');
      expect(own).toHaveLength(6);
      expect(bySeries(now, name).map((x) => x.fields)).toEqual(own.map((x) => [...x.fields.slice(0, 5), ...x.fields.slice(6)]));
      expect(bySeries(now, name)[0].fields[1]).toBe('2024-03');
    }
    for (const name of ['kiosk-2', 'kiosk-3']) expect(bySeries(now, name).map((x) => x.text)).toEqual(bySeries(old, name).map((x) => x.text));
    expect([...new Set(now.slice(1).map((x) => x.fields[0].replace(/^"|"$/g, '')))]).toEqual(['kiosk-1', 'a b', 'a/b', 'kiosk-2', 'kiosk-3']);

    // The text: one line per series, totals, the caution once.
    const lines = r.stdout.trim().split('\n');
    expect(lines.slice(0, 7).map((l) => l.split(/\s+/)[0])).toEqual(['updated', 'updated', 'updated', 'failed', 'unchanged', 'unchanged', 'failed']);
    expect(r.stdout).toContain('7 series: 3 updated, 2 unchanged, 2 failed; 0 drift alarms');
    expect(r.stdout.match(/statistical extrapolations/g)).toHaveLength(1);
  });

  it('writes each series the files `certa update` on its model alone writes', () => {
    const batch = copyBatch(join(dir, 'same'));
    expect(update(batch, '--no-report').code).toBe(4);
    const together = fileTree(batch);
    copyBatch(batch);
    for (const name of ['kiosk-1', 'a b', 'a/b']) {
      const r = runCli(['update', join(batch, folderOf(name), 'model.json'), newRows, '--id', 'kiosk', '--series', name.replace(/,/g, '\\,'), '--no-charts', '--no-report']);
      expect(r.code, r.stderr).toBe(0);
    }
    const alone = fileTree(batch);
    for (const name of ['kiosk-1', 'a b', 'a/b']) {
      const files = [...alone.keys()].filter((p) => p.startsWith(`${folderOf(name)}/`));
      expect(files.length).toBeGreaterThan(4);
      for (const p of files) expect(together.get(p), p).toBe(alone.get(p));
    }
  });

  it('mends forecasts.csv when a run stopped after updating a series but before writing the tables', () => {
    const batch = copyBatch(join(dir, 'mend'));
    // kiosk-1's model learns the new rows alone, as a batch run cut short after it would have left it
    const single = runCli(['update', join(batch, folderOf('kiosk-1'), 'model.json'), newRows, '--id', 'kiosk', '--series', 'kiosk-1', '--no-charts', '--no-report']);
    expect(single.code, single.stderr).toBe(0);
    const r = update(batch, '--no-report');
    expect(r.code).toBe(4);
    const rows = rawRecords(readFileSync(join(batch, 'updates.csv'), 'utf8')).slice(1);
    expect(rows[0].fields.slice(1, 4)).toEqual(['kiosk-1', folderOf('kiosk-1'), 'unchanged']);
    const now = rawRecords(readFileSync(join(batch, 'forecasts.csv'), 'utf8')).filter((x) => x.fields[0] === 'kiosk-1');
    const own = rawRecords(readFileSync(join(batch, folderOf('kiosk-1'), 'forecast.csv'), 'utf8')).filter((x) => x.fields[2] === 'forecast');
    expect(now.map((x) => x.fields)).toEqual(own.map((x) => [...x.fields.slice(0, 5), ...x.fields.slice(6)]));
    // kiosk-2 (no new row, never updated) keeps the forecast run's records, holdout rows included
    const old = rawRecords(readFileSync(join(original, 'forecasts.csv'), 'utf8')).filter((x) => x.fields[0] === 'kiosk-2');
    expect(rawRecords(readFileSync(join(batch, 'forecasts.csv'), 'utf8')).filter((x) => x.fields[0] === 'kiosk-2').map((x) => x.text)).toEqual(old.map((x) => x.text));
    expect(old.some((x) => x.fields[2] === 'holdout')).toBe(true);
  });

  it('writes the same bytes with one worker and with three', () => {
    const one = copyBatch(join(dir, 'w1'));
    const three = join(dir, 'w3');
    cpSync(original, three, { recursive: true });
    // the same path for both runs: summary.json names the model file
    const a = update(one, '--workers', '1');
    const treeOne = fileTree(one);
    copyBatch(one);
    const b = update(one, '--workers', '3');
    expect([a.code, b.code]).toEqual([4, 4]);
    expect(b.stdout).toBe(a.stdout);
    expect(b.stderr).toBe(a.stderr);
    expect(fileTree(one)).toEqual(treeOne);
  });

  it('--json: one result document of the series of the file', () => {
    const batch = copyBatch(join(dir, 'json'));
    const r = update(batch, '--json');
    expect(r.code).toBe(4);
    const doc = parseResult(r.stdout);
    expect(doc.command).toBe('update');
    expect(doc.results.map((e: { series: string; status: string }) => [e.series, e.status])).toEqual([
      ['kiosk-1', 'ok'],
      ['a b', 'ok'],
      ['a/b', 'ok'],
      ['short', 'failed'],
      ['kiosk-2', 'ok'],
      ['kiosk-9', 'failed'],
    ]);
    expect(doc.totals).toEqual({ series: 6, succeeded: 4, failed: 2 });
    expect(doc.results[0].detail.update.rows_added).toBe(2);
    expect(doc.results[4].detail.update.rows_added).toBe(0);
    expect(r.stderr).toContain('2 of 7 series failed (see updates.csv');
  });

  it('--fail-fast stops at the first series without a model before updating any', () => {
    const batch = copyBatch(join(dir, 'fast'));
    const before = fileTree(batch);
    const r = update(batch, '--fail-fast');
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('certa: series "short": no model in this batch: its forecast failed (see batch.csv); forecast it again once it can be\n');
    expect(fileTree(batch)).toEqual(before);
  });

  it('updates a shard’s folder with the whole file: only the series of that shard', () => {
    const shard = join(dir, 'shard-1');
    const file = join(dir, 'kiosks.csv');
    expect(runCli(['forecast', file, '--id', 'kiosk', '--horizon', '6', '--no-charts', '--no-report', '--out', shard, '--shard', '1/2']).code).toBeGreaterThanOrEqual(0);
    const r = update(shard, '--no-report');
    const mine = [...NAMES, 'kiosk-9'].filter((n) => shardOf(n, 2) === 1);
    const listed = rawRecords(readFileSync(join(shard, 'updates.csv'), 'utf8'))
      .slice(1)
      .map((x) => x.fields[1].replace(/^"|"$/g, ''));
    expect(listed).toEqual(mine);
    expect(r.code).toBe(mine.includes('short') || mine.includes('kiosk-9') ? 4 : 0);
    expect(r.stdout).toContain(`${mine.length} series (shard 1 of 2)`);
  });

  it('--fail-on-drift: exit 3 after writing when a series stops obeying its model', () => {
    const batch = copyBatch(join(dir, 'drift'));
    const jump = newData(3);
    const r = runCli(['update', batch, jump, '--id', 'kiosk', '--no-charts', '--no-report', '--series', 'kiosk-1,kiosk-2', '--fail-on-drift']);
    expect(r.code, r.stderr).toBe(3);
    const rows = rawRecords(readFileSync(join(batch, 'updates.csv'), 'utf8')).slice(1);
    const k1 = rows.find((x) => x.fields[1] === 'kiosk-1')!;
    expect(k1.fields[3]).toBe('updated');
    expect(Number(k1.fields[7])).toBeGreaterThan(0);
    expect(r.stdout).toMatch(/updated {4}kiosk-1: 2 new rows to 2024-02; \d+ drift alarms? \(warn\)/);
  });

  it('takes one new month per series written as a date (2024-01-01) as the models’ month, in a batch and alone', () => {
    const batch = copyBatch(join(dir, 'dated'));
    const dated = join(dir, 'dated.csv');
    writeFileSync(dated, 'kiosk,month,sales\nkiosk-1,2024-01-01,101.5\nkiosk-2,2024-01-01,99.25\n');
    const r = runCli(['update', batch, dated, '--id', 'kiosk', '--no-charts', '--no-report']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('updated    kiosk-1: 1 new row to 2024-01');
    expect(r.stdout).toContain('updated    kiosk-2: 1 new row to 2024-01');
    writeFileSync(join(dir, 'dated-3.csv'), 'month,sales\n2024-01-01,88\n');
    const ok = runCli(['update', join(batch, folderOf('kiosk-3'), 'model.json'), join(dir, 'dated-3.csv'), '--no-charts', '--no-report']);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stdout).toMatch(/^certa update: kiosk-3: 1 new row \(2024-01 to 2024-01\)/);
  });

  it('refuses --levels other than the batch’s and --out, in one line each (exit 2)', () => {
    const batch = copyBatch(join(dir, 'refuse'));
    const before = fileTree(batch);
    const levels = update(batch, '--levels', '80');
    expect(levels.code).toBe(2);
    expect(levels.stderr.split('\n')[0]).toBe(`certa: ${join(batch, 'batch.json')}: --levels 80 differs from the batch's levels (50,90) (found "--levels 80", expected the batch's levels 50,90: forecasts.csv has one set of band columns)`);
    const out = update(batch, '--out', join(dir, 'elsewhere'));
    expect(out.code).toBe(2);
    expect(out.stderr).toMatch(/^certa: --out names the folder of one model’s files; a batch folder is updated in place/);
    expect(fileTree(batch)).toEqual(before);
    const notBatch = runCli(['update', dir, newRows, '--id', 'kiosk']);
    expect(notBatch.code).toBe(2);
    expect(notBatch.stderr.split('\n')[0]).toBe(`certa: ${dir}: the folder holds neither a model (model.json) nor a batch (batch.json) (expected a model.json written by certa forecast or certa search, or a batch folder written by certa forecast over a file of several series)`);
  });

  it('takes the folder of one series as its model', () => {
    const batch = copyBatch(join(dir, 'one'));
    const folder = join(batch, folderOf('kiosk-1'));
    const r = runCli(['update', folder, newRows, '--id', 'kiosk', '--series', 'kiosk-1', '--no-charts', '--no-report', '--json']);
    expect(r.code, r.stderr).toBe(0);
    const doc = parseResult(r.stdout);
    expect(doc.results.map((e: { series: string; folder: string }) => [e.series, e.folder])).toEqual([['kiosk-1', folder]]);
    expect(JSON.parse(readFileSync(join(folder, 'model.json'), 'utf8')).body.series.lastTimeLabel).toBe('2024-02');
    // --quiet: nothing on standard output (the rows are known now: nothing to learn)
    const again = runCli(['update', folder, newRows, '--id', 'kiosk', '--series', 'kiosk-1', '--quiet']);
    expect([again.code, again.stdout, again.stderr]).toEqual([0, '', '']);
  });
});
