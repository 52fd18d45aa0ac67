/**
 * Shards: `--shard k/n` keeps the series whose stable hash falls in shard k of n, so the array
 * jobs of a scheduler (one task per index) split a file without talking to each other.
 *
 * The hash is the first 4 bytes of the SHA-256 of the series name (UTF-8), read as an unsigned
 * big-endian integer; series i belongs to shard (hash mod n) + 1. It depends on the name alone,
 * never on the order of the file, the machine or the Node version, and every series lands in
 * exactly one shard.
 */
import { createHash } from 'node:crypto';
import { UsageError } from '../data/errors.js';

export interface Shard {
  /** 1-based index of this shard. */
  k: number;
  /** Number of shards. */
  n: number;
}

/** The shard (1 … n) a series name belongs to. */
export function shardOf(name: string, n: number): number {
  const digest = createHash('sha256').update(name, 'utf8').digest();
  return (digest.readUInt32BE(0) % n) + 1;
}

/** Parses `k/n` with 1 ≤ k ≤ n ≤ 100000; a UsageError naming the option otherwise. */
export function parseShard(raw: unknown): Shard {
  const text = String(raw).trim();
  const m = /^(\d{1,6})\/(\d{1,6})$/.exec(text);
  const k = m ? Number(m[1]) : NaN;
  const n = m ? Number(m[2]) : NaN;
  if (!(k >= 1 && n >= 1 && k <= n && n <= 100_000)) {
    throw new UsageError('option-invalid', 'option --shard has an unusable value', {
      found: text,
      expected: 'k/n with 1 ≤ k ≤ n, e.g. 1/4 for the first of four shards',
    });
  }
  return { k, n };
}
