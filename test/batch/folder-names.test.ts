/**
 * folderNames: the rule of src/batch/folder-names.ts, checked on the names that used to collide
 * or escape, and as properties (fast-check) over arbitrary name sets: injective even ignoring
 * case, one path segment that stays inside the batch folder, bounded length.
 */
import { createHash } from 'node:crypto';
import { join, relative, resolve, sep } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { cleanedStem, folderNames, isSafeFolderName, TOP_LEVEL_NAMES } from '../../src/batch/folder-names.js';
import { CHART_ASSET } from '../../src/report/html.js';

const hash8 = (s: string) => createHash('sha256').update(s, 'utf8').digest('hex').slice(0, 8);

describe('folderNames', () => {
  it('keeps a safe name and gives "a b" and "a/b" their own hashed folders beside "a_b"', () => {
    const f = folderNames(['a_b', 'a b', 'a/b']);
    expect(f).toEqual(['a_b', `a_b~${hash8('a b')}`, `a_b~${hash8('a/b')}`]);
    expect(new Set(f).size).toBe(3);
  });

  it('never leaves the folder: ../x, /etc/x, a name of dots, newlines, backslashes', () => {
    const names = ['../x', '/etc/x', '..', '.', '.hidden', 'two\nlines', 'C:\\win', ''];
    const out = resolve('/batch');
    for (const f of folderNames(names)) {
      expect(f).not.toContain('/');
      expect(f).not.toContain('\\');
      expect(f.startsWith('.')).toBe(false);
      expect(relative(out, join(out, f)).startsWith('..')).toBe(false);
      expect(join(out, f).startsWith(out + sep)).toBe(true);
    }
    expect(folderNames(['..'])[0]).toBe(`series~${hash8('..')}`);
    expect(folderNames(['two\nlines'])[0]).toBe(`two_lines~${hash8('two\nlines')}`);
  });

  it('renames device names any case and with an extension: CON, nul, Com1.txt', () => {
    for (const n of ['CON', 'nul', 'Com1.txt', 'LPT9', 'aux']) {
      expect(isSafeFolderName(n)).toBe(false);
      expect(folderNames([n])[0]).toBe(`${n}~${hash8(n)}`);
    }
    expect(isSafeFolderName('CONTOSO')).toBe(true);
  });

  it('renames the names the batch folder uses at its top, any case: assets, Index.html, batch.csv', () => {
    for (const n of ['assets', 'ASSETS', 'Index.html', 'batch.csv', 'batch.json', 'forecasts.csv']) {
      expect(isSafeFolderName(n)).toBe(false);
      expect(folderNames([n])[0]).toBe(`${n}~${hash8(n)}`);
    }
    expect(TOP_LEVEL_NAMES).toContain(CHART_ASSET.split('/')[0]);
    expect(isSafeFolderName('assets-2025')).toBe(true);
  });

  it('cuts long names to 64 characters plus the hash, and tells apart names equal in their first 64', () => {
    const a = `${'x'.repeat(100)}a`;
    const b = `${'x'.repeat(100)}b`;
    const [fa, fb] = folderNames([a, b]);
    expect(fa).toBe(`${'x'.repeat(64)}~${hash8(a)}`);
    expect(fa).not.toBe(fb);
    expect(isSafeFolderName('y'.repeat(64))).toBe(true);
    expect(isSafeFolderName('y'.repeat(65))).toBe(false);
  });

  it('hashes names that differ only in case, which would meet on a case-insensitive disk', () => {
    const f = folderNames(['North', 'north', 'south']);
    expect(f).toEqual([`North~${hash8('North')}`, `north~${hash8('north')}`, 'south']);
  });

  it('depends on the set of names only: a shard of the names keeps its folders', () => {
    const names = ['a b', 'a_b', 'Sales', 'sales', 'ok'];
    const all = folderNames(names);
    // The CLI computes folders over the whole file before choosing a shard; this pins the rule.
    expect(folderNames([...names].reverse())).toEqual([...all].reverse());
  });

  it('is injective, contained and bounded for any set of names (property)', () => {
    const name = fc.oneof(fc.string({ maxLength: 80 }), fc.constantFrom('a b', 'a_b', 'a/b', '..', 'CON', 'Ä', 'A\u0308', '~', 'x~1', 'assets', 'Assets', 'index.html'));
    fc.assert(
      fc.property(fc.uniqueArray(name, { maxLength: 30 }), (names) => {
        const f = folderNames(names);
        expect(new Set(f.map((x) => x.toLowerCase())).size).toBe(names.length);
        for (const x of f) {
          expect(x).toMatch(/^[\p{L}\p{N}_-][\p{L}\p{N}._~-]*$/u);
          expect(Array.from(x).length).toBeLessThanOrEqual(64 + 1 + 64);
          expect(TOP_LEVEL_NAMES.map((t) => t.toLowerCase())).not.toContain(x.toLowerCase());
        }
      }),
      { seed: 13, numRuns: 300 },
    );
  });

  it('cleanedStem replaces runs of other characters by one underscore and drops leading dots', () => {
    expect(cleanedStem('../etc//x')).toBe('_etc_x');
    expect(cleanedStem('...')).toBe('series');
  });
});
