/**
 * XLSX workbook → Table, through exceljs. The first sheet is read unless a sheet name is given;
 * its first non-empty row is the header. When the sheet asked for does not exist, or the sheet
 * read has no data rows, the error lists every sheet with its number of data rows and the hint
 * names the other sheet with the most data rows (of those with two columns or more). Date cells become `ExcelSerial` values in the
 * workbook's date system (1900 or 1904), so dates.ts maps them by the ECMA-376 rules rather
 * than by the library's conversion. Formula cells contribute their cached result.
 */
import { DataError, UsageError } from './errors.js';
import { checkHeader } from './csv.js';
import { ExcelSerial, type Cell, type Table } from './table.js';

const DAY = 86_400_000;
/** Serial of 1970-01-01 in the 1900 system as exceljs counts it (its conversion is `(serial − 25569) days`). */
const UNIX_EPOCH_SERIAL = 25569;
/** Days between the 1900 and 1904 epochs as exceljs offsets them. */
const EPOCH_1904_OFFSET = 1462;

export async function parseXlsx(bytes: Buffer, file: string, sheetName?: string): Promise<Table> {
  // Loaded on first use: the library is large and most runs read text files.
  const { default: ExcelJS } = await import('exceljs');
  const workbook = new ExcelJS.Workbook();
  try {
    await workbook.xlsx.load(bytes as unknown as ArrayBuffer);
  } catch (e) {
    throw new DataError('xlsx-corrupt', 'the workbook cannot be read', {
      file,
      found: e instanceof Error ? e.message : String(e),
      expected: 'an .xlsx workbook (Office Open XML)',
    });
  }
  const sheets = workbook.worksheets;
  if (sheets.length === 0) throw new DataError('xlsx-no-sheets', 'the workbook has no sheets', { file, expected: 'at least one sheet' });
  const sheet = sheetName === undefined ? sheets[0] : sheets.find((s) => s.name === sheetName);
  const listing = sheets.map((s) => ({ name: s.name, rows: dataRows(s) }));
  const listed = (list: typeof listing) => list.map((s) => `"${s.name}" (${s.rows === 0 ? 'no data rows' : `${s.rows} data row${s.rows === 1 ? '' : 's'}`})`).join(', ');
  // The hint names the other sheet with the most data rows among those with a time and a value column's width.
  let usable: { name: string; rows: number } | undefined;
  sheets.forEach((s, i) => {
    const rows = listing[i].rows;
    if (s.name !== sheet?.name && rows > 0 && s.actualColumnCount >= 2 && rows > (usable?.rows ?? 0)) usable = listing[i];
  });
  const sheetHint = usable ? { hint: `pass --sheet ${JSON.stringify(usable.name)}` } : {};
  if (!sheet) {
    throw new UsageError('xlsx-unknown-sheet', `no sheet named "${sheetName}"`, {
      file,
      found: sheetName,
      expected: `one of ${listed(listing)}`,
      ...sheetHint,
    });
  }
  const others = listing.filter((s) => s.name !== sheet.name);
  const elsewhere = others.length > 0 ? `; the other sheets: ${listed(others)}` : '';
  const date1904 = Boolean((workbook.properties as { date1904?: boolean }).date1904);
  let header: string[] | null = null;
  let headerRow = 0;
  let columns: Cell[][] = [];
  const rows: number[] = [];
  sheet.eachRow({ includeEmpty: false }, (row, rowNumber) => {
    const values = row.values as unknown[];
    if (header === null) {
      const width = values.length - 1;
      header = [];
      for (let c = 1; c <= width; c++) header.push(textOf(values[c]).trim());
      while (header.length > 0 && header[header.length - 1] === '') header.pop();
      headerRow = rowNumber;
      checkHeader(header, file, rowNumber);
      columns = header.map(() => []);
      return;
    }
    const width = header.length;
    for (let c = values.length - 1; c > width; c--) {
      if (cellOf(values[c], date1904) !== null) {
        throw new DataError('xlsx-too-many-fields', `the row has a value beyond the header's ${width} columns`, {
          file,
          row: rowNumber,
          column: String(c),
          found: textOf(values[c]),
          expected: `values only under the ${width} named columns`,
        });
      }
    }
    for (let c = 0; c < width; c++) columns[c].push(cellOf(values[c + 1], date1904));
    rows.push(rowNumber);
  });
  if (header === null) throw new DataError('file-empty', `sheet "${sheet.name}" is empty${elsewhere}`, { file, expected: 'a header row and data rows', ...sheetHint });
  if (rows.length === 0) {
    throw new DataError('file-no-rows', `sheet "${sheet.name}" has a header but no data rows${elsewhere}`, {
      file,
      row: headerRow,
      expected: 'at least one data row under the header',
      ...sheetHint,
    });
  }
  return { source: file, format: 'xlsx', sheet: sheet.name, sheets: listing, header: header as string[], columns, rows: Int32Array.from(rows) };
}

/** Rows with a value below the first non-empty row (the header). */
function dataRows(sheet: { actualRowCount: number }): number {
  return Math.max(0, sheet.actualRowCount - 1);
}

function cellOf(v: unknown, date1904: boolean): Cell {
  if (v === null || v === undefined) return null;
  if (typeof v === 'number' || typeof v === 'boolean') return v;
  if (typeof v === 'string') return v;
  if (v instanceof Date) {
    // Undo the library's conversion to recover the serial stored in the file.
    const serial = v.getTime() / DAY + UNIX_EPOCH_SERIAL - (date1904 ? EPOCH_1904_OFFSET : 0);
    return new ExcelSerial(Math.round(serial * DAY) / DAY, date1904);
  }
  if (typeof v === 'object') {
    const o = v as Record<string, unknown>;
    if ('result' in o || 'formula' in o || 'sharedFormula' in o) return cellOf(o.result, date1904);
    if ('richText' in o && Array.isArray(o.richText)) return (o.richText as { text: string }[]).map((p) => p.text).join('');
    if ('text' in o && typeof o.text === 'string') return o.text;
    if ('error' in o) return String(o.error);
  }
  return String(v);
}

function textOf(v: unknown): string {
  const c = cellOf(v, false);
  if (c === null) return '';
  if (c instanceof ExcelSerial) return String(c.serial);
  return String(c);
}
