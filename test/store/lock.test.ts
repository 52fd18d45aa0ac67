import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { StoreError } from '../../src/data/errors.js';
import { acquireLock, isProcessAlive, lockPathFor, parseLockInfo, withLock, type LockInfo } from '../../src/store/lock.js';

let dir: string;
let model: string;
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'certa-lock-'));
  model = join(dir, 'model.json');
});
afterEach(() => {
  rmSync(dir, { recursive: true, force: true });
});

/** A pid that certainly belonged to a process that has exited: a child we ran to completion. */
function deadPid(): number {
  const child = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  const pid = Number(child.stdout);
  expect(Number.isInteger(pid) && pid > 0).toBe(true);
  expect(isProcessAlive(pid)).toBe(false);
  return pid;
}

function writeLock(info: LockInfo): void {
  writeFileSync(lockPathFor(model), JSON.stringify(info));
}

describe('withLock', () => {
  it('creates model.json.lock holding pid, host, started and command while fn runs, and removes it after', async () => {
    const t0 = Date.UTC(2024, 4, 1, 12, 0, 0);
    const { value, note } = await withLock(
      model,
      (lock) => {
        const info = parseLockInfo(readFileSync(join(dir, 'model.json.lock'), 'utf8'));
        expect(info).toEqual({ pid: process.pid, host: hostname(), started: '2024-05-01T12:00:00.000Z', command: 'certa update' });
        expect(lock.takenOver).toBeNull();
        return 42;
      },
      { command: 'certa update', now: () => t0 },
    );
    expect(value).toBe(42);
    expect(note).toBeNull();
    expect(readdirSync(dir)).toEqual([]);
  });

  it('releases the lock when fn throws, and rethrows the same error', async () => {
    const boom = new Error('boom');
    await expect(withLock(model, () => Promise.reject(boom))).rejects.toBe(boom);
    expect(existsSync(lockPathFor(model))).toBe(false);
  });

  it('refuses a held lock with StoreError locked naming pid, host, start time and the stale rule', async () => {
    writeLock({ pid: process.pid, host: hostname(), started: new Date().toISOString(), command: 'certa update other' });
    const err = (await withLock(model, () => 1).catch((e: unknown) => e)) as StoreError;
    expect(err).toBeInstanceOf(StoreError);
    expect(err.code).toBe('locked');
    expect(err.message).toContain(`process ${process.pid}`);
    expect(err.message).toContain(`host "${hostname()}"`);
    expect(err.message).toContain('since ');
    expect(err.message).toContain('certa update other');
    expect(err.context.hint).toContain('no longer running');
    expect(err.context.hint).toContain('1 hour');
    // the holder's lock is left alone
    expect(parseLockInfo(readFileSync(lockPathFor(model), 'utf8'))?.command).toBe('certa update other');
  });

  it('is not re-entrant: a second acquisition in the same process is refused while the first holds', async () => {
    await withLock(model, async () => {
      await expect(acquireLock(model)).rejects.toMatchObject({ code: 'locked' });
    });
    expect(existsSync(lockPathFor(model))).toBe(false);
  });

  it('of many simultaneous acquisitions exactly one succeeds', async () => {
    const results = await Promise.allSettled(Array.from({ length: 12 }, () => acquireLock(model)));
    const won = results.filter((r) => r.status === 'fulfilled');
    expect(won).toHaveLength(1);
    for (const r of results) if (r.status === 'rejected') expect((r.reason as StoreError).code).toBe('locked');
    await (won[0] as PromiseFulfilledResult<Awaited<ReturnType<typeof acquireLock>>>).value.release();
    expect(existsSync(lockPathFor(model))).toBe(false);
  });

  it('takes over a lock whose pid is dead on this host, with a note naming the old holder', async () => {
    const pid = deadPid();
    const old: LockInfo = { pid, host: hostname(), started: new Date().toISOString(), command: 'certa update crashed' };
    writeLock(old);
    const { value, note } = await withLock(model, (lock) => {
      expect(lock.takenOver).toEqual(old);
      return 'ran';
    });
    expect(value).toBe('ran');
    expect(note).toContain(`process ${pid}`);
    expect(note).toContain('no longer running');
    expect(readdirSync(dir)).toEqual([]);
  });

  it('does not judge a dead-looking pid on another host: a young lock from elsewhere is refused', async () => {
    writeLock({ pid: deadPid(), host: `${hostname()}-elsewhere`, started: new Date().toISOString(), command: 'x' });
    await expect(withLock(model, () => 1)).rejects.toMatchObject({ code: 'locked' });
  });

  it('takes over a lock older than maxAgeMs even when its process is alive', async () => {
    const now = Date.UTC(2024, 0, 1, 12, 0, 0);
    writeLock({ pid: process.pid, host: 'other-host', started: new Date(now - 2 * 3_600_000).toISOString(), command: 'hung' });
    const { note } = await withLock(model, () => 1, { now: () => now });
    expect(note).toContain('older than 1 hour');
    // with a longer maximum age the same lock is live
    writeLock({ pid: process.pid, host: 'other-host', started: new Date(now - 2 * 3_600_000).toISOString(), command: 'hung' });
    const err = (await withLock(model, () => 1, { now: () => now, maxAgeMs: 3 * 3_600_000 }).catch((e: unknown) => e)) as StoreError;
    expect(err.code).toBe('locked');
    expect(err.context.hint).toContain('3 hours');
  });

  it('an unreadable lock is live while young and stale once older than the grace period', async () => {
    writeFileSync(lockPathFor(model), '{"pid": 12');
    await expect(withLock(model, () => 1)).rejects.toMatchObject({ code: 'locked' });
    const old = new Date(Date.now() - 10 * 60_000);
    utimesSync(lockPathFor(model), old, old);
    const { note } = await withLock(model, () => 1);
    expect(note).toContain('unreadable');
  });

  it('release leaves alone a lock that is no longer ours', async () => {
    const lock = await acquireLock(model);
    const foreign = JSON.stringify({ pid: 1, host: 'h', started: new Date().toISOString(), command: 'other' });
    writeFileSync(lockPathFor(model), foreign);
    await lock.release();
    expect(readFileSync(lockPathFor(model), 'utf8')).toBe(foreign);
  });
});

describe('isProcessAlive', () => {
  it('is true for this process and false for an exited child and for invalid pids', () => {
    expect(isProcessAlive(process.pid)).toBe(true);
    expect(isProcessAlive(deadPid())).toBe(false);
    expect(isProcessAlive(0)).toBe(false);
    expect(isProcessAlive(-5)).toBe(false);
  });
});
