/**
 * A dense real matrix stored row-major in one Float64Array: element (i, j) is
 * `data[i * cols + j]`. This is the regressor matrix Φ handed between model structures and
 * the estimation core; factorisations may copy it into whatever layout their loops prefer.
 */
export interface DesignMatrix {
  rows: number;
  cols: number;
  data: Float64Array;
}

/** A zero matrix of the given shape. */
export function zeros(rows: number, cols: number): DesignMatrix {
  return { rows, cols, data: new Float64Array(rows * cols) };
}

/** From nested arrays (one inner array per row); all rows must have the same length. */
export function fromRows(rowsIn: ArrayLike<number>[]): DesignMatrix {
  const rows = rowsIn.length;
  const cols = rows > 0 ? rowsIn[0].length : 0;
  const m = zeros(rows, cols);
  for (let i = 0; i < rows; i++) {
    const r = rowsIn[i];
    if (r.length !== cols) throw new RangeError(`row ${i} has ${r.length} entries, expected ${cols}`);
    for (let j = 0; j < cols; j++) m.data[i * cols + j] = r[j];
  }
  return m;
}

/** Row i as a new Float64Array (a copy). */
export function row(m: DesignMatrix, i: number): Float64Array {
  return m.data.slice(i * m.cols, (i + 1) * m.cols);
}
