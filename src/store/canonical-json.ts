/**
 * Canonical JSON: one text for one value, so a hash of it is reproducible on every platform and
 * every run.
 *
 * Rules (those of the JSON Canonicalization Scheme, RFC 8785, Rundgren, Jordan & Erdtman 2020,
 * §3.2): no whitespace; object members sorted by key, comparing keys as sequences of UTF-16 code
 * units (JavaScript's default string order); strings escaped as `JSON.stringify` does; numbers
 * written by ECMAScript's Number::toString (the shortest text that reads back to the same
 * double, so `JSON.parse` then `canonicalJson` reproduces the text exactly), with −0 written as 0.
 * Members whose value is `undefined` are left out, as `JSON.stringify` does. Values JSON cannot
 * hold (NaN, ±Infinity, bigint, functions, symbols, typed arrays and other class instances,
 * `undefined` inside arrays) are refused with a StoreError naming their path.
 *
 * `prettyJson` writes the same sorted members with two-space indentation for files people read;
 * arrays holding only numbers, booleans or null stay on one line. Checksums are always taken over
 * `canonicalJson`, never over the pretty text.
 */
import { StoreError } from '../data/errors.js';

/** The canonical text of a JSON value (see module comment). */
export function canonicalJson(value: unknown): string {
  return write(value, '$', null, '');
}

/** Sorted-key JSON with two-space indentation, short scalar arrays on one line. */
export function prettyJson(value: unknown, indent = '  '): string {
  return write(value, '$', indent, '');
}

function write(value: unknown, path: string, indent: string | null, depth: string): string {
  if (value === null) return 'null';
  switch (typeof value) {
    case 'boolean':
      return value ? 'true' : 'false';
    case 'number':
      if (!Number.isFinite(value)) throw notJson(path, String(value));
      return Object.is(value, -0) ? '0' : String(value);
    case 'string':
      return JSON.stringify(value);
    case 'object':
      break;
    default:
      throw notJson(path, typeof value);
  }
  const inner = indent === null ? null : depth + indent;
  if (Array.isArray(value)) {
    if (value.length === 0) return '[]';
    const items = value.map((item, i) => {
      if (item === undefined) throw notJson(`${path}[${i}]`, 'undefined');
      return write(item, `${path}[${i}]`, indent, inner ?? '');
    });
    if (inner === null) return `[${items.join(',')}]`;
    const scalars = value.every((item) => item === null || typeof item === 'number' || typeof item === 'boolean');
    if (scalars) return `[${items.join(', ')}]`;
    return `[\n${items.map((s) => inner + s).join(',\n')}\n${depth}]`;
  }
  const proto = Object.getPrototypeOf(value);
  if (proto !== Object.prototype && proto !== null) throw notJson(path, (value as object).constructor?.name ?? 'object');
  const record = value as Record<string, unknown>;
  const keys = Object.keys(record)
    .filter((key) => record[key] !== undefined)
    .sort();
  if (keys.length === 0) return '{}';
  const members = keys.map((key) => {
    const text = write(record[key], `${path}.${key}`, indent, inner ?? '');
    return inner === null ? `${JSON.stringify(key)}:${text}` : `${JSON.stringify(key)}: ${text}`;
  });
  if (inner === null) return `{${members.join(',')}}`;
  return `{\n${members.map((s) => inner + s).join(',\n')}\n${depth}}`;
}

function notJson(path: string, found: string): StoreError {
  return new StoreError('not-serialisable', `the value at ${path} cannot be written as JSON`, {
    found,
    expected: 'finite numbers, strings, booleans, null, plain arrays and objects',
  });
}
