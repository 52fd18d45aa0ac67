/**
 * Detection of decimal commas in a delimited file: where numbers are written `3,5`, the comma
 * cannot also separate fields, so such files are semicolon-delimited. A table is read with
 * decimal commas when
 *   - its delimiter is `;`,
 *   - some column's present cells (missing markers aside) all hold one comma each and read as
 *     decimal-comma numbers (`3,5`, `-0,25`, `1.234,5`), and
 *   - no cell of any column is a number with a decimal point (`3.5`), which would contradict it.
 * Anything less (a column mixing `5` and `1,234`) is left to the number parser, whose message
 * names the decimal comma as the likely cause (numbers.ts `numberHint`). Cost: one pass over
 * the cells.
 */
import { isMissingText } from './numbers.js';
import type { Table } from './table.js';

const ONE_COMMA_NUMBER = /^[+-]?(?:\d+|\d{1,3}(?:\.\d{3})+),\d+$/;
const POINT_DECIMAL = /^[+-]?\d*\.\d+(?:[eE][+-]?\d+)?$/;

/** The columns that show decimal commas, or null when the table is not read with them. */
export function detectDecimalComma(table: Table): string[] | null {
  if (table.delimiter !== ';') return null;
  const columns: string[] = [];
  for (let c = 0; c < table.header.length; c++) {
    let present = 0;
    let comma = 0;
    for (const cell of table.columns[c]) {
      if (typeof cell !== 'string') continue;
      const s = cell.trim();
      if (isMissingText(s)) continue;
      if (POINT_DECIMAL.test(s)) return null;
      present++;
      if (ONE_COMMA_NUMBER.test(s)) comma++;
    }
    if (present > 0 && comma === present) columns.push(table.header[c]);
  }
  return columns.length > 0 ? columns : null;
}
