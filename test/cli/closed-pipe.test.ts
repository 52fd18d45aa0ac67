/**
 * A reader that goes away early (`certa forecast kiosks.csv | head -1`, `certa --help | head`):
 * certa drops the text nobody reads, still writes every file, and exits as it would have, with
 * no stack trace.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ensureBuilt } from './run-cli.js';
import { lcgNoise } from './in-process.js';

let dir: string;

beforeAll(() => {
  ensureBuilt();
  dir = mkdtempSync(join(tmpdir(), 'certa-pipe-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Runs the CLI with its standard output closed by the reader before anything is read. */
function runClosed(args: string[]): Promise<{ code: number | null; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [join(process.cwd(), 'bin/certa.js'), ...args], { env: { ...process.env, TZ: 'UTC' }, stdio: ['ignore', 'pipe', 'pipe'] });
    child.stdout.destroy();
    let stderr = '';
    child.stderr.setEncoding('utf8');
    child.stderr.on('data', (t: string) => (stderr += t));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stderr }));
  });
}

function kiosks(): string {
  const rows = ['kiosk,month,sales'];
  for (let k = 0; k < 3; k++) {
    const r = lcgNoise(7 + k);
    for (let t = 0; t < 36; t++) {
      const y = 60 + 5 * k + 0.3 * t + 6 * Math.sin((2 * Math.PI * t) / 12) + 2 * r();
      rows.push(`kiosk-${k + 1},${2022 + Math.floor(t / 12)}-${String((t % 12) + 1).padStart(2, '0')},${y.toFixed(2)}`);
    }
  }
  const p = join(dir, 'kiosks.csv');
  writeFileSync(p, `${rows.join('\n')}\n`);
  return p;
}

describe('standard output closed by its reader', () => {
  it('help: exit 0, nothing on stderr', async () => {
    const r = await runClosed(['forecast', '--help']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
  });

  it('a batch forecast still writes every series and its tables', async () => {
    const out = join(dir, 'out');
    const r = await runClosed(['forecast', kiosks(), '--id', 'kiosk', '--no-charts', '--no-report', '--horizon', '6', '--out', out]);
    expect(r.stderr).not.toMatch(/EPIPE|\n\s+at /);
    expect(r.code).toBe(0);
    const table = readFileSync(join(out, 'batch.csv'), 'utf8').trim().split('\n');
    expect(table).toHaveLength(4);
    for (const k of [1, 2, 3]) expect(existsSync(join(out, `kiosk-${k}`, 'model.json'))).toBe(true);
  });
});
