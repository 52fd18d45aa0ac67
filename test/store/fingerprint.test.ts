import { describe, expect, it } from 'vitest';
import type { Series } from '../../src/data/series.js';
import { emptyFingerprint, extendFingerprint, fingerprintSeries, seriesRows, sha256Hex, type DataRow } from '../../src/store/fingerprint.js';

const rows: DataRow[] = [
  { time: Date.UTC(2021, 0, 1), value: 10.5, inputs: [3] },
  { time: Date.UTC(2021, 1, 1), value: 11, inputs: [3.25] },
  { time: Date.UTC(2021, 2, 1), value: 0.1 + 0.2, inputs: [-1] },
];

describe('sha256Hex', () => {
  it('matches the FIPS 180-4 example: SHA-256("abc") = ba7816bf…f20015ad (published test vector)', () => {
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });
});

describe('extendFingerprint', () => {
  it('follows the stated chain: H₀ = SHA-256(seed text), Hᵢ = SHA-256(hex(Hᵢ₋₁) + "\\n" + canonical row)', () => {
    const h0 = sha256Hex('certa data fingerprint v1');
    expect(emptyFingerprint()).toEqual({ hash: `sha256:${h0}`, rows: 0 });
    const h1 = sha256Hex(`${h0}\n[${Date.UTC(2021, 0, 1)},10.5,3]`);
    expect(extendFingerprint(emptyFingerprint(), rows.slice(0, 1))).toEqual({ hash: `sha256:${h1}`, rows: 1 });
  });

  it('extending in two steps equals extending once; the order and every digit matter', () => {
    const once = extendFingerprint(emptyFingerprint(), rows);
    const twice = extendFingerprint(extendFingerprint(emptyFingerprint(), rows.slice(0, 2)), rows.slice(2));
    expect(twice).toEqual(once);
    expect(once.rows).toBe(3);
    const swapped = extendFingerprint(emptyFingerprint(), [rows[1], rows[0], rows[2]]);
    expect(swapped.hash).not.toBe(once.hash);
    const nudged = extendFingerprint(emptyFingerprint(), [rows[0], rows[1], { ...rows[2], value: 0.3 }]);
    expect(nudged.hash).not.toBe(once.hash);
    expect(once.hash).toMatch(/^sha256:[0-9a-f]{64}$/);
  });

  it('fingerprintSeries hashes the rows of a series with inputs in series order', () => {
    const series: Series = {
      name: 's',
      frequency: 'monthly',
      season: 12,
      time: Float64Array.from(rows.map((r) => r.time)),
      values: Float64Array.from(rows.map((r) => r.value)),
      inputs: [{ name: 'x', values: Float64Array.from(rows.map((r) => r.inputs[0])) }],
    };
    expect(fingerprintSeries(series)).toEqual(extendFingerprint(emptyFingerprint(), rows));
    expect([...seriesRows(series, 1, 2)]).toEqual([rows[1]]);
    expect(fingerprintSeries(series, 0, 2)).toEqual(extendFingerprint(emptyFingerprint(), rows.slice(0, 2)));
  });
});
