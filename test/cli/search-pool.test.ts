/**
 * `certa search` on a file of several series, driven in-process (cli/main.ts): the series go
 * to the batch pool (src/batch/pool.ts; from the sources its worker entry is search-worker.ts,
 * loaded through tsx). A long-layout file of invented monthly ticket sales of the ferry
 * landings of the Harrow estuary, two of them too short to search. Checks: the folders, standard
 * output, standard error and the --json document are the same bytes with 1 and 3 workers and
 * with the default; each series' part equals what a search of that series alone writes; the
 * failures are reported in file order and the others completed (exit 4); --fail-fast stops at
 * the first failure in file order with its error (exit 2); --quiet; the help lists the options.
 */
import { mkdtempSync, renameSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.js';
import { searchJob } from '../../src/cli/search.js';
import { folderNames } from '../../src/batch/folder-names.js';
import type { Series } from '../../src/data/series.js';
import { parseResult } from './result.js';
import { capture, lcgNoise, fileTree } from './in-process.js';

const NAMES = ['quay-north', 'old pier', 'short', 'mill-steps', 'tiny', 'salt/marsh'];
const LENGTHS: Record<string, number> = { short: 4, tiny: 3 };
let dir: string;
let file: string;

function writeFile(): string {
  const rows = ['landing,month,tickets'];
  NAMES.forEach((name, k) => {
    const n = LENGTHS[name] ?? 48;
    const r = lcgNoise(300 + k);
    let prev = 150 + 20 * k;
    for (let t = 0; t < n; t++) {
      prev = 40 + 20 * k * 0.3 + 0.7 * prev + 12 * Math.sin((2 * Math.PI * (t + k)) / 12) + 5 * r();
      rows.push(`"${name}",${2020 + Math.floor(t / 12)}-${String((t % 12) + 1).padStart(2, '0')},${prev.toFixed(2)}`);
    }
  });
  const p = join(dir, 'landings.csv');
  writeFileSync(p, `${rows.join('\n')}\n`);
  return p;
}

interface Run {
  code: number;
  stdout: string;
  stderr: string;
  /** Every file written, by path relative to --out, with its bytes (base64). */
  files: Map<string, string>;
}

/**
 * A search of the file into `out`; the folder is then moved aside (to `out` plus a tag), so the
 * next run writes to the same path and prints the same paths.
 */
async function search(out: string, tag: string, extra: string[]): Promise<Run> {
  const c = capture();
  const code = await main(['node', 'certa', 'search', file, '--id', 'landing', '--out', out, ...extra], c.io);
  const files = fileTree(out);
  if (existsSync(out)) renameSync(out, `${out}-${tag}`);
  return { code, stdout: c.out(), stderr: c.err(), files };
}

const FAILED_LINE = /^certa: series "(short|tiny)" has \d points; the search needs at least/;

beforeAll(() => {
  process.env.SOURCE_DATE_EPOCH = '1700000000';
  dir = mkdtempSync(join(tmpdir(), 'certa-search-pool-'));
  file = writeFile();
});

describe('certa search on several series, by the worker pool', () => {
  it('writes the same files, text, failure lines and exit code with 1, 3 and the default number of workers', async () => {
    const out = join(dir, 'text');
    const one = await search(out, 'w1', ['--workers', '1']);
    const three = await search(out, 'w3', ['--workers', '3']);
    const auto = await search(out, 'auto', []);
    expect(one.code, one.stderr).toBe(4);
    // both failures, each one line, in file order
    const lines = one.stderr.split('\n').filter((l) => l !== '');
    expect(lines).toHaveLength(2);
    expect(lines[0]).toMatch(/^certa: series "short" /);
    expect(lines[1]).toMatch(/^certa: series "tiny" /);
    for (const l of lines) expect(l).toMatch(FAILED_LINE);
    // the completed series: candidates.csv and model.json each, in the folders of the batch rule
    const folders = folderNames(NAMES);
    const expected = NAMES.flatMap((n, i) => (LENGTHS[n] ? [] : [`${folders[i]}/candidates.csv`, `${folders[i]}/model.json`])).sort();
    expect([...one.files.keys()].sort()).toEqual(expected);
    for (const other of [three, auto]) {
      expect(other.code).toBe(one.code);
      expect(other.stdout).toBe(one.stdout);
      expect(other.stderr).toBe(one.stderr);
      expect(other.files).toEqual(one.files);
    }
  });

  it('shows "series k of n" on a terminal, cleared before each failure line and at the end', async () => {
    const out = join(dir, 'tty');
    const c = capture();
    const code = await main(['node', 'certa', 'search', file, '--id', 'landing', '--out', out, '--workers', '1'], { ...c.io, isTTY: true });
    expect(code).toBe(4);
    const err = c.err();
    const blank = `\r${' '.repeat(48)}\r`;
    expect(err).toContain(`\r${'series 6 of 6'.padEnd(48)}`);
    expect(err.endsWith(blank)).toBe(true);
    // what a terminal shows once each line is rewritten in place (the text after its last \r): the two failure lines
    const lines = err
      .split('\n')
      .map((l) => l.slice(l.lastIndexOf('\r') + 1))
      .filter((l) => l.trim() !== '');
    expect(lines.map((l) => l.match(/^certa: series "(\w+)"/)?.[1])).toEqual(['short', 'tiny']);
    // not on a pipe, nor with --quiet
    const quiet = capture();
    await main(['node', 'certa', 'search', file, '--id', 'landing', '--out', `${out}-q`, '--workers', '1', '--quiet'], { ...quiet.io, isTTY: true });
    expect(quiet.err()).not.toContain('series 1 of 6');
  });

  it('prints the same --json document with 1 and 3 workers, the failures with their reason', async () => {
    const out = join(dir, 'json');
    const one = await search(out, 'w1', ['--workers', '1', '--json']);
    const three = await search(out, 'w3', ['--workers', '3', '--json']);
    expect(one.code).toBe(4);
    expect(three.code).toBe(4);
    expect(three.stdout).toBe(one.stdout);
    expect(three.stderr).toBe(one.stderr);
    expect(three.files).toEqual(one.files);
    const doc = parseResult(one.stdout);
    expect(doc.command).toBe('search');
    expect(doc.totals).toEqual({ series: 6, succeeded: 4, failed: 2 });
    expect(doc.results.map((e: { series: string }) => e.series)).toEqual(NAMES);
    expect(doc.results.map((e: { status: string }) => e.status)).toEqual(NAMES.map((n) => (LENGTHS[n] ? 'failed' : 'ok')));
    const short = doc.results[NAMES.indexOf('short')];
    expect(short).toMatchObject({ folder: null, detail: null });
    expect(short.reason).toMatch(/^series "short" has 4 points/);
    expect(doc.results[0].detail.winner.terms.length).toBeGreaterThan(0);
  });

  it('gives each series what a search of that series alone gives it: text, files and the failure text', async () => {
    const out = join(dir, 'alone');
    const all = await search(out, 'all', ['--workers', '3']);
    const folders = folderNames(NAMES);
    const parts: string[] = [];
    for (let i = 0; i < NAMES.length; i++) {
      const name = NAMES[i];
      const c = capture();
      const code = await main(['node', 'certa', 'search', file, '--id', 'landing', '--series', name, '--out', join(out, folders[i])], c.io);
      if (LENGTHS[name]) {
        // alone, the failure is the command's error (exit 2) and the file writes nothing for it
        expect(code).toBe(2);
        const line = c.err().split('\n')[0];
        expect(all.stderr).toContain(`${line}\n`);
        parts.push(`series "${name}": failed: ${line.replace(/^certa: /, '')}\n`);
      } else {
        expect(code, c.err()).toBe(0);
        parts.push(c.out());
      }
    }
    expect(all.stdout).toBe(parts.join('\n'));
    expect(fileTree(out)).toEqual(all.files);
  });

  it('--fail-fast stops at the first failure in file order with its error and exit code 2, whatever the workers', async () => {
    const out = join(dir, 'fast');
    const one = await search(out, 'w1', ['--workers', '1', '--fail-fast']);
    const three = await search(out, 'w3', ['--workers', '3', '--fail-fast']);
    for (const r of [one, three]) {
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr.split('\n')[0]).toMatch(/^certa: series "short" has 4 points/);
      expect(r.stderr).not.toContain('"tiny"');
      // the series before the failure are complete
      const folders = folderNames(NAMES);
      expect(r.files.has(`${folders[0]}/model.json`)).toBe(true);
      expect(r.files.has(`${folders[1]}/model.json`)).toBe(true);
    }
    expect(three.stderr).toBe(one.stderr);
  });

  it('--quiet prints nothing on standard output; the files, the failure lines and the exit code stay', async () => {
    const out = join(dir, 'quiet');
    const loud = await search(out, 'loud', ['--workers', '2']);
    const quiet = await search(out, 'quiet', ['--workers', '2', '--quiet']);
    expect(quiet.code).toBe(4);
    expect(quiet.stdout).toBe('');
    expect(quiet.stderr).toBe(loud.stderr);
    expect(quiet.files).toEqual(loud.files);
  });

  it('refuses an unusable --workers with one line and exit code 2, and takes no --shard', async () => {
    const c = capture();
    expect(await main(['node', 'certa', 'search', file, '--id', 'landing', '--workers', '0'], c.io)).toBe(2);
    expect(c.err()).toBe('certa: option --workers has an unusable value (found "0", expected a whole number from 1 to 256)\n');
    const s = capture();
    expect(await main(['node', 'certa', 'search', file, '--id', 'landing', '--shard', '1/2'], s.io)).toBe(2);
    expect(s.err()).toMatch(/^certa: unknown option '--shard'\n/);
  });

  it('lists --workers, --fail-fast and --quiet in its help', async () => {
    const c = capture();
    expect(await main(['node', 'certa', 'search', '--help'], c.io)).toBe(0);
    const help = c.out();
    expect(help).toMatch(/--workers <n>\s+worker threads for a file of several series \(default:\s+one per core\)/);
    expect(help).toMatch(/--fail-fast\s+stop at the first series that cannot be searched/);
    expect(help).toMatch(/--quiet\s+print nothing on standard output/);
    expect(help).not.toContain('--shard');
  });
});

describe('searchJob (the task a worker runs)', () => {
  it('returns a bug as an outcome marked internal, with its stack, not as an exception', async () => {
    // values missing entirely: no user's file can give this, so what breaks is a bug
    const broken = { name: 'broken', frequency: 'monthly', season: 12, time: new Float64Array(30), inputs: [] } as unknown as Series;
    const o = await searchJob({ position: 3, series: broken, folder: join(dir, 'broken') }, { opts: {} });
    expect(o.position).toBe(3);
    expect(o.error?.internal).toBe(true);
    expect(o.entry).toMatchObject({ series: 'broken', status: 'failed', folder: null, detail: null });
    expect(o.entry.reason).toMatch(/^series "broken": internal error: /);
    expect(o.stack).toContain(o.error!.message);
    expect(existsSync(join(dir, 'broken'))).toBe(false);
  });

  it('returns a user-caused failure with its line and exit code 2', async () => {
    const time = Float64Array.from({ length: 4 }, (_, t) => Date.UTC(2020, t, 1));
    const short: Series = { name: 'four', frequency: 'monthly', season: 12, time, values: Float64Array.from([5, 6, 7, 6]), inputs: [] };
    const o = await searchJob({ position: 1, series: short, folder: join(dir, 'four') }, { opts: {} });
    expect(o.error).toMatchObject({ internal: false, exitCode: 2 });
    expect(o.text).toBe(`series "four": failed: ${o.error!.line}\n`);
    expect(o.stack).toBeNull();
  });
});
