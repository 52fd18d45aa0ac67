/**
 * Batches through the built CLI: a long-layout file of invented monthly kiosk sales of the
 * Corvel district, with names that used to collide or escape and one series too short to fit.
 * Checks keep-going (exit 4, batch.csv, stderr, no folder for the failed series), --fail-fast,
 * folder names, output independent of the worker count, shards merged equal to one run byte
 * for byte, the --json result shape, --series lists and globs, and --quiet.
 */
import { cpSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { folderNames } from '../../src/batch/folder-names.js';
import { rawRecords } from '../../src/batch/csv-records.js';
import { CHART_ASSET, chartLibraryScript } from '../../src/report/html.js';
import { ensureBuilt, runCli } from './run-cli.js';
import { parseResult } from './result.js';
import { lcgNoise, fileTree } from './in-process.js';

const NAMES = ['kiosk-1', 'a b', 'a_b', 'a/b', '../x', 'CON', 'short', 'kiosk-2'];
let dir: string;
let file: string;

function writeFile(): string {
  const rows = ['kiosk,month,sales'];
  NAMES.forEach((name, k) => {
    const n = name === 'short' ? 4 : 36;
    const r = lcgNoise(100 + k);
    for (let t = 0; t < n; t++) {
      const y = 80 + 6 * k + 0.4 * t + 7 * Math.sin((2 * Math.PI * t) / 12) + 3 * r();
      rows.push(`"${name}",${2021 + Math.floor(t / 12)}-${String((t % 12) + 1).padStart(2, '0')},${y.toFixed(2)}`);
    }
  });
  const p = join(dir, 'kiosks.csv');
  writeFileSync(p, `${rows.join('\n')}\n`);
  return p;
}

const base = () => ['forecast', file, '--id', 'kiosk', '--no-charts', '--horizon', '6'];

beforeAll(() => {
  ensureBuilt();
  process.env.SOURCE_DATE_EPOCH = '1700000000';
  dir = mkdtempSync(join(tmpdir(), 'certa-batch-'));
  file = writeFile();
});

describe('certa forecast on a file of several series', () => {
  it('keeps going past a series that cannot be forecast: exit 4, batch.csv, stderr, no folder left for it', () => {
    const out = join(dir, 'keep');
    const r = runCli([...base(), '--out', out]);
    expect(r.code, r.stderr).toBe(4);
    expect(r.stderr).toMatch(/^certa: series "short" has 4 points/m);
    const folders = folderNames(NAMES);
    const shortFolder = folders[NAMES.indexOf('short')];
    expect(existsSync(join(out, shortFolder))).toBe(false);
    const listed = readdirSync(out).sort();
    expect(listed).toEqual([...folders.filter((f) => f !== shortFolder), 'assets', 'batch.csv', 'batch.json', 'forecasts.csv', 'index.html'].sort());
    // one copy of the chart library at the top, loaded by every series' report
    expect(readdirSync(join(out, 'assets'))).toEqual(['charts.js']);
    expect(readFileSync(join(out, CHART_ASSET), 'utf8')).toBe(chartLibraryScript());
    for (const f of folders.filter((x) => x !== shortFolder)) {
      const report = readFileSync(join(out, f, 'report.html'), 'utf8');
      expect(report).toContain('<script src="../assets/charts.js"></script>');
      expect(report).not.toContain(chartLibraryScript().slice(0, 200));
    }
    expect(r.stdout).toContain(`Wrote batch.csv, batch.json, forecasts.csv, index.html, ${CHART_ASSET} and one folder per forecast series`);
    for (const f of folders.filter((x) => x !== shortFolder)) expect(existsSync(join(out, f, 'forecast.csv'))).toBe(true);

    // index.html links the report of every forecast series by its folder, and not the failed one.
    const index = readFileSync(join(out, 'index.html'), 'utf8');
    for (const f of folders.filter((x) => x !== shortFolder)) {
      expect(existsSync(join(out, f, 'report.html'))).toBe(true);
      expect(index).toContain(`href="${f.split('/').map(encodeURIComponent).join('/')}/report.html"`);
    }
    expect(index).toContain('8 series: 7 forecast, 1 not');
    expect(index).not.toContain(`${encodeURIComponent(shortFolder)}/report.html`);
    // batch.json holds the rows of batch.csv as data.
    const manifest = JSON.parse(readFileSync(join(out, 'batch.json'), 'utf8'));
    expect(manifest.report).toBe(true);
    expect(manifest.series.map((x: { status: string }) => x.status)).toEqual(NAMES.map((n) => (n === 'short' ? 'failed' : 'forecast')));

    const batch = rawRecords(readFileSync(join(out, 'batch.csv'), 'utf8'));
    expect(batch[0].text).toBe('position,series,folder,status,reason,structure,holdout_mase,best_baseline,baseline_mase,warnings\r\n');
    expect(batch.slice(1).map((x) => x.fields[3])).toEqual(NAMES.map((n) => (n === 'short' ? 'failed' : 'forecast')));
    expect(batch.slice(1).map((x) => Number(x.fields[0]))).toEqual(NAMES.map((_, i) => i + 1));
    const failed = batch.find((x) => x.fields[1] === 'short')!;
    expect(failed.fields[2]).toBe('');
    expect(failed.fields[4]).toMatch(/4 points/);
    for (const x of batch.slice(1).filter((y) => y.fields[3] === 'forecast')) expect(Number(x.fields[6])).toBeGreaterThan(0);

    // forecasts.csv: holdout and forecast rows of every forecast series, in file order.
    const fc = rawRecords(readFileSync(join(out, 'forecasts.csv'), 'utf8'));
    expect(fc[0].text).toBe('series,time,kind,value,point,lower_50,upper_50,lower_90,upper_90\r\n');
    const order = [...new Set(fc.slice(1).map((x) => x.fields[0]))];
    expect(order).toEqual(['kiosk-1', 'a b', 'a_b', 'a/b', '../x', 'CON', 'kiosk-2']);
    expect(fc.slice(1).filter((x) => x.fields[0] === 'kiosk-1' && x.fields[2] === 'forecast')).toHaveLength(6);

    // The text: one line per series, totals, the caution once.
    const lines = r.stdout.trim().split('\n');
    expect(lines.slice(0, NAMES.length).map((l) => l.split(/\s+/)[0])).toEqual(NAMES.map((n) => (n === 'short' ? 'failed' : 'forecast')));
    expect(r.stdout).toContain('8 series: 7 forecast, 1 failed');
    expect(r.stdout.match(/statistical extrapolations/g)).toHaveLength(1);
  });

  it('gives "a b", "a_b" and "a/b" three folders, each summary naming its own series', () => {
    const out = join(dir, 'keep');
    const [f1, f2, f3] = folderNames(['a b', 'a_b', 'a/b']);
    expect(f2).toBe('a_b');
    for (const [f, name] of [[f1, 'a b'], [f2, 'a_b'], [f3, 'a/b']]) {
      const summary = JSON.parse(readFileSync(join(out, f, 'summary.json'), 'utf8'));
      expect(summary.series.name).toBe(name);
      expect(summary.out_dir).toBe(f);
    }
    expect(existsSync(join(dir, 'x'))).toBe(false);
  });

  it('--fail-fast stops at the failure with its one certa: line and exit 2, writing no tables', () => {
    const out = join(dir, 'fast');
    const r = runCli([...base(), '--out', out, '--fail-fast', '--series', 'short,kiosk-2', '--workers', '1']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^certa: series "short" has 4 points/);
    expect(existsSync(join(out, 'batch.csv'))).toBe(false);
  });

  it('writes the same bytes with 1 and 2 workers', () => {
    const one = join(dir, 'w1');
    const two = join(dir, 'w2');
    expect(runCli([...base(), '--out', one, '--workers', '1', '--quiet']).code).toBe(4);
    expect(runCli([...base(), '--out', two, '--workers', '2', '--quiet']).code).toBe(4);
    const a = fileTree(one);
    expect(a.size).toBeGreaterThan(30);
    expect(fileTree(two)).toEqual(a);
  });

  it('shards 1/3, 2/3, 3/3 merged equal one run byte for byte; merge refuses a missing shard', () => {
    const one = join(dir, 'w1');
    const shards = [1, 2, 3].map((k) => join(dir, `shard-${k}`));
    const seen: string[] = [];
    shards.forEach((s, i) => {
      const r = runCli([...base(), '--out', s, '--shard', `${i + 1}/3`]);
      expect([0, 4]).toContain(r.code);
      seen.push(...rawRecords(readFileSync(join(s, 'batch.csv'), 'utf8')).slice(1).map((x) => x.fields[1]));
    });
    expect(seen.length).toBe(NAMES.length);
    const merged = join(dir, 'merged');
    const m = runCli(['merge', shards[2], shards[0], shards[1], '--out', merged]);
    expect(m.code, m.stderr).toBe(0);
    const mergedTree = fileTree(merged);
    expect(mergedTree.size).toBeGreaterThan(30);
    expect(mergedTree).toEqual(fileTree(one));
    // the shared chart library is among the files merged
    expect(mergedTree.get(CHART_ASSET)).toBe(Buffer.from(chartLibraryScript()).toString('base64'));
    expect(m.stdout).toContain(`index.html and ${CHART_ASSET}`);

    // a shard whose chart library differs (another version of certa), or lacks it, is refused
    const altered = join(dir, 'shard-2-altered');
    cpSync(shards[1], altered, { recursive: true });
    writeFileSync(join(altered, CHART_ASSET), `${chartLibraryScript()}\n`);
    const differs = runCli(['merge', shards[0], altered, shards[2], '--out', join(dir, 'merged-altered')]);
    expect(differs.code).toBe(2);
    expect(differs.stderr).toMatch(/^certa: .*assets\/charts\.js differs from that of the other shards/);
    expect(existsSync(join(dir, 'merged-altered'))).toBe(false);
    rmSync(join(altered, 'assets'), { recursive: true });
    const lacks = runCli(['merge', shards[0], altered, shards[2], '--out', join(dir, 'merged-lacking')]);
    expect(lacks.code).toBe(2);
    expect(lacks.stderr).toMatch(/^certa: .*assets\/charts\.js is missing/);

    const missing = runCli(['merge', shards[0], shards[1], '--out', join(dir, 'merged-2')]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/^certa: shard 3\/3 missing/);
    const full = runCli(['merge', ...shards, '--out', merged]);
    expect(full.code).toBe(2);
    expect(full.stderr).toMatch(/target folder is not empty/);
  });

  it('--no-report writes no report.html, no index.html and no chart library', () => {
    const out = join(dir, 'no-report');
    const r = runCli([...base(), '--out', out, '--series', 'kiosk-*', '--no-report', '--quiet']);
    expect(r.code, r.stderr).toBe(0);
    expect(readdirSync(out).sort()).toEqual(['batch.csv', 'batch.json', 'forecasts.csv', 'kiosk-1', 'kiosk-2']);
    for (const f of ['kiosk-1', 'kiosk-2']) expect(readdirSync(join(out, f))).not.toContain('report.html');
    expect(JSON.parse(readFileSync(join(out, 'batch.json'), 'utf8')).report).toBe(false);
  });

  it('--json prints one result document for the batch, failures with their reason', () => {
    const r = runCli([...base(), '--out', join(dir, 'json'), '--json', '--series', 'kiosk-*,short']);
    expect(r.code).toBe(4);
    const doc = parseResult(r.stdout);
    expect(doc.command).toBe('forecast');
    expect(doc.totals).toEqual({ series: 3, succeeded: 2, failed: 1 });
    expect(doc.results.map((e: { series: string }) => e.series)).toEqual(['kiosk-1', 'short', 'kiosk-2']);
    const short = doc.results[1];
    expect(short).toMatchObject({ status: 'failed', folder: null, detail: null });
    expect(short.reason).toMatch(/4 points/);
    expect(doc.results[0].detail.format).toBe('certa-summary');
  });

  it('keeps going past a series that cannot even be read (a repeated month): its position, reason and exit 4', () => {
    const rows = readFileSync(file, 'utf8').trim().split('\n');
    const dup = rows.findIndex((l) => l.startsWith('"a_b",'));
    const p = join(dir, 'dup.csv');
    writeFileSync(p, `${[...rows.slice(0, dup + 1), rows[dup], ...rows.slice(dup + 1)].join('\n')}\n`);
    const out = join(dir, 'dup');
    const r = runCli(['forecast', p, '--id', 'kiosk', '--no-charts', '--horizon', '6', '--out', out, '--quiet']);
    expect(r.code, r.stderr).toBe(4);
    expect(r.stderr).toMatch(/^certa: .*dup\.csv.*series "a_b"|^certa: series "a_b": /m);
    const batch = rawRecords(readFileSync(join(out, 'batch.csv'), 'utf8')).slice(1);
    expect(batch.map((x) => x.fields[1])).toEqual(NAMES);
    const ab = batch[NAMES.indexOf('a_b')];
    expect(ab.fields[3]).toBe('failed');
    expect(ab.fields[4]).toMatch(/more than one row for 2021-01/);
    expect(existsSync(join(out, 'a_b'))).toBe(false);
    // The other folders keep the names one run over the clean file gives them.
    expect(existsSync(join(out, folderNames(NAMES)[NAMES.indexOf('a b')]))).toBe(true);
  });

  it('keeps going past a series with a cell that is not a number, naming its row; without it the file reads as before', () => {
    const rows = readFileSync(file, 'utf8').trim().split('\n');
    const at = rows.findIndex((l) => l.startsWith('"a b",')) + 3;
    const cells = rows[at].split(',');
    cells[cells.length - 1] = 'n/a?';
    rows[at] = cells.join(',');
    const p = join(dir, 'cell.csv');
    writeFileSync(p, `${rows.join('\n')}\n`);
    const out = join(dir, 'cell');
    const r = runCli(['forecast', p, '--id', 'kiosk', '--no-charts', '--horizon', '6', '--out', out, '--quiet']);
    expect(r.code, r.stderr).toBe(4);
    expect(r.stderr).toContain(`cell.csv:${at + 1}: column "sales": the cell is not a number`);
    expect(r.stderr).toContain('n/a?');
    const batch = rawRecords(readFileSync(join(out, 'batch.csv'), 'utf8')).slice(1);
    expect(batch.map((x) => x.fields[1])).toEqual(NAMES);
    expect(batch.map((x) => x.fields[3])).toEqual(NAMES.map((n) => (n === 'a b' || n === 'short' ? 'failed' : 'forecast')));
    expect(batch[NAMES.indexOf('a b')].fields[4]).toMatch(/not a number/);
    // --fail-fast: the bad cell stops the file with exit 2, as a file of one series does
    const fast = runCli(['forecast', p, '--id', 'kiosk', '--no-charts', '--horizon', '6', '--out', join(dir, 'cell-fast'), '--fail-fast']);
    expect(fast.code).toBe(2);
    expect(fast.stderr).toContain('n/a?');
  });

  it('certa search on the file: one folder per series by the same rule, the short series reported, exit 4', () => {
    const out = join(dir, 'search');
    const r = runCli(['search', file, '--id', 'kiosk', '--families', 'arx', '--json', '--out', out]);
    expect(r.code).toBe(4);
    const doc = parseResult(r.stdout);
    expect(doc.totals).toEqual({ series: NAMES.length, succeeded: NAMES.length - 1, failed: 1 });
    const folders = folderNames(NAMES);
    doc.results.forEach((e: { series: string; status: string; folder: string | null }, i: number) => {
      expect(e.series).toBe(NAMES[i]);
      expect(e.folder).toBe(e.series === 'short' ? null : join(out, folders[i]));
    });
    expect(r.stderr).toMatch(/^certa: series "short" has 4 points/m);
  });

  it('--series takes a list and globs, in file order, and names a pattern that matches nothing', () => {
    const out = join(dir, 'pick');
    const r = runCli([...base(), '--out', out, '--series', 'kiosk-2,a?b', '--quiet']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toBe('');
    const rows = rawRecords(readFileSync(join(out, 'batch.csv'), 'utf8')).slice(1);
    expect(rows.map((x) => x.fields[1])).toEqual(['a b', 'a_b', 'a/b', 'kiosk-2']);
    const none = runCli([...base(), '--series', 'west*']);
    expect(none.code).toBe(2);
    expect(none.stderr).toMatch(/^certa: .*no series matches the pattern "west\*"/);
  });
});
