/**
 * The data fingerprint of a model: a running hash over every row the model has seen, so a model
 * file can tell whether a data file is the one it was fitted and updated on, and can be extended
 * row by row as online updates add data, without keeping the data.
 *
 * Definition (a hash chain over SHA-256, FIPS 180-4):
 *   H₀ = SHA-256("certa data fingerprint v1")
 *   Hᵢ = SHA-256(hex(Hᵢ₋₁) ‖ "\n" ‖ canonicalJson([tᵢ, yᵢ, x₁ᵢ, …, x_mᵢ]))
 * where tᵢ is the row's time stamp (calendar.ts units), yᵢ the raw observation and x the raw
 * inputs in the series' input order, all written by canonicalJson (shortest round-trip numbers).
 * The fingerprint is `{ hash: "sha256:" + hex(H_n), rows: n }`. Extending by rows a then b equals
 * extending by a, saving, and later extending by b; the order of rows matters, and so does every
 * digit of every value.
 */
import { hash } from 'node:crypto';
import type { Series } from '../data/series.js';
import { canonicalJson } from './canonical-json.js';

export interface Fingerprint {
  /** `sha256:` followed by 64 lowercase hex digits. */
  hash: string;
  /** Rows hashed so far. */
  rows: number;
}

/** One observation: time stamp, raw value, raw inputs in the series' input order. */
export interface DataRow {
  time: number;
  value: number;
  inputs: readonly number[];
}

const SEED_TEXT = 'certa data fingerprint v1';

/** The fingerprint of no data (H₀). */
export function emptyFingerprint(): Fingerprint {
  return { hash: `sha256:${sha256Hex(SEED_TEXT)}`, rows: 0 };
}

/** The fingerprint after `rows` are appended to the data behind `fp`. */
export function extendFingerprint(fp: Fingerprint, rows: Iterable<DataRow>): Fingerprint {
  let hex = fp.hash.startsWith('sha256:') ? fp.hash.slice(7) : fp.hash;
  let count = fp.rows;
  for (const row of rows) {
    hex = sha256Hex(`${hex}\n${rowJson(row)}`);
    count += 1;
  }
  return { hash: `sha256:${hex}`, rows: count };
}

/** canonicalJson([time, value, ...inputs]), written directly when every entry is a finite number. */
function rowJson(row: DataRow): string {
  let text = numberText(row.time);
  const value = numberText(row.value);
  if (text === undefined || value === undefined) return canonicalJson([row.time, row.value, ...row.inputs]);
  text = `[${text},${value}`;
  for (const x of row.inputs) {
    const t = numberText(x);
    if (t === undefined) return canonicalJson([row.time, row.value, ...row.inputs]);
    text += `,${t}`;
  }
  return `${text}]`;
}

/** A finite number as canonicalJson writes it; undefined for anything else. */
function numberText(x: unknown): string | undefined {
  if (typeof x !== 'number' || !Number.isFinite(x)) return undefined;
  return x === 0 ? '0' : String(x);
}

/** Rows [from, to) of a series, for `extendFingerprint`. */
export function* seriesRows(series: Series, from = 0, to = series.values.length): Generator<DataRow> {
  for (let i = from; i < to; i++) {
    yield { time: series.time[i], value: series.values[i], inputs: series.inputs.map((input) => input.values[i]) };
  }
}

/** The fingerprint of rows [from, to) of a series, starting from no data. */
export function fingerprintSeries(series: Series, from = 0, to = series.values.length): Fingerprint {
  return extendFingerprint(emptyFingerprint(), seriesRows(series, from, to));
}

/** Lowercase hex SHA-256 of a UTF-8 text. */
export function sha256Hex(text: string): string {
  return hash('sha256', text, 'hex');
}
