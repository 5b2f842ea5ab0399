/**
 * Where the holes are: observed counts per row and per column, a downsampled map
 * of observed and blank cells, and the rows and columns too thin to fill reliably.
 *
 * Map: the rows × cols matrix is cut into at most maxBlockRows × maxBlockCols blocks of
 * ⌈rows / maxBlockRows⌉ × ⌈cols / maxBlockCols⌉ cells; a block's share is
 * (observed cells in it) / (cells in it). A 24 × 14 matrix keeps one block per cell.
 * Thin: a row or column whose observed count is below max(rank, 1) for the low-rank
 * model (its k factor coordinates would be fitted from fewer than k values; the same
 * rule as the window's weak marks, except that an empty row is always named) and below
 * 1 for the Gaussian model.
 */
import type { FitSettings } from '../engine/types';
import type { RatingMatrix } from '../matrix/ratingMatrix';

export interface PatternMap {
  blockRows: number;
  blockCols: number;
  rowsPerBlock: number;
  colsPerBlock: number;
  /** Row-major, blockRows × blockCols, each in [0, 1]. */
  share: Float64Array;
}

export interface MissingPattern {
  rows: number;
  cols: number;
  observed: number;
  rowCounts: Int32Array;
  colCounts: Int32Array;
  map: PatternMap;
  /** Observed count below which a row or column is named as thin. */
  thinBelow: number;
  thinRows: number[];
  thinCols: number[];
}

function thinThreshold(settings: FitSettings): number {
  return settings.model === 'lowrank' ? Math.max(1, settings.rank) : 1;
}

export function missingPattern(
  m: RatingMatrix,
  settings: FitSettings,
  maxBlockRows = 90,
  maxBlockCols = 120,
): MissingPattern {
  const rows = m.rowLabels.length;
  const cols = m.colLabels.length;
  const rowCounts = new Int32Array(rows);
  const colCounts = new Int32Array(cols);
  const rowsPerBlock = Math.max(1, Math.ceil(rows / maxBlockRows));
  const colsPerBlock = Math.max(1, Math.ceil(cols / maxBlockCols));
  const blockRows = Math.ceil(rows / rowsPerBlock);
  const blockCols = Math.ceil(cols / colsPerBlock);
  const hits = new Float64Array(blockRows * blockCols);
  let observed = 0;
  const v = m.values;
  for (let i = 0; i < rows; i++) {
    const bi = ((i / rowsPerBlock) | 0) * blockCols;
    for (let j = 0; j < cols; j++) {
      const x = v[i * cols + j];
      if (x !== x) continue;
      rowCounts[i]++;
      colCounts[j]++;
      observed++;
      hits[bi + ((j / colsPerBlock) | 0)]++;
    }
  }
  const share = new Float64Array(blockRows * blockCols);
  for (let bi = 0; bi < blockRows; bi++) {
    const h = Math.min(rowsPerBlock, rows - bi * rowsPerBlock);
    for (let bj = 0; bj < blockCols; bj++) {
      const w = Math.min(colsPerBlock, cols - bj * colsPerBlock);
      share[bi * blockCols + bj] = hits[bi * blockCols + bj] / (h * w);
    }
  }
  const thinBelow = thinThreshold(settings);
  const thinRows: number[] = [];
  const thinCols: number[] = [];
  for (let i = 0; i < rows; i++) if (rowCounts[i] < thinBelow) thinRows.push(i);
  for (let j = 0; j < cols; j++) if (colCounts[j] < thinBelow) thinCols.push(j);
  return {
    rows,
    cols,
    observed,
    rowCounts,
    colCounts,
    map: { blockRows, blockCols, rowsPerBlock, colsPerBlock, share },
    thinBelow,
    thinRows,
    thinCols,
  };
}
