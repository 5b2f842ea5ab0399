/**
 * Per-cell trust: how much a cell's prediction moves when the data it was fitted on
 * changes, plus how much data supports it.
 *
 * Ensemble of M fits (all through fitModelSparse on the sparse storage of the observed
 * cells, same settings; training sets are built by index, and each fit's predictions are
 * made one row at a time into one reused buffer):
 *   folds:     the k cross-validation training sets (each hides one fold), M = k;
 *   bootstrap: B refits, each on the observed cells drawn n times with replacement
 *              (seeded); a matrix holds one value per cell, so a cell drawn several
 *              times counts once and each refit sees about 1 − 1/e ≈ 63 % of the cells.
 * spread_c = sample standard deviation of the M predictions of cell c (divisor M − 1),
 *            for every cell, observed or not.
 * rowSupport_i = observed cells in row i; colSupport_j = observed cells in column j.
 * A row/column with support below the rank (1 for a family without rank) is weakly
 * determined: its k factor coordinates are fitted from fewer than k values.
 * Intervals (folds only, when the full fit is passed in): the same fold fits give each
 * observed cell a held-out estimate; cellIntervals.ts turns those into a calibrated
 * difficulty scale σ̂ per blank cell (the math is in intervals.ts). No extra fits.
 */
import type { RatingMatrix } from '../matrix/ratingMatrix';
import { denseValues, isSparseMatrix, sparseSubset, toSparseMatrix, type SparseMatrix } from '../matrix/sparseRatings';
import type { FitResult, FitSettings } from './types';
import { fitModelSparse } from './fitModel';
import { cellFolds, makeFolds } from './crossValidation';
import { predictRow } from './predictions';
import { createRng } from './random';
import { calibrateIntervals, EnsembleSpread, HeldOutCollector, type IntervalCalibration } from './cellIntervals';
import { LineSpreadSample } from './lineSpread';

export type TrustOptions =
  { method: 'folds'; k: number; seed: number } | { method: 'bootstrap'; B: number; seed: number };

export interface CellTrust {
  spread: Float64Array;
  rowSupport: Int32Array;
  colSupport: Int32Array;
  weakRows: number[];
  weakCols: number[];
  /** Calibration of the per-cell intervals (folds method with the full fit given). */
  intervals?: IntervalCalibration;
}

export interface TrustProgressOptions {
  onProgress?: (p: { done: number; total: number }) => void;
  shouldStop?: () => boolean;
  /** The fit on all observed cells: when given (folds method), intervals are calibrated too. */
  full?: FitResult;
}

/** Observed cells per row and per column, and the rows/columns whose support is below `threshold`. */
export function supportOf(
  values: Float64Array,
  rows: number,
  cols: number,
  threshold: number,
): { rowSupport: Int32Array; colSupport: Int32Array; weakRows: number[]; weakCols: number[]; observed: number } {
  const rowSupport = new Int32Array(rows);
  const colSupport = new Int32Array(cols);
  let observed = 0;
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) {
      const x = values[i * cols + j];
      if (x === x) {
        rowSupport[i]++;
        colSupport[j]++;
        observed++;
      }
    }
  const weakRows: number[] = [];
  const weakCols: number[] = [];
  for (let i = 0; i < rows; i++) if (rowSupport[i] < threshold) weakRows.push(i);
  for (let j = 0; j < cols; j++) if (colSupport[j] < threshold) weakCols.push(j);
  return { rowSupport, colSupport, weakRows, weakCols, observed };
}

/** The support below which a row or column is weakly determined under these settings. */
export function weakThreshold(settings: FitSettings): number {
  return settings.model === 'lowrank' ? settings.rank : 1;
}

export function cellTrust(
  matrix: RatingMatrix | SparseMatrix,
  settings: FitSettings,
  options: TrustOptions,
  progress: TrustProgressOptions = {},
): CellTrust {
  const sm = toSparseMatrix(matrix);
  const data = sm.data;
  const { rows, cols, n } = data;
  const rowSupport = new Int32Array(rows);
  const colSupport = new Int32Array(cols);
  for (let i = 0; i < rows; i++) rowSupport[i] = data.rowPtr[i + 1] - data.rowPtr[i];
  for (let j = 0; j < cols; j++) colSupport[j] = data.colPtr[j + 1] - data.colPtr[j];
  const threshold = weakThreshold(settings);
  const weakRows: number[] = [];
  const weakCols: number[] = [];
  for (let i = 0; i < rows; i++) if (rowSupport[i] < threshold) weakRows.push(i);
  for (let j = 0; j < cols; j++) if (colSupport[j] < threshold) weakCols.push(j);
  const m = options.method === 'folds' ? options.k : options.B;
  if (!Number.isInteger(m) || m < 2) throw new Error(`trust needs an ensemble of at least 2 fits (got ${m})`);
  const ensemble = new EnsembleSpread(rows * cols);
  const folds = options.method === 'folds' ? makeFolds(sm, options.k, options.seed) : undefined;
  const rng = createRng(options.seed);
  const drawn = new Int32Array(n);
  const values = folds && progress.full ? (isSparseMatrix(matrix) ? denseValues(data) : matrix.values) : undefined;
  const heldOut = folds && values ? HeldOutCollector.fromDense(values, cellFolds(sm, folds), folds.k, cols) : undefined;
  const lines = heldOut && settings.model === 'lowrank' ? new LineSpreadSample(data) : undefined;
  // One dense buffer for a member's predictions, filled row by row (the spread is per cell anyway).
  const p = new Float64Array(rows * cols);
  for (let e = 0; e < m; e++) {
    let train: SparseMatrix;
    if (folds) train = { ...sm, data: sparseSubset(data, folds.foldOf, e) };
    else {
      // A matrix holds one value per cell: a cell drawn several times counts once.
      drawn.fill(0);
      for (let t = 0; t < n; t++) drawn[rng.int(n)] = 1;
      train = { ...sm, data: sparseSubset(data, drawn, 0) };
    }
    const fit = fitModelSparse(train, settings, { shouldStop: progress.shouldStop });
    if ('predictions' in fit) p.set(fit.predictions);
    else for (let i = 0; i < rows; i++) predictRow(fit, sm.scale, i, p.subarray(i * cols, (i + 1) * cols));
    heldOut?.add(e, p, 'spread' in fit ? fit.spread : undefined);
    if (!('predictions' in fit)) lines?.add(fit, sm.scale);
    ensemble.add(p);
    progress.onProgress?.({ done: e + 1, total: m });
  }
  const spread = ensemble.spread();
  const intervals =
    heldOut && values && progress.full
      ? calibrateIntervals(heldOut, {
          rows,
          cols,
          values,
          family: settings.model,
          lineSpread: lines?.result(),
          ownSpread: progress.full.spread,
        })
      : undefined;
  return { spread, rowSupport, colSupport, weakRows, weakCols, ...(intervals ? { intervals } : {}) };
}
