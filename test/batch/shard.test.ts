/**
 * Shards (src/batch/shard.ts): the published SHA-256 of "abc" (FIPS 180-2, appendix B.1:
 * ba7816bf…) pins the hash, so shard numbers never change between versions or machines.
 */
import { describe, expect, it } from 'vitest';
import { parseShard, shardOf } from '../../src/batch/shard.js';

describe('shardOf', () => {
  it('takes the first 4 bytes of SHA-256 modulo n: "abc" is 0xba7816bf', () => {
    expect(shardOf('abc', 1)).toBe(1);
    expect(shardOf('abc', 7)).toBe((0xba7816bf % 7) + 1);
    expect(shardOf('abc', 1000)).toBe((0xba7816bf % 1000) + 1);
  });

  it('puts every name in exactly one shard, spread about evenly', () => {
    const counts = [0, 0, 0, 0];
    for (let i = 0; i < 4000; i++) counts[shardOf(`series-${i}`, 4) - 1]++;
    for (const c of counts) expect(c).toBeGreaterThan(900);
    expect(counts.reduce((a, b) => a + b, 0)).toBe(4000);
  });
});

describe('parseShard', () => {
  it('reads k/n and refuses 0/3, 4/3, 1/0 and words with a UsageError naming --shard', () => {
    expect(parseShard('2/3')).toEqual({ k: 2, n: 3 });
    for (const bad of ['0/3', '4/3', '1/0', 'one/two', '1-3']) expect(() => parseShard(bad)).toThrow(/--shard/);
  });
});
