import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { StoreError } from '../../src/data/errors.js';
import { bothTexts, canonicalJson, prettyJson } from '../../src/store/canonical-json.js';

describe('canonicalJson', () => {
  it('sorts members by key at every depth and writes no whitespace', () => {
    expect(canonicalJson({ b: 1, a: { d: [1, { z: 0, y: 1 }], c: 'x' } })).toBe('{"a":{"c":"x","d":[1,{"y":1,"z":0}]},"b":1}');
  });

  it('orders keys by UTF-16 code units (RFC 8785 §3.2.3): "B" < "a" < "é" < "😀"', () => {
    expect(canonicalJson({ '😀': 4, é: 3, a: 2, B: 1 })).toBe('{"B":1,"a":2,"é":3,"😀":4}');
  });

  it('writes numbers as ECMAScript Number::toString (decimal for 1e-7 ≤ |x| < 1e21, shortest round trip), −0 as 0', () => {
    expect(canonicalJson([0.1 + 0.2, 4.5, 1e21, 1e20, 1e-7, 0.000001, -0, 2 ** 53])).toBe(
      '[0.30000000000000004,4.5,1e+21,100000000000000000000,1e-7,0.000001,0,9007199254740992]',
    );
  });

  it('escapes strings as JSON.stringify does', () => {
    expect(canonicalJson('a"b\\c\n\u0001')).toBe('"a\\"b\\\\c\\n\\u0001"');
  });

  it('leaves out undefined members, as JSON.stringify does', () => {
    expect(canonicalJson({ a: undefined, b: 2 })).toBe('{"b":2}');
  });

  it('refuses values JSON cannot hold with StoreError naming their path', () => {
    const cases: [unknown, string][] = [
      [{ a: [1, Number.NaN] }, '$.a[1]'],
      [{ x: Infinity }, '$.x'],
      [{ t: new Float64Array(2) }, '$.t'],
      [[undefined], '$[0]'],
      [{ f: () => 1 }, '$.f'],
      [{ n: 1n }, '$.n'],
    ];
    for (const [value, path] of cases) {
      let err: unknown;
      try {
        canonicalJson(value);
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(StoreError);
      expect((err as StoreError).message).toContain(path);
    }
  });

  it('property: parse then canonicalise reproduces the text, and member order does not matter (fast-check, seed 5)', () => {
    const json = fc.jsonValue().map((v) => JSON.parse(JSON.stringify(v)) as unknown);
    fc.assert(
      fc.property(json, (v) => {
        const text = canonicalJson(v);
        expect(canonicalJson(JSON.parse(text))).toBe(text);
        expect(JSON.parse(text)).toEqual(v);
        expect(canonicalJson(reverseMembers(v))).toBe(text);
        expect(canonicalJson(JSON.parse(prettyJson(v)))).toBe(text);
      }),
      { seed: 5, numRuns: 300 },
    );
  });
});

describe('prettyJson', () => {
  it('indents objects, keeps scalar arrays on one line, sorts keys', () => {
    expect(prettyJson({ b: [1, 2], a: { c: [{ d: null }] } })).toBe(
      '{\n  "a": {\n    "c": [\n      {\n        "d": null\n      }\n    ]\n  },\n  "b": [1, 2]\n}',
    );
  });
});

describe('bothTexts', () => {
  it('gives both texts of one walk: the canonical text, and the pretty text nested at the given depth', () => {
    const v = { b: [1, -0, true, null], a: { c: [{ d: 'x\ny' }, []], e: {} }, u: undefined };
    expect(bothTexts(v, '  ', '  ')).toEqual({ canonical: canonicalJson(v), pretty: prettyJson(v).replace(/\n/g, '\n  ') });
    expect(bothTexts(v, '  ', '  ').pretty).toBe(
      '{\n    "a": {\n      "c": [\n        {\n          "d": "x\\ny"\n        },\n        []\n      ],\n      "e": {}\n    },\n    "b": [1, 0, true, null]\n  }',
    );
  });

  it('property: equals canonicalJson and prettyJson for any JSON value and depth (fast-check, seed 11)', () => {
    const json = fc.jsonValue().map((v) => JSON.parse(JSON.stringify(v)) as unknown);
    fc.assert(
      fc.property(json, fc.constantFrom('', '  ', '    '), (v, depth) => {
        const both = bothTexts(v, '  ', depth);
        expect(both.canonical).toBe(canonicalJson(v));
        expect(both.pretty).toBe(prettyJson(v).replace(/\n/g, `\n${depth}`));
      }),
      { seed: 11, numRuns: 300 },
    );
  });

  it('refuses what canonicalJson refuses, with the same message naming the path', () => {
    for (const value of [{ a: { b: [1, 2, Number.NaN] } }, { p: [[1], [2, Infinity]] }, { d: new Date(0) }, [1, undefined]]) {
      let expected = '';
      try {
        canonicalJson(value);
      } catch (e) {
        expected = (e as Error).message;
      }
      expect(expected).not.toBe('');
      expect(() => bothTexts(value)).toThrow(StoreError);
      expect(() => bothTexts(value)).toThrow(expected);
    }
  });
});

function reverseMembers(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(reverseMembers);
  if (v !== null && typeof v === 'object') {
    return Object.fromEntries(Object.entries(v as Record<string, unknown>).reverse().map(([k, x]) => [k, reverseMembers(x)]));
  }
  return v;
}
