/**
 * The Table: a file's cells as read, before any meaning is given to them.
 *
 * Column-major (`columns[c][r]`), so later steps can parse one column at a time. Cells keep the
 * type the format gave them: text from CSV/TSV; numbers, booleans and date cells from XLSX and
 * JSON. `rows[r]` is the row number a person sees for data row r (the file line where the record
 * starts in CSV/TSV, the sheet row in XLSX, the 1-based record number in JSON), for messages.
 */

export type TableFormat = 'csv' | 'tsv' | 'xlsx' | 'json';

/** A date cell from a workbook, kept as its serial day number in the workbook's date system. */
export class ExcelSerial {
  constructor(
    readonly serial: number,
    readonly date1904: boolean,
  ) {}
}

/** `null` is an empty cell; strings are as written (missing markers are recognised later). */
export type Cell = string | number | boolean | ExcelSerial | null;

export interface Table {
  /** The file name as the user gave it (`-` for standard input). */
  source: string;
  format: TableFormat;
  /** The field delimiter for CSV/TSV. */
  delimiter?: string;
  /** The sheet read, for XLSX. */
  sheet?: string;
  /** Every sheet of the workbook with its number of data rows, for XLSX. */
  sheets?: { name: string; rows: number }[];
  header: string[];
  columns: Cell[][];
  rows: ArrayLike<number>;
}

/** Number of data rows. */
export function rowCount(table: Table): number {
  return table.rows.length;
}
