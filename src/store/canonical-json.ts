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
  return texts(value, '  ', '', false).canonical;
}

/** Sorted-key JSON with two-space indentation, short scalar arrays on one line. */
export function prettyJson(value: unknown, indent = '  '): string {
  return texts(value, indent, '', true).pretty;
}

/**
 * `canonicalJson(value)` and `prettyJson(value, indent)` from one walk over the value (keys
 * sorted once, each number written once). `depth` is put after every line break of the pretty
 * text, as when it is nested in an outer document at that indentation.
 */
export function bothTexts(value: unknown, indent = '  ', depth = ''): { canonical: string; pretty: string } {
  return texts(value, indent, depth, true);
}

function texts(value: unknown, indent: string, depth: string, pretty: boolean): { canonical: string; pretty: string } {
  canonicalOut = '';
  prettyOut = '';
  withPretty = pretty;
  try {
    emit(value, indent, depth);
  } catch (e) {
    canonicalOut = prettyOut = '';
    // the walk above keeps no paths; the checked walk names the value JSON cannot hold
    if (e === NOT_JSON) write(value, '$', null, '');
    throw e;
  }
  const out = { canonical: canonicalOut, pretty: prettyOut };
  canonicalOut = prettyOut = '';
  return out;
}

/** Thrown by `emit` at a value JSON cannot hold; `write` then finds its path for the message. */
const NOT_JSON = new Error('not JSON');
let canonicalOut = '';
let prettyOut = '';
/** Whether `emit` writes the pretty text too (canonicalJson alone needs only the canonical). */
let withPretty = true;

function scalarText(value: unknown): string | undefined {
  if (value === null) return 'null';
  switch (typeof value) {
    case 'number':
      if (value - value !== 0) throw NOT_JSON;
      return value === 0 ? '0' : String(value);
    case 'string':
      return JSON.stringify(value);
    case 'boolean':
      return value ? 'true' : 'false';
    case 'object':
      return undefined;
    default:
      throw NOT_JSON;
  }
}

/** Appends the value to both texts (the same rules as `write`, without the paths). */
function emit(value: unknown, indent: string, depth: string): void {
  const scalar = scalarText(value);
  if (scalar !== undefined) {
    canonicalOut += scalar;
    if (withPretty) prettyOut += scalar;
    return;
  }
  const inner = depth + indent;
  if (Array.isArray(value)) {
    const n = value.length;
    if (n === 0) {
      canonicalOut += '[]';
      if (withPretty) prettyOut += '[]';
      return;
    }
    let scalars = true;
    for (let i = 0; i < n; i++) {
      const item: unknown = value[i];
      if (item === undefined) throw NOT_JSON;
      if (item !== null && typeof item !== 'number' && typeof item !== 'boolean') {
        scalars = false;
        break;
      }
    }
    if (scalars) {
      let line = '';
      for (let i = 0; i < n; i++) {
        const item: unknown = value[i];
        let text: string;
        if (typeof item === 'number') {
          if (item - item !== 0) throw NOT_JSON;
          text = item === 0 ? '0' : String(item);
        } else text = item === null ? 'null' : item ? 'true' : 'false';
        if (i === 0) {
          canonicalOut += `[${text}`;
          line = `[${text}`;
        } else {
          canonicalOut += `,${text}`;
          line += `, ${text}`;
        }
      }
      canonicalOut += ']';
      if (withPretty) prettyOut += `${line}]`;
      return;
    }
    for (let i = 0; i < n; i++) {
      const item: unknown = value[i];
      if (item === undefined) throw NOT_JSON;
      canonicalOut += i === 0 ? '[' : ',';
      if (withPretty) prettyOut += i === 0 ? `[\n${inner}` : `,\n${inner}`;
      emit(item, indent, inner);
    }
    canonicalOut += ']';
    if (withPretty) prettyOut += `\n${depth}]`;
    return;
  }
  const proto = Object.getPrototypeOf(value);
  if (proto !== Object.prototype && proto !== null) throw NOT_JSON;
  const record = value as Record<string, unknown>;
  const keys = Object.keys(record);
  let kept = 0;
  for (let i = 0; i < keys.length; i++) if (record[keys[i]] !== undefined) keys[kept++] = keys[i];
  keys.length = kept;
  if (kept === 0) {
    canonicalOut += '{}';
    if (withPretty) prettyOut += '{}';
    return;
  }
  keys.sort();
  for (let i = 0; i < kept; i++) {
    const name = JSON.stringify(keys[i]);
    canonicalOut += i === 0 ? `{${name}:` : `,${name}:`;
    if (withPretty) prettyOut += i === 0 ? `{\n${inner}${name}: ` : `,\n${inner}${name}: `;
    emit(record[keys[i]], indent, inner);
  }
  canonicalOut += '}';
  if (withPretty) prettyOut += `\n${depth}}`;
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
