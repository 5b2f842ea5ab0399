/**
 * Per-cell trust: how much a cell's prediction moves when the data it was fitted on
 * changes, plus how much data supports it.
 *
 * Ensemble of M fits (all through fitModel, same settings):
 *   folds:     the k cross-validation training sets (each hides one fold), M = k;
 *   bootstrap: B refits, each on the observed cells drawn n times with replacement
 *              (seeded); a matrix holds one value per cell, so a cell drawn several
 *              times counts once and each refit sees about 1 − 1/e ≈ 63 % of the cells.
 * spread_c = sample standard deviation of the M predictions of cell c (divisor M − 1),
 *            for every cell, observed or not.
 * rowSupport_i = observed cells in row i; colSupport_j = observed cells in column j.
 * A row/column with support below the rank (1 for a family without rank) is weakly
 * determined: its k factor coordinates are fitted from fewer than k values.
 */
import type { RatingMatrix } from '../matrix/ratingMatrix';
import type { FitSettings } from './types';
import { fitModel } from './fitModel';
import { makeFolds, trainingMatrix } from './crossValidation';
import { createRng } from './random';

export type TrustOptions =
  | { method: 'folds'; k: number; seed: number }
  | { method: 'bootstrap'; B: number; seed: number };

export interface CellTrust {
  spread: Float64Array;
  rowSupport: Int32Array;
  colSupport: Int32Array;
  weakRows: number[];
  weakCols: number[];
}

export interface TrustProgressOptions {
  onProgress?: (p: { done: number; total: number }) => void;
  shouldStop?: () => boolean;
}

function bootstrapMatrix(matrix: RatingMatrix, cells: Int32Array, rng: ReturnType<typeof createRng>): RatingMatrix {
  const values = new Float64Array(matrix.values.length).fill(NaN);
  const n = cells.length;
  for (let t = 0; t < n; t++) {
    const c = cells[rng.int(n)];
    values[c] = matrix.values[c];
  }
  return { rowLabels: matrix.rowLabels, colLabels: matrix.colLabels, values, scale: matrix.scale };
}

export function cellTrust(
  matrix: RatingMatrix,
  settings: FitSettings,
  options: TrustOptions,
  progress: TrustProgressOptions = {},
): CellTrust {
  const rows = matrix.rowLabels.length;
  const cols = matrix.colLabels.length;
  const values = matrix.values;
  const rowSupport = new Int32Array(rows);
  const colSupport = new Int32Array(cols);
  let n = 0;
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) {
      const x = values[i * cols + j];
      if (x === x) {
        rowSupport[i]++;
        colSupport[j]++;
        n++;
      }
    }
  const m = options.method === 'folds' ? options.k : options.B;
  if (!Number.isInteger(m) || m < 2) throw new Error(`trust needs an ensemble of at least 2 fits (got ${m})`);
  // Welford running mean / sum of squares per cell.
  const mean = new Float64Array(rows * cols);
  const m2 = new Float64Array(rows * cols);
  const foldsOrCells =
    options.method === 'folds' ? makeFolds(matrix, options.k, options.seed) : undefined;
  const cells = new Int32Array(n);
  if (options.method === 'bootstrap') {
    let t = 0;
    for (let c = 0; c < values.length; c++) if (values[c] === values[c]) cells[t++] = c;
  }
  const rng = createRng(options.seed);
  for (let e = 0; e < m; e++) {
    const train = foldsOrCells ? trainingMatrix(matrix, foldsOrCells, e) : bootstrapMatrix(matrix, cells, rng);
    const fit = fitModel(train, settings, { shouldStop: progress.shouldStop });
    const p = fit.predictions;
    const cnt = e + 1;
    for (let c = 0; c < p.length; c++) {
      const d = p[c] - mean[c];
      mean[c] += d / cnt;
      m2[c] += d * (p[c] - mean[c]);
    }
    progress.onProgress?.({ done: e + 1, total: m });
  }
  const spread = new Float64Array(rows * cols);
  for (let c = 0; c < spread.length; c++) spread[c] = Math.sqrt(Math.max(m2[c], 0) / (m - 1));
  const threshold = settings.model === 'lowrank' ? settings.rank : 1;
  const weakRows: number[] = [];
  const weakCols: number[] = [];
  for (let i = 0; i < rows; i++) if (rowSupport[i] < threshold) weakRows.push(i);
  for (let j = 0; j < cols; j++) if (colSupport[j] < threshold) weakCols.push(j);
  return { spread, rowSupport, colSupport, weakRows, weakCols };
}
