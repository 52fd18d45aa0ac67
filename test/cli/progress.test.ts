/**
 * BatchProgress (src/cli/progress.ts): "series k of n" with the time left on a terminal only.
 * Expected texts worked out by hand: after 2 of 10 series in 30 s, 8 left at 15 s each = 120 s.
 */
import { describe, expect, it } from 'vitest';
import { BatchProgress, durationText } from '../../src/cli/progress.js';
import type { CliIO } from '../../src/cli/main.js';

function io(isTTY: boolean): { io: CliIO; err: () => string } {
  let err = '';
  return {
    io: { out: () => undefined, err: (t) => (err += t), stdin: async () => Buffer.alloc(0), isTTY },
    err: () => err,
  };
}

describe('BatchProgress', () => {
  it('says series k of n and the time left, rewritten in place, on a terminal', () => {
    let now = 0;
    const c = io(true);
    const p = new BatchProgress(c.io, 10, () => now);
    now = 30_000;
    p.update(2);
    expect(c.err()).toBe(`\r${'series 2 of 10, about 2 min left'.padEnd(48)}`);
    p.stop();
    expect(c.err().endsWith(`\r${' '.repeat(48)}\r`)).toBe(true);
  });

  it('writes nothing when standard error is not a terminal', () => {
    const c = io(false);
    const p = new BatchProgress(c.io, 10);
    p.update(5);
    p.stop();
    expect(c.err()).toBe('');
  });

  it('durationText: seconds below 2 minutes, minutes below 2 hours, then hours and minutes', () => {
    expect(durationText(59_400)).toBe('59 s');
    expect(durationText(125_000)).toBe('2 min');
    expect(durationText(3 * 3600_000 + 5 * 60_000)).toBe('3 h 5 min');
  });
});
