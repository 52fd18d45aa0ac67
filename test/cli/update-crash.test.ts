/**
 * `certa update` as a child process (the built CLI) under SIGKILL and under contention.
 *
 * Crash safety: the update is killed at seeded random moments spread over its whole run (start-
 * up, lock, read, learn, writing the forecast files, keeping model.prev.json, replacing the
 * model); afterwards model.json must always parse and be byte for byte either the old version or
 * the new one (SOURCE_DATE_EPOCH pins the clock, so the new version is unique), never a mix.
 *
 * Concurrency: two updates of the same model started together: one runs; the other either
 * reports the lock (exit 2, one `certa:` line naming the holder) or, when it starts after the
 * first has finished, finds 0 new rows. Either way the model reflects exactly one update.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createRng } from '../../src/linalg/random.js';
import { isTemporaryName } from '../../src/store/atomic.js';
import { parseModel, serializeModel } from '../../src/store/model-file.js';
import { bodyOn, simulateArx } from '../forecast/update-fixtures.js';
import { ensureBuilt } from './run-cli.js';
import { csvRows } from './update-data.js';

const root = process.cwd();
let work: string;
let textA: string;
let textB: string;
let data: string;
const env = { ...process.env, TZ: 'UTC', SOURCE_DATE_EPOCH: '1700000000' };

interface Run {
  code: number | null;
  signal: NodeJS.Signals | null;
  stdout: string;
  stderr: string;
  ms: number;
}

/**
 * Runs one update. `kill`: SIGKILL `afterMs` after the spawn (`from: 'spawn'`) or after the lock
 * file first appears (`from: 'lock'`, polled every millisecond), i.e. while the update reads,
 * learns and writes. `lockedMs` reports how long the lock was seen before the exit.
 */
function start(model: string, extra: string[], kill?: { afterMs: number; from: 'spawn' | 'lock' }): Promise<Run & { lockedMs: number }> {
  return new Promise((resolve, reject) => {
    const t0 = Date.now();
    const child = spawn(process.execPath, [join(root, 'bin/certa.js'), 'update', model, data, ...extra], { env, stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    let timer: NodeJS.Timeout | undefined;
    let lockSeen = 0;
    const lockPath = `${model}.lock`;
    const poll = setInterval(() => {
      if (lockSeen === 0 && existsSync(lockPath)) {
        lockSeen = Date.now();
        if (kill?.from === 'lock') timer = setTimeout(() => child.kill('SIGKILL'), kill.afterMs);
      }
    }, 1);
    if (kill?.from === 'spawn') timer = setTimeout(() => child.kill('SIGKILL'), kill.afterMs);
    child.on('error', reject);
    child.on('exit', (code, signal) => {
      clearInterval(poll);
      if (timer) clearTimeout(timer);
      const now = Date.now();
      resolve({ code, signal, stdout, stderr, ms: now - t0, lockedMs: lockSeen > 0 ? now - lockSeen : 0 });
    });
  });
}

/** A folder with only model.json = version A. */
function reset(dir: string): string {
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  const model = join(dir, 'model.json');
  writeFileSync(model, textA);
  return model;
}

beforeAll(async () => {
  ensureBuilt();
  work = mkdtempSync(join(tmpdir(), 'certa-update-crash-'));
  const sim = simulateArx(130, 31);
  textA = serializeModel(bodyOn(sim.series, 100));
  data = join(work, 'new.csv');
  writeFileSync(data, csvRows(sim.series, 95, 124));
  const model = reset(join(work, 'reference'));
  const r = await start(model, ['--no-charts']);
  expect(r.code).toBe(0);
  textB = readFileSync(model, 'utf8');
  expect(textB).not.toBe(textA);
});

afterAll(() => {
  rmSync(work, { recursive: true, force: true });
});

describe('certa update under SIGKILL', () => {
  it('100 updates killed at seeded moments (seed 77; half of them while the lock is held): model.json always parses and is exactly the old or the new version', async () => {
    // the length of one complete run, to spread the kills over it
    // (the longest of three, times 1.5: the machine may be busy with other tests)
    let longest = 0;
    let locked = 0;
    for (let i = 0; i < 3; i++) {
      const p = await start(reset(join(work, 'probe')), ['--no-charts']);
      longest = Math.max(longest, p.ms);
      locked = Math.max(locked, p.lockedMs);
    }
    const span = Math.max(longest, 50) * 1.5;
    const lockSpan = Math.max(locked, 5) * 1.5;
    const rng = createRng(77);
    const dir = join(work, 'trials');
    let old = 0;
    let fresh = 0;
    let finished = 0;
    const startedAt = Date.now();
    for (let i = 0; i < 100; i++) {
      const model = reset(dir);
      // even trials: anywhere in the run; odd trials: while the lock is held (read, learn, write)
      const kill = i % 2 === 0 ? { afterMs: rng.uniform() * span, from: 'spawn' as const } : { afterMs: rng.uniform() * lockSpan, from: 'lock' as const };
      const r = await start(model, ['--no-charts'], kill);
      if (r.signal !== 'SIGKILL') {
        expect(r.code, r.stderr).toBe(0);
        finished++;
      }
      const text = readFileSync(model, 'utf8');
      expect(text === textA || text === textB).toBe(true);
      parseModel(text, model);
      if (text === textA) old++;
      else fresh++;
      for (const name of readdirSync(dir)) {
        if (name === 'model.json' || name === 'model.json.lock' || ['forecast.csv', 'summary.json', 'report.html'].includes(name)) continue;
        // a process killed while taking the lock may leave its staged lock content behind
        if (/^model\.json\.lock\.new\.\d+\.\d+$/.test(name)) continue;
        if (name === 'model.prev.json') {
          // kept before the model is replaced: always the complete old version
          expect(readFileSync(join(dir, name), 'utf8')).toBe(textA);
          continue;
        }
        expect(isTemporaryName(name, 'model.json') || isTemporaryName(name, 'model.prev.json') || isTemporaryName(name, 'forecast.csv') || isTemporaryName(name, 'summary.json') || isTemporaryName(name, 'report.html'), name).toBe(true);
      }
    }
    console.info(`update crash test: 100 kills (runs ≈ ${Math.round(span / 1.5)} ms, lock held ≈ ${Math.round(lockSpan / 1.5)} ms) in ${Date.now() - startedAt} ms: old ${old}, new ${fresh} (${finished} finished before the kill)`);
    expect(old).toBeGreaterThan(0);
    expect(fresh).toBeGreaterThan(0);
  }, 180_000);
});

describe('certa update under contention', () => {
  it('two updates started together: one runs, the other reports the lock or finds 0 new rows; the model reflects exactly one update (4 pairs)', async () => {
    let refused = 0;
    for (let pair = 0; pair < 4; pair++) {
      const model = reset(join(work, `pair${pair}`));
      const [a, b] = await Promise.all([start(model, []), start(model, [])]);
      const runs = [a, b];
      const ran = runs.filter((r) => r.code === 0 && r.stdout.includes('24 new rows'));
      expect(ran).toHaveLength(1);
      const other = runs.find((r) => r !== ran[0])!;
      if (other.code === 2) {
        expect(other.stderr).toMatch(/^certa: .*model\.json: the model is locked by process \d+ on host ".*" since .*\(certa update /);
        refused++;
      } else {
        expect(other.code).toBe(0);
        expect(other.stdout).toContain('0 new rows');
      }
      const body = parseModel(readFileSync(model, 'utf8'), model);
      expect(body.log).toHaveLength(1);
      expect(readFileSync(model, 'utf8')).toBe(textB);
    }
    console.info(`update contention test: the second update reported the lock in ${refused} of 4 pairs`);
    expect(refused).toBeGreaterThan(0);
  }, 120_000);
});
