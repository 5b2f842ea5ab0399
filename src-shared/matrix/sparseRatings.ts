/**
 * The observed cells of a rating matrix in compact sparse storage: the unit of work of the
 * engine (baselines, folds, fits, scoring all run on it; nothing there is rows × cols).
 *
 * Compressed by row: row i's entries are p ∈ [rowPtr[i], rowPtr[i+1]), with column rowCol[p]
 * and value rowVal[p], columns ascending. Compressed by column: column j's entries are
 * q ∈ [colPtr[j], colPtr[j+1]), with row colRow[q] and value colVal[q], rows ascending.
 * colEntry[q] is the row-order position p of the same cell, so anything laid out by row
 * (folds, residuals, held-out predictions) can be read in column order.
 *
 * Memory: 12 bytes per rating per order plus 4 for colEntry (28 per rating) and 4 per row
 * and per column; a dense copy is made only for what a person sees (see denseValues).
 */
import type { RatingMatrix, RatingScale } from './ratingMatrix';

export interface SparseRatings {
  rows: number;
  cols: number;
  /** Number of observed cells. */
  n: number;
  rowPtr: Int32Array;
  rowCol: Int32Array;
  rowVal: Float64Array;
  colPtr: Int32Array;
  colRow: Int32Array;
  colVal: Float64Array;
  /** Row-order position of each column-ordered entry. */
  colEntry: Int32Array;
}

/** Observed ratings with their labels and scale: what the engine's jobs read. */
export interface SparseMatrix {
  rowLabels: string[];
  colLabels: string[];
  scale: RatingScale;
  data: SparseRatings;
}

/** Column-major side built from the row-major side (a counting sort: O(n + cols)). */
function withColumns(
  rows: number,
  cols: number,
  rowPtr: Int32Array,
  rowCol: Int32Array,
  rowVal: Float64Array,
): SparseRatings {
  const n = rowPtr[rows];
  const colPtr = new Int32Array(cols + 1);
  for (let p = 0; p < n; p++) colPtr[rowCol[p] + 1]++;
  for (let j = 0; j < cols; j++) colPtr[j + 1] += colPtr[j];
  const fill = colPtr.slice(0, cols);
  const colRow = new Int32Array(n);
  const colVal = new Float64Array(n);
  const colEntry = new Int32Array(n);
  for (let i = 0; i < rows; i++) {
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      const q = fill[rowCol[p]]++;
      colRow[q] = i;
      colVal[q] = rowVal[p];
      colEntry[q] = p;
    }
  }
  return { rows, cols, n, rowPtr, rowCol, rowVal, colPtr, colRow, colVal, colEntry };
}

/** Sparse storage of a dense row-major array (NaN = missing): one pass to count, one to copy. */
export function sparseFromDense(values: Float64Array, rows: number, cols: number): SparseRatings {
  const rowPtr = new Int32Array(rows + 1);
  let n = 0;
  for (let i = 0; i < rows; i++) {
    const base = i * cols;
    for (let j = 0; j < cols; j++) {
      const x = values[base + j];
      if (x === x) n++;
    }
    rowPtr[i + 1] = n;
  }
  const rowCol = new Int32Array(n);
  const rowVal = new Float64Array(n);
  let p = 0;
  for (let i = 0; i < rows; i++) {
    const base = i * cols;
    for (let j = 0; j < cols; j++) {
      const x = values[base + j];
      if (x === x) {
        rowCol[p] = j;
        rowVal[p++] = x;
      }
    }
  }
  return withColumns(rows, cols, rowPtr, rowCol, rowVal);
}

/**
 * Sparse storage from (row, column, value) triples in any order. A cell given twice is an
 * error the caller reports (returned as the triple index of the second occurrence).
 */
export function sparseFromTriples(
  rows: number,
  cols: number,
  rowIdx: Int32Array,
  colIdx: Int32Array,
  vals: Float64Array,
  count = vals.length,
): SparseRatings | { duplicate: number } {
  const rowPtr = new Int32Array(rows + 1);
  for (let t = 0; t < count; t++) rowPtr[rowIdx[t] + 1]++;
  for (let i = 0; i < rows; i++) rowPtr[i + 1] += rowPtr[i];
  // Counting sort by column first, then a stable pass by row gives columns ascending in each row.
  const colPtr = new Int32Array(cols + 1);
  for (let t = 0; t < count; t++) colPtr[colIdx[t] + 1]++;
  for (let j = 0; j < cols; j++) colPtr[j + 1] += colPtr[j];
  const byCol = new Int32Array(count);
  const cf = colPtr.slice(0, cols);
  for (let t = 0; t < count; t++) byCol[cf[colIdx[t]]++] = t;
  const rowCol = new Int32Array(count);
  const rowVal = new Float64Array(count);
  const source = new Int32Array(count);
  const rf = rowPtr.slice(0, rows);
  for (let s = 0; s < count; s++) {
    const t = byCol[s];
    const p = rf[rowIdx[t]]++;
    rowCol[p] = colIdx[t];
    rowVal[p] = vals[t];
    source[p] = t;
  }
  for (let i = 0; i < rows; i++) {
    for (let p = rowPtr[i] + 1; p < rowPtr[i + 1]; p++) {
      if (rowCol[p] === rowCol[p - 1]) return { duplicate: Math.max(source[p], source[p - 1]) };
    }
  }
  return withColumns(rows, cols, rowPtr, rowCol, rowVal);
}

/** New compact storage without the entries p where drop[p] === dropValue (a row-order mask, e.g. a fold). */
export function sparseSubset(s: SparseRatings, drop: Int32Array, dropValue: number): SparseRatings {
  const { rows, rowPtr, rowCol, rowVal } = s;
  const ptr = new Int32Array(rows + 1);
  let m = 0;
  for (let i = 0; i < rows; i++) {
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) if (drop[p] !== dropValue) m++;
    ptr[i + 1] = m;
  }
  const col = new Int32Array(m);
  const val = new Float64Array(m);
  let t = 0;
  for (let p = 0; p < s.n; p++) {
    if (drop[p] === dropValue) continue;
    col[t] = rowCol[p];
    val[t++] = rowVal[p];
  }
  return withColumns(rows, s.cols, ptr, col, val);
}

/** Dense row-major values (NaN = missing): only for display, export or the dense Gaussian family. */
export function denseValues(s: SparseRatings): Float64Array {
  const out = new Float64Array(s.rows * s.cols).fill(NaN);
  for (let i = 0; i < s.rows; i++) {
    const base = i * s.cols;
    for (let p = s.rowPtr[i]; p < s.rowPtr[i + 1]; p++) out[base + s.rowCol[p]] = s.rowVal[p];
  }
  return out;
}

/** First non-finite observed value (±Infinity), or undefined. */
export function findNonFiniteEntry(s: SparseRatings): { row: number; col: number } | undefined {
  for (let i = 0; i < s.rows; i++) {
    for (let p = s.rowPtr[i]; p < s.rowPtr[i + 1]; p++) {
      const x = s.rowVal[p];
      if (x === Infinity || x === -Infinity) return { row: i, col: s.rowCol[p] };
    }
  }
  return undefined;
}

export function isSparseMatrix(m: RatingMatrix | SparseMatrix): m is SparseMatrix {
  return (m as SparseMatrix).data !== undefined;
}

/** The sparse form of either kind of matrix (the dense one is converted once). */
export function toSparseMatrix(m: RatingMatrix | SparseMatrix): SparseMatrix {
  if (isSparseMatrix(m)) return m;
  const rows = m.rowLabels.length;
  const cols = m.colLabels.length;
  return {
    rowLabels: m.rowLabels,
    colLabels: m.colLabels,
    scale: m.scale,
    data: sparseFromDense(m.values, rows, cols),
  };
}

/** A dense RatingMatrix of a sparse one (display, export, the Gaussian family). */
export function toDenseMatrix(m: SparseMatrix): RatingMatrix {
  return { rowLabels: m.rowLabels, colLabels: m.colLabels, scale: m.scale, values: denseValues(m.data) };
}
