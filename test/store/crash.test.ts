/**
 * Crash safety of atomic writes: a child process replaces a model file again and again and is
 * killed with SIGKILL at seeded random moments; afterwards the file must always be exactly one of
 * the two complete versions and must parse, never a mix, never missing, never cut short.
 *
 * The child runs plain JavaScript: src/store/atomic.ts and its one import (src/data/errors.ts)
 * are transpiled here with the TypeScript compiler into a temporary folder, so each trial starts
 * a bare `node` (≈ 50–100 ms) instead of a TypeScript loader.
 */
import { spawn } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createRng } from '../../src/linalg/random.js';
import { isTemporaryName } from '../../src/store/atomic.js';
import { parseModel, serializeModel } from '../../src/store/model-file.js';
import { sampleBody } from './fixtures/sample-body.js';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..', '..');
const writer = join(here, 'fixtures', 'crash-writer.mjs');

let work: string;
let atomicJs: string;
let textA: string;
let textB: string;
let aPath: string;
let bPath: string;

beforeAll(() => {
  work = mkdtempSync(join(tmpdir(), 'certa-crash-'));
  const build = join(work, 'build');
  for (const rel of ['src/store/atomic.ts', 'src/data/errors.ts']) {
    const source = readFileSync(join(root, rel), 'utf8');
    const out = ts.transpileModule(source, {
      compilerOptions: { module: ts.ModuleKind.ESNext, target: ts.ScriptTarget.ES2022 },
      fileName: rel,
    });
    const dest = join(build, rel.replace(/\.ts$/, '.js'));
    mkdirSync(dirname(dest), { recursive: true });
    writeFileSync(dest, out.outputText);
  }
  writeFileSync(join(build, 'package.json'), '{"type":"module"}\n');
  atomicJs = join(build, 'src', 'store', 'atomic.js');
  // two full-size versions (240-row window), different in every numeric field
  textA = serializeModel(sampleBody(0, 240));
  textB = serializeModel(sampleBody(1, 240));
  aPath = join(work, 'a.txt');
  bPath = join(work, 'b.txt');
  writeFileSync(aPath, textA);
  writeFileSync(bPath, textB);
});

afterAll(() => {
  rmSync(work, { recursive: true, force: true });
});

interface Trial {
  outcome: 'A' | 'B';
  leftovers: number;
}

/** Starts the writer; kills it `delayMs` after it prints `ready` (or after spawn with mode once). */
function trial(dir: string, mode: string, delayMs: number): Promise<Trial> {
  const target = join(dir, 'model.json');
  writeFileSync(target, textA);
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [writer, atomicJs, target, aPath, bPath, mode], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stderr = '';
    let timer: NodeJS.Timeout | undefined;
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    const arm = () => {
      timer = setTimeout(() => child.kill('SIGKILL'), delayMs);
    };
    if (mode === 'once') arm();
    else child.stdout.once('data', arm);
    child.on('error', reject);
    child.on('exit', (code, signal) => {
      if (timer) clearTimeout(timer);
      if (signal !== 'SIGKILL' && !(mode === 'once' && code === 0)) {
        reject(new Error(`writer ended by itself (code ${code}, signal ${signal}): ${stderr}`));
        return;
      }
      try {
        const names = readdirSync(dir);
        expect(names).toContain('model.json');
        const stray = names.filter((n) => n !== 'model.json');
        for (const n of stray) {
          // a killed writer may leave its temporary file, never anything else
          expect(isTemporaryName(n, 'model.json')).toBe(true);
          rmSync(join(dir, n));
        }
        const text = readFileSync(target, 'utf8');
        expect(text === textA || text === textB).toBe(true);
        parseModel(text, target);
        resolve({ outcome: text === textA ? 'A' : 'B', leftovers: stray.length });
      } catch (e) {
        reject(e);
      }
    });
  });
}

describe('writeFileAtomic under SIGKILL', () => {
  it('102 killed writers (async, sync and single writes; delays seeded 2024): the file is always exactly A or B', async () => {
    const rng = createRng(2024);
    const dir = join(work, 'run');
    mkdirSync(dir);
    const results: Trial[] = [];
    const started = Date.now();
    for (let i = 0; i < 102; i++) {
      const mode = i % 3 === 0 ? 'alternate' : i % 3 === 1 ? 'alternate-sync' : 'once';
      // alternate: 0–12 ms of writing after ready; once: 0–100 ms after spawn (covers start-up,
      // the write itself and the time after it)
      const delay = mode === 'once' ? rng.uniform() * 100 : rng.uniform() * 12;
      results.push(await trial(dir, mode, delay));
    }
    const elapsed = Date.now() - started;
    const count = (o: 'A' | 'B') => results.filter((r) => r.outcome === o).length;
    // both outcomes occur, so kills landed at different phases of the write cycle
    expect(count('A')).toBeGreaterThan(0);
    expect(count('B')).toBeGreaterThan(0);
    console.info(
      `crash test: ${results.length} trials in ${elapsed} ms, A ${count('A')}, B ${count('B')}, ` +
        `temporary files left by the kill in ${results.filter((r) => r.leftovers > 0).length}`,
    );
  });
});
