/**
 * CSV files of simulated rows for the `certa update` CLI tests.
 */
import { formatTime } from '../../src/data/calendar.js';
import type { Series } from '../../src/data/series.js';

/** Rows [from, to) of a simulated series as a CSV file (month, sales, price). */
export function csvRows(series: Series, from: number, to: number, edit?: (row: number, cells: string[]) => void): string {
  const lines = ['month,sales,price'];
  for (let t = from; t < to; t++) {
    const cells = [formatTime(series.time[t], series.frequency), String(series.values[t]), String(series.inputs[0].values[t])];
    edit?.(t, cells);
    lines.push(cells.join(','));
  }
  return `${lines.join('\n')}\n`;
}

