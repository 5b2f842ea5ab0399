/**
 * Sparse views of the observed cells of a dense row-major matrix (NaN = missing):
 * compressed by row (rowPtr/rowCol/rowCell) and by column (colPtr/colRow/colCell).
 * For row i the observed columns are rowCol[rowPtr[i] .. rowPtr[i+1]); rowCell
 * gives the dense index i·cols + j, so values live in one place (the dense array)
 * and residual arrays can be laid out in either order.
 */

export interface ObservedIndex {
  rows: number;
  cols: number;
  /** Number of observed cells. */
  n: number;
  rowPtr: Int32Array;
  rowCol: Int32Array;
  /** Dense cell index of each row-ordered entry. */
  rowCell: Int32Array;
  colPtr: Int32Array;
  colRow: Int32Array;
  /** Dense cell index of each column-ordered entry. */
  colCell: Int32Array;
}

export function buildObservedIndex(values: Float64Array, rows: number, cols: number): ObservedIndex {
  const rowPtr = new Int32Array(rows + 1);
  const colCount = new Int32Array(cols);
  let n = 0;
  for (let i = 0; i < rows; i++) {
    const base = i * cols;
    for (let j = 0; j < cols; j++) {
      const x = values[base + j];
      if (x === x) {
        n++;
        colCount[j]++;
      }
    }
    rowPtr[i + 1] = n;
  }
  const rowCol = new Int32Array(n);
  const rowCell = new Int32Array(n);
  const colPtr = new Int32Array(cols + 1);
  for (let j = 0; j < cols; j++) colPtr[j + 1] = colPtr[j] + colCount[j];
  const colRow = new Int32Array(n);
  const colCell = new Int32Array(n);
  const fill = colPtr.slice(0, cols);
  let p = 0;
  for (let i = 0; i < rows; i++) {
    const base = i * cols;
    for (let j = 0; j < cols; j++) {
      const x = values[base + j];
      if (x === x) {
        rowCol[p] = j;
        rowCell[p] = base + j;
        p++;
        const q = fill[j]++;
        colRow[q] = i;
        colCell[q] = base + j;
      }
    }
  }
  return { rows, cols, n, rowPtr, rowCol, rowCell, colPtr, colRow, colCell };
}

/** First non-finite observed value (±Infinity), or undefined. NaN means missing. */
export function findNonFinite(values: Float64Array, cols: number): { row: number; col: number } | undefined {
  for (let c = 0; c < values.length; c++) {
    const x = values[c];
    if (x === x && (x === Infinity || x === -Infinity)) {
      return { row: Math.floor(c / cols), col: c % cols };
    }
  }
  return undefined;
}
