import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { StoreError } from '../../src/data/errors.js';
import { createRng } from '../../src/linalg/random.js';
import { canonicalJson } from '../../src/store/canonical-json.js';
import {
  bodyChecksum,
  MODEL_FORMAT,
  MODEL_VERSION,
  parseModel,
  previousPath,
  readModelFile,
  serializeModel,
  writeModelFile,
  type ModelBody,
} from '../../src/store/model-file.js';
import { sampleBody } from './fixtures/sample-body.js';

let dir: string;
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'certa-model-'));
});
afterEach(() => {
  rmSync(dir, { recursive: true, force: true });
});

function storeError(fn: () => unknown): StoreError {
  try {
    fn();
  } catch (e) {
    if (e instanceof StoreError) return e;
    throw new Error(`expected a StoreError, got ${String(e)}`);
  }
  throw new Error('expected a StoreError, nothing was thrown');
}

/** Rewrites the envelope of a serialised model (for building damaged files). */
function editEnvelope(text: string, edit: (env: { format: string; version: number; checksum: string; body: ModelBody }) => void): string {
  const env = JSON.parse(text);
  edit(env);
  return JSON.stringify(env, null, 2);
}

describe('serializeModel / parseModel', () => {
  it('round-trips a body exactly', () => {
    const body = sampleBody();
    const text = serializeModel(body);
    expect(parseModel(text, 'model.json')).toEqual(body);
  });

  it('writes the envelope format, version and checksum = sha256 of the canonical body', () => {
    const body = sampleBody(1);
    const env = JSON.parse(serializeModel(body));
    expect(env.format).toBe(MODEL_FORMAT);
    expect(env.version).toBe(MODEL_VERSION);
    // the checksum recomputed here with node:crypto directly over canonicalJson(body)
    const expected = `sha256:${createHash('sha256').update(canonicalJson(body)).digest('hex')}`;
    expect(env.checksum).toBe(expected);
    expect(bodyChecksum(body)).toBe(expected);
  });

  it('gives the same text whatever the member order of the body (reproducible checksum)', () => {
    const body = sampleBody(2);
    const reversed = Object.fromEntries(Object.entries(body).reverse()) as ModelBody;
    expect(serializeModel(reversed)).toBe(serializeModel(body));
  });

  it('accepts the same file re-indented (checksum is over canonical JSON, not the text)', () => {
    const text = serializeModel(sampleBody());
    const compact = JSON.stringify(JSON.parse(text));
    expect(parseModel(compact, 'model.json')).toEqual(sampleBody());
  });

  it('refuses a tampered body with StoreError checksum-mismatch saying so', () => {
    const text = editEnvelope(serializeModel(sampleBody()), (env) => {
      env.body.theta[1] = 0.62;
    });
    const err = storeError(() => parseModel(text, 'dir/model.json'));
    expect(err.code).toBe('checksum-mismatch');
    expect(err.message).toContain('tampered');
    expect(err.context.file).toBe('dir/model.json');
    expect(err.context.hint).toContain('dir/model.prev.json');
  });

  it('refuses a file from a newer format version, naming both versions and asking to upgrade', () => {
    const text = editEnvelope(serializeModel(sampleBody()), (env) => {
      env.version = MODEL_VERSION + 1;
    });
    const err = storeError(() => parseModel(text, 'model.json'));
    expect(err.code).toBe('newer-version');
    expect(err.message).toContain(`version ${MODEL_VERSION + 1}`);
    expect(err.message).toContain(`version ${MODEL_VERSION}`);
    expect(err.context.hint).toMatch(/upgrade certa/);
  });

  it('refuses JSON that is not a model envelope, and an envelope without a valid version', () => {
    expect(storeError(() => parseModel('[1,2]', 'x.json')).code).toBe('not-a-model');
    expect(storeError(() => parseModel('{"format":"other"}', 'x.json')).code).toBe('not-a-model');
    const noVersion = editEnvelope(serializeModel(sampleBody()), (env) => {
      (env as { version: unknown }).version = '1';
    });
    expect(storeError(() => parseModel(noVersion, 'x.json')).code).toBe('not-a-model');
  });

  it('refuses every cut-short prefix of a small file with StoreError naming the file (never another exception)', () => {
    const text = serializeModel(sampleBody(0, 3));
    const codes = new Set<string>();
    for (let n = 0; n < text.length; n++) {
      const prefix = text.slice(0, n);
      if (prefix.trim() === text.trim()) {
        // only the final newline is missing: the JSON is complete and is the same model
        expect(parseModel(prefix, 'm.json')).toEqual(sampleBody(0, 3));
        continue;
      }
      const err = storeError(() => parseModel(prefix, 'm.json'));
      expect(err.context.file).toBe('m.json');
      codes.add(err.code);
    }
    expect([...codes].sort()).toEqual(['truncated']);
  });

  it('refuses a file with one byte changed anywhere, unless the change keeps the same JSON (300 seeded mutations, seed 11)', () => {
    const text = serializeModel(sampleBody(0, 4));
    const rng = createRng(11);
    const alphabet = '0123456789{}[]":,.-eE aZ\n';
    let refused = 0;
    for (let trial = 0; trial < 300; trial++) {
      const at = rng.int(text.length);
      const ch = alphabet[rng.int(alphabet.length)];
      if (ch === text[at]) continue;
      const damaged = text.slice(0, at) + ch + text.slice(at + 1);
      let same = false;
      try {
        same = canonicalJson(JSON.parse(damaged)) === canonicalJson(JSON.parse(text));
      } catch {
        same = false;
      }
      if (same) {
        expect(parseModel(damaged, 'm.json')).toEqual(sampleBody(0, 4));
      } else {
        storeError(() => parseModel(damaged, 'm.json'));
        refused += 1;
      }
    }
    expect(refused).toBeGreaterThan(200);
  });

  it('names the first failing path of a body that does not match the layout', () => {
    const bad = sampleBody();
    bad.P[1] = [0.01, 0.003];
    const text = editEnvelope(serializeModel(sampleBody()), (env) => {
      env.body = bad;
      env.checksum = bodyChecksum(bad);
    });
    const err = storeError(() => parseModel(text, 'model.json'));
    expect(err.code).toBe('invalid-body');
    expect(err.message).toContain('body.P[1]');
    expect(err.message).toContain('expected 3 numbers, found 2');
  });

  it('names nested and missing fields: series.frequency, window.inputs.price, drift', () => {
    const cases: [(b: Record<string, any>) => void, string][] = [
      [(b) => (b.series.frequency = 'fortnightly'), 'body.series.frequency'],
      [(b) => delete b.window.inputs.price, 'body.window.inputs.price'],
      [(b) => delete b.drift, 'body.drift'],
      [(b) => (b.lambda = 1.5), 'body.lambda'],
      [(b) => (b.extra = 1), 'body'],
    ];
    for (const [edit, path] of cases) {
      const bad = structuredClone(sampleBody()) as Record<string, any>;
      edit(bad);
      const text = editEnvelope(serializeModel(sampleBody()), (env) => {
        env.body = bad as ModelBody;
        env.checksum = bodyChecksum(bad);
      });
      const err = storeError(() => parseModel(text, 'model.json'));
      expect(err.code).toBe('invalid-body');
      expect(err.message).toContain(`at ${path}`);
    }
  });

  it('refuses to write an invalid body (so every written file reads back)', () => {
    const bad = sampleBody();
    bad.theta = [1, 2];
    expect(storeError(() => serializeModel(bad)).code).toBe('invalid-body');
    const nan = sampleBody();
    nan.sigma2 = Number.NaN;
    expect(storeError(() => serializeModel(nan)).message).toContain('body.sigma2');
    const inf = sampleBody();
    inf.theta[0] = Infinity;
    expect(storeError(() => serializeModel(inf)).message).toContain('body.theta[0]');
  });
});

describe('readModelFile / writeModelFile', () => {
  it('writes and reads back, leaving no temporary file', async () => {
    const path = join(dir, 'model.json');
    const result = await writeModelFile(path, sampleBody());
    expect(result).toEqual({ previous: null, note: null });
    expect(await readModelFile(path)).toEqual(sampleBody());
    expect(readdirSync(dir)).toEqual(['model.json']);
  });

  it('keepPrevious (default) copies the current file to model.prev.json before replacing it', async () => {
    const path = join(dir, 'model.json');
    await writeModelFile(path, sampleBody(0));
    const first = readFileSync(path, 'utf8');
    const result = await writeModelFile(path, sampleBody(1));
    expect(result.previous).toBe(join(dir, 'model.prev.json'));
    expect(readFileSync(join(dir, 'model.prev.json'), 'utf8')).toBe(first);
    expect(await readModelFile(path)).toEqual(sampleBody(1));
    expect(readdirSync(dir).sort()).toEqual(['model.json', 'model.prev.json']);
  });

  it('keepPrevious: false leaves model.prev.json alone', async () => {
    const path = join(dir, 'model.json');
    await writeModelFile(path, sampleBody(0));
    await writeModelFile(path, sampleBody(1));
    const prev = readFileSync(join(dir, 'model.prev.json'), 'utf8');
    await writeModelFile(path, sampleBody(2), { keepPrevious: false });
    expect(readFileSync(join(dir, 'model.prev.json'), 'utf8')).toBe(prev);
    expect(await readModelFile(path)).toEqual(sampleBody(2));
  });

  it('keeps a file it read as valid without parsing it again, but never one changed since it was read', async () => {
    const path = join(dir, 'model.json');
    await writeModelFile(path, sampleBody(0));
    // read (and found valid), then kept unchanged: copied as it is
    await readModelFile(path);
    const first = readFileSync(path, 'utf8');
    const kept = await writeModelFile(path, sampleBody(1));
    expect(kept.previous).toBe(join(dir, 'model.prev.json'));
    expect(readFileSync(join(dir, 'model.prev.json'), 'utf8')).toBe(first);
    // read, then damaged on disk before the write: not kept, as for a file never read
    await readModelFile(path);
    const prev = readFileSync(join(dir, 'model.prev.json'), 'utf8');
    writeFileSync(path, readFileSync(path, 'utf8').replace('"format"', '"fromat"'));
    const refused = await writeModelFile(path, sampleBody(2));
    expect(refused.previous).toBeNull();
    expect(refused.note).toContain('was not kept');
    expect(readFileSync(join(dir, 'model.prev.json'), 'utf8')).toBe(prev);
  });

  it('does not copy a damaged current file over a good model.prev.json, and says so', async () => {
    const path = join(dir, 'model.json');
    await writeModelFile(path, sampleBody(0));
    await writeModelFile(path, sampleBody(1));
    const prev = readFileSync(join(dir, 'model.prev.json'), 'utf8');
    writeFileSync(path, readFileSync(path, 'utf8').slice(0, 100));
    const result = await writeModelFile(path, sampleBody(2));
    expect(result.previous).toBeNull();
    expect(result.note).toContain('model.prev.json');
    expect(readFileSync(join(dir, 'model.prev.json'), 'utf8')).toBe(prev);
    expect(await readModelFile(path)).toEqual(sampleBody(2));
  });

  it('creates the folder with mkdir: true; refuses a missing file with StoreError not-found', async () => {
    const path = join(dir, 'models', 'sales', 'model.json');
    await writeModelFile(path, sampleBody(), { mkdir: true });
    expect(existsSync(path)).toBe(true);
    const err = await readModelFile(join(dir, 'none.json')).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StoreError);
    expect((err as StoreError).code).toBe('not-found');
  });

  it('readModelFile refuses a truncated file on disk naming it', async () => {
    const path = join(dir, 'model.json');
    await writeModelFile(path, sampleBody());
    writeFileSync(path, readFileSync(path, 'utf8').slice(0, 200));
    const err = (await readModelFile(path).catch((e: unknown) => e)) as StoreError;
    expect(err).toBeInstanceOf(StoreError);
    expect(err.code).toBe('truncated');
    expect(err.line()).toContain(path);
  });
});

describe('previousPath', () => {
  it('inserts .prev before .json, or appends .prev', () => {
    expect(previousPath('a/model.json')).toBe('a/model.prev.json');
    expect(previousPath('a/model')).toBe('a/model.prev');
  });
});
