/**
 * Where a table comes from: a file path or bytes already read (standard input), and which
 * format its bytes hold. The format follows the file extension (`.csv`, `.tsv`/`.tab`, `.xlsx`,
 * `.json`) unless the bytes say otherwise; without a telling extension (standard input, `.txt`)
 * it is sniffed: a ZIP signature is a workbook, a leading `[` or `{` is JSON, anything else is
 * delimited text. Text must be UTF-8 (a byte-order mark is dropped).
 */
import { readFile } from 'node:fs/promises';
import { extname } from 'node:path';
import { DataError } from './errors.js';
import type { TableFormat } from './table.js';

/** Bytes with the name to use in messages (`-` for standard input). */
export interface TableSource {
  name: string;
  bytes: Buffer;
}

/** Reads a path into a TableSource; a missing or unreadable file is a DataError. */
export async function readSource(path: string): Promise<TableSource> {
  try {
    return { name: path, bytes: await readFile(path) };
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'this is a directory' : code === 'EACCES' ? 'permission denied' : 'the file cannot be read';
    throw new DataError('file-unreadable', reason, { file: path, expected: 'a readable CSV, TSV, XLSX or JSON file' });
  }
}

const ZIP_SIGNATURE = [0x50, 0x4b, 0x03, 0x04];

/** The format of a source: from the extension, corrected by the bytes. */
export function sniffFormat(source: TableSource): TableFormat {
  const b = source.bytes;
  const isZip = b.length >= 4 && ZIP_SIGNATURE.every((x, i) => b[i] === x);
  const ext = source.name === '-' ? '' : extname(source.name).toLowerCase();
  if (isZip || ext === '.xlsx' || ext === '.xlsm') return 'xlsx';
  if (ext === '.json') return 'json';
  if (ext === '.tsv' || ext === '.tab') return 'tsv';
  if (ext === '.csv') return 'csv';
  for (let i = b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0; i < b.length; i++) {
    const c = b[i];
    if (c === 0x20 || c === 0x09 || c === 0x0a || c === 0x0d) continue;
    return c === 0x5b || c === 0x7b ? 'json' : 'csv';
  }
  return 'csv';
}

const decoder = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false });

/** UTF-8 bytes → string without BOM; refuses binary data and other encodings. */
export function decodeText(source: TableSource): string {
  const b = source.bytes;
  if (b.length === 0) throw new DataError('file-empty', 'the file is empty', { file: source.name, expected: 'a header line and data rows' });
  if ((b[0] === 0xff && b[1] === 0xfe) || (b[0] === 0xfe && b[1] === 0xff)) {
    throw new DataError('text-encoding', 'the file is UTF-16 text', { file: source.name, expected: 'UTF-8 text', hint: 'save the file as UTF-8 (CSV UTF-8)' });
  }
  const nul = b.indexOf(0);
  if (nul >= 0) {
    throw new DataError('text-binary', 'the file is not text (it contains a NUL byte)', {
      file: source.name,
      found: `byte 0x00 at offset ${nul}`,
      expected: 'UTF-8 text (CSV, TSV or JSON) or an .xlsx workbook',
    });
  }
  let text: string;
  try {
    text = decoder.decode(b);
  } catch {
    const at = firstInvalidUtf8(b);
    throw new DataError('text-encoding', 'the file is not UTF-8 text', {
      file: source.name,
      row: lineOf(b, at),
      found: `byte 0x${b[at].toString(16).padStart(2, '0')} at offset ${at}`,
      expected: 'UTF-8 text (CSV, TSV or JSON) or an .xlsx workbook',
      hint: 'save the file as UTF-8 (CSV UTF-8)',
    });
  }
  return text;
}

function lineOf(b: Buffer, at: number): number {
  let line = 1;
  for (let i = 0; i < at; i++) if (b[i] === 0x0a) line++;
  return line;
}

/** Offset of the first byte that breaks UTF-8 (well-formed sequences per RFC 3629). */
function firstInvalidUtf8(b: Buffer): number {
  let i = 0;
  while (i < b.length) {
    const c = b[i];
    const len = c < 0x80 ? 1 : c >= 0xc2 && c <= 0xdf ? 2 : c >= 0xe0 && c <= 0xef ? 3 : c >= 0xf0 && c <= 0xf4 ? 4 : 0;
    if (len === 0 || i + len > b.length) return i;
    const probe = b.subarray(i, i + len);
    try {
      decoder.decode(probe);
    } catch {
      return i;
    }
    i += len;
  }
  return Math.max(0, b.length - 1);
}
