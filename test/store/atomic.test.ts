import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { StoreError } from '../../src/data/errors.js';
import { isTemporaryName, temporaryPath, writeFileAtomic, writeFileAtomicSync } from '../../src/store/atomic.js';

let dir: string;
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'certa-atomic-'));
});
afterEach(() => {
  rmSync(dir, { recursive: true, force: true });
});

describe('writeFileAtomic', () => {
  it('creates a new file with exactly the data and leaves no temporary file', async () => {
    const target = join(dir, 'model.json');
    await writeFileAtomic(target, '{"a":1}\n');
    expect(readFileSync(target, 'utf8')).toBe('{"a":1}\n');
    expect(readdirSync(dir)).toEqual(['model.json']);
  });

  it('replaces an existing file and accepts bytes', async () => {
    const target = join(dir, 'model.json');
    writeFileSync(target, 'old content that is longer than the new one');
    await writeFileAtomic(target, new Uint8Array([110, 101, 119]));
    expect(readFileSync(target, 'utf8')).toBe('new');
    expect(readdirSync(dir)).toEqual(['model.json']);
  });

  it('leaves no temporary files after many writes, in parallel too', async () => {
    const target = join(dir, 'model.json');
    await Promise.all(Array.from({ length: 20 }, (_, i) => writeFileAtomic(target, `body ${i}`)));
    const content = readFileSync(target, 'utf8');
    expect(content).toMatch(/^body \d+$/);
    expect(readdirSync(dir)).toEqual(['model.json']);
  });

  it('refuses a missing folder with StoreError write-failed, and creates it with mkdir: true', async () => {
    const target = join(dir, 'a', 'b', 'model.json');
    const err = await writeFileAtomic(target, 'x').catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StoreError);
    expect((err as StoreError).code).toBe('write-failed');
    expect((err as StoreError).context.file).toBe(target);
    await writeFileAtomic(target, 'x', { mkdir: true });
    expect(readFileSync(target, 'utf8')).toBe('x');
  });

  it('removes its temporary file when the rename fails (target is a folder)', async () => {
    const target = join(dir, 'model.json');
    mkdirSync(join(target, 'inside'), { recursive: true });
    const err = await writeFileAtomic(target, 'x').catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StoreError);
    expect(readdirSync(dir)).toEqual(['model.json']);
  });
});

describe('writeFileAtomicSync', () => {
  it('replaces the file and leaves no temporary file; removes it on failure', () => {
    const target = join(dir, 'model.json');
    writeFileAtomicSync(target, 'one');
    writeFileAtomicSync(target, 'two');
    expect(readFileSync(target, 'utf8')).toBe('two');
    expect(readdirSync(dir)).toEqual(['model.json']);
    const bad = join(dir, 'folder');
    mkdirSync(join(bad, 'x'), { recursive: true });
    expect(() => writeFileAtomicSync(bad, 'y')).toThrow(StoreError);
    expect(readdirSync(dir).sort()).toEqual(['folder', 'model.json']);
  });
});

describe('temporaryPath / isTemporaryName', () => {
  it('names are unique per call, in the same folder, and recognised', () => {
    const a = temporaryPath(join(dir, 'model.json'));
    const b = temporaryPath(join(dir, 'model.json'));
    expect(a).not.toBe(b);
    expect(a.startsWith(join(dir, '.model.json.'))).toBe(true);
    const name = a.slice(dir.length + 1);
    expect(isTemporaryName(name, 'model.json')).toBe(true);
    expect(isTemporaryName('model.json', 'model.json')).toBe(false);
    expect(isTemporaryName('.model.json.x.1.tmp', 'model.json')).toBe(false);
  });
});
