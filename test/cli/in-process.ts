/**
 * Helpers of the CLI tests that drive `main` in this process: an IO that keeps what the command
 * prints, seeded noise for the files the tests write, and the files a command wrote.
 */
import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import type { CliIO } from '../../src/cli/main.js';

/** An IO for `main` that keeps standard output and standard error as text. */
export function capture(): { io: CliIO; out: () => string; err: () => string } {
  let out = '';
  let err = '';
  return {
    io: { out: (t) => (out += t), err: (t) => (err += t), stdin: async () => Buffer.from(''), isTTY: false },
    out: () => out,
    err: () => err,
  };
}

/** Seeded linear congruential noise in [−0.5, 0.5) (Numerical Recipes constants): the same file every run. */
export function lcgNoise(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32 - 0.5;
  };
}

/** Every file under `root` (none when it does not exist) by path relative to it, with its bytes in base64. */
export function fileTree(root: string): Map<string, string> {
  const out = new Map<string, string>();
  const walk = (d: string): void => {
    for (const e of readdirSync(d).sort()) {
      const p = join(d, e);
      if (statSync(p).isDirectory()) walk(p);
      else out.set(relative(root, p), readFileSync(p).toString('base64'));
    }
  };
  if (existsSync(root)) walk(root);
  return out;
}
