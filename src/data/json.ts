/**
 * JSON → Table: the file must be an array of records (objects whose values are numbers,
 * strings, booleans or null). Columns are the keys in the order first seen; a record lacking a
 * key has an empty cell there. Rows are numbered by record, from 1.
 */
import { DataError } from './errors.js';
import type { Cell, Table } from './table.js';

export function parseJsonRecords(text: string, file: string): Table {
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (e) {
    const detail = e instanceof Error ? e.message : String(e);
    throw new DataError('json-invalid', 'the file is not valid JSON', {
      file,
      found: detail,
      expected: 'an array of records, e.g. [{"date": "2021-01", "sales": 12}, ...]',
    });
  }
  if (!Array.isArray(data)) {
    throw new DataError('json-not-array', 'the JSON is not an array of records', {
      file,
      found: data === null ? 'null' : typeof data === 'object' ? 'an object' : typeof data,
      expected: 'an array of records, e.g. [{"date": "2021-01", "sales": 12}, ...]',
    });
  }
  if (data.length === 0) throw new DataError('file-no-rows', 'the JSON array is empty', { file, expected: 'at least one record' });
  const index = new Map<string, number>();
  const header: string[] = [];
  const columns: Cell[][] = [];
  data.forEach((record, r) => {
    if (record === null || typeof record !== 'object' || Array.isArray(record)) {
      throw new DataError('json-not-record', 'an array element is not a record', {
        file,
        row: r + 1,
        found: JSON.stringify(record) ?? String(record),
        expected: 'an object such as {"date": "2021-01", "sales": 12}',
      });
    }
    for (const [key, value] of Object.entries(record as Record<string, unknown>)) {
      let c = index.get(key);
      if (c === undefined) {
        c = header.length;
        index.set(key, c);
        header.push(key);
        columns.push(new Array<Cell>(r).fill(null));
      }
      if (value !== null && typeof value === 'object') {
        throw new DataError('json-nested', 'a record holds a nested value', {
          file,
          row: r + 1,
          column: key,
          found: JSON.stringify(value).slice(0, 60),
          expected: 'a number, string, boolean or null',
        });
      }
      columns[c].push(value as Cell);
    }
    for (const col of columns) if (col.length === r) col.push(null);
  });
  const rows = Int32Array.from({ length: data.length }, (_, r) => r + 1);
  return { source: file, format: 'json', header, columns, rows };
}
