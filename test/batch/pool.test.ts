/**
 * runPool (src/batch/pool.ts) from the TypeScript sources: the worker entry is worker.ts, loaded
 * through tsx; the outcomes come back by task, the same with one worker (this thread) and two.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runPool } from '../../src/batch/pool.js';
import type { SeriesTask } from '../../src/batch/series-job.js';
import type { Series } from '../../src/data/series.js';

function monthly(name: string, n: number, level: number): Series {
  const time = new Float64Array(n);
  const values = new Float64Array(n);
  for (let t = 0; t < n; t++) {
    time[t] = Date.UTC(2021, t, 1); // the start of each month (calendar.ts: UTC epoch milliseconds)
    values[t] = level + 0.5 * t + 6 * Math.sin((2 * Math.PI * t) / 12) + ((t * 7919) % 13) / 6;
  }
  return { name, frequency: 'monthly', season: 12, time, values, inputs: [] };
}

function tasks(out: string): SeriesTask[] {
  const list = [monthly('alpha', 36, 50), monthly('beta', 4, 10), monthly('gamma', 36, 80)];
  return list.map((s, i) => ({ position: i + 1, series: s, path: join(out, s.name), folder: s.name }));
}

const settings = { opts: { charts: false, horizon: '6' }, loadNotes: [], keepSummary: false };

describe('runPool', () => {
  it('returns outcomes by task with two worker threads, equal to one worker in this thread', async () => {
    const a = mkdtempSync(join(tmpdir(), 'certa-pool-'));
    const b = mkdtempSync(join(tmpdir(), 'certa-pool-'));
    process.env.SOURCE_DATE_EPOCH = '1700000000';
    const one = await runPool(tasks(a), settings, { workers: 1 });
    const two = await runPool(tasks(b), settings, { workers: 2 });
    expect(two.map((o) => o?.row.status)).toEqual(['forecast', 'failed', 'forecast']);
    expect(two.map((o) => o?.forecasts)).toEqual(one.map((o) => o?.forecasts));
    expect(two[1]?.error?.line).toMatch(/4 points/);
    expect(readFileSync(join(b, 'gamma', 'forecast.csv'), 'utf8')).toBe(readFileSync(join(a, 'gamma', 'forecast.csv'), 'utf8'));
  });
});
