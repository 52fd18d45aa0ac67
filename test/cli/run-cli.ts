/**
 * Runs the built CLI (`node bin/certa.js …`) as a child process. The first caller rebuilds
 * dist/ when any source file is newer than the compiled CLI (a lock directory keeps parallel
 * test files from building at once).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, rmSync, statSync } from 'node:fs';
import { join } from 'node:path';

const root = process.cwd();
const built = join(root, 'dist/cli/inspect.js');

function newestSource(dir: string): number {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestSource(p) : statSync(p).mtimeMs);
  }
  return newest;
}

export function ensureBuilt(): void {
  const lock = join(root, 'dist/.test-build-lock');
  const stale = () => !existsSync(built) || statSync(built).mtimeMs < newestSource(join(root, 'src'));
  if (!stale()) return;
  mkdirSync(join(root, 'dist'), { recursive: true });
  for (let waited = 0; ; waited += 200) {
    try {
      mkdirSync(lock);
      break;
    } catch {
      if (waited > 120_000) throw new Error('build lock held too long');
      spawnSync('sleep', ['0.2']);
    }
  }
  try {
    // Others' files in progress may not type-check; tsc still emits, which is all the CLI needs.
    if (stale()) spawnSync(process.execPath, [join(root, 'node_modules/typescript/bin/tsc'), '-p', 'tsconfig.build.json'], { cwd: root, stdio: 'ignore' });
  } finally {
    rmSync(lock, { recursive: true, force: true });
  }
}

export interface CliResult {
  code: number | null;
  stdout: string;
  stderr: string;
}

export function runCli(args: string[], options: { stdin?: string | Buffer; cwd?: string } = {}): CliResult {
  const r = spawnSync(process.execPath, [join(root, 'bin/certa.js'), ...args], {
    cwd: options.cwd ?? root,
    input: options.stdin ?? '',
    env: { ...process.env, TZ: 'UTC' },
    encoding: 'utf8',
    maxBuffer: 64 * 1024 * 1024,
  });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}
