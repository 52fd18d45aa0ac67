/**
 * The one machine-readable shape of every command (`--json`), whatever the number of series:
 *
 *   { format: "certa-result", version: 1, command, caution?, totals: { series, succeeded, failed },
 *     file?, results: [ { series, status, folder, reason, detail } ] }
 *
 * `detail` is the command's document for that series (the forecast summary, the search ranking,
 * the update summary, the inspect entry), null when the series failed. Every key is snake_case
 * (`snakeKeys` turns the library's camelCase names into it), at every depth. The JSON Schema is
 * docs/result.schema.json.
 */
import { FORECAST_CAUTION } from './cautions.js';
import { toJson } from './tables.js';

export const RESULT_FORMAT = 'certa-result';
export const RESULT_VERSION = 1;
/** summary.json files (forecast and update) carry this format and version. */
export const SUMMARY_FORMAT = 'certa-summary';
export const SUMMARY_VERSION = 2;

export type ResultCommand = 'inspect' | 'search' | 'forecast' | 'update';

export interface ResultEntry {
  series: string;
  status: 'ok' | 'failed';
  /** Folder of the series' files (as given on the command line or relative to a batch folder), or null. */
  folder: string | null;
  reason: string | null;
  detail: unknown;
}

/** `someKey` → `some_key`, `pValue` → `p_value`, `lower_80` unchanged. */
export function snakeCase(key: string): string {
  let out = snakeCache.get(key);
  if (out === undefined) {
    out = key.replace(/([a-z0-9])([A-Z])/g, '$1_$2').replace(/([A-Z])([A-Z][a-z])/g, '$1_$2').toLowerCase();
    if (snakeCache.size < 10_000) snakeCache.set(key, out);
  }
  return out;
}

/** Keys repeat across rows and series: each is converted once. */
const snakeCache = new Map<string, string>();

/** A copy of `value` with every object key in snake_case (arrays and typed arrays kept as arrays). */
export function snakeKeys(value: unknown): unknown {
  if (value === null || typeof value !== 'object') return value;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return Array.from(value as unknown as ArrayLike<number>);
  if (Array.isArray(value)) return value.map(snakeKeys);
  const record = value as Record<string, unknown>;
  const out: Record<string, unknown> = {};
  // Object.keys, not Object.entries: the same keys in the same order, without a pair per key
  const keys = Object.keys(record);
  for (let i = 0; i < keys.length; i++) out[snakeCase(keys[i])] = snakeKeys(record[keys[i]]);
  return out;
}

/** The envelope around the entries of one command run. */
export function resultDocument(command: ResultCommand, entries: ResultEntry[], extra: { file?: unknown } = {}): Record<string, unknown> {
  const failed = entries.filter((e) => e.status === 'failed').length;
  return {
    format: RESULT_FORMAT,
    version: RESULT_VERSION,
    command,
    ...(command === 'forecast' || command === 'update' ? { caution: FORECAST_CAUTION } : {}),
    totals: { series: entries.length, succeeded: entries.length - failed, failed },
    ...(extra.file !== undefined ? { file: snakeKeys(extra.file) } : {}),
    results: entries.map((e) => ({ series: e.series, status: e.status, folder: e.folder, reason: e.reason, detail: snakeKeys(e.detail) })),
  };
}

/** A summary.json document: snake_case keys plus format, version and command. */
export function summaryDocument(command: 'forecast' | 'update', summary: Record<string, unknown>): Record<string, unknown> {
  return { format: SUMMARY_FORMAT, version: SUMMARY_VERSION, command, ...(snakeKeys(summary) as Record<string, unknown>) };
}

/** A result entry whose detail is already written: `toJson` of the detail document, or null. */
export interface WrittenResultEntry extends Omit<ResultEntry, 'detail'> {
  detailJson: string | null;
}

/**
 * `toJson(resultDocument(command, entries))` for entries whose details are already written as
 * JSON (each a summary.json text: snake_case keys, written by `toJson`), without reading them
 * back: each detail text is put in place, indented to its depth in the document.
 */
export function resultDocumentText(command: ResultCommand, entries: WrittenResultEntry[], extra: { file?: unknown } = {}): string {
  const envelope = resultDocument(
    command,
    entries.map((e) => ({ series: e.series, status: e.status, folder: e.folder, reason: e.reason, detail: null })),
    extra,
  );
  const empty = toJson({ ...envelope, results: [] });
  if (entries.length === 0) return empty;
  // strings are written with their line breaks escaped, so this line is the results member only
  const slot = '\n  "results": [],\n';
  const at = empty.indexOf(slot);
  if (at < 0 || empty.indexOf(slot, at + 1) >= 0) throw new Error('resultDocumentText: the results member was not found once');
  let results = '\n  "results": [';
  entries.forEach((e, i) => {
    const detail = e.detailJson === null ? 'null' : e.detailJson.replace(/\n$/, '').replace(/\n/g, '\n      ');
    results += `${i === 0 ? '' : ','}\n    {\n      "detail": ${detail},\n      "folder": ${JSON.stringify(e.folder)},\n      "reason": ${JSON.stringify(e.reason)},\n      "series": ${JSON.stringify(e.series)},\n      "status": ${JSON.stringify(e.status)}\n    }`;
  });
  results += '\n  ],\n';
  return empty.slice(0, at) + results + empty.slice(at + slot.length);
}
