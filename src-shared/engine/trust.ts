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
 * Intervals (folds only, when the full fit is passed in): the same fold fits give each
 * observed cell a held-out estimate; cellIntervals.ts turns those into a calibrated
 * difficulty scale σ̂ per blank cell (the math is in intervals.ts). No extra fits.
 */
import type { RatingMatrix } from '../matrix/ratingMatrix';
import type { FitResult, FitSettings } from './types';
import { fitModel } from './fitModel';
import { makeFolds, trainingMatrix } from './crossValidation';
import { createRng } from './random';
import { calibrateIntervals, EnsembleSpread, HeldOutCollector, type IntervalCalibration } from './cellIntervals';

export type TrustOptions =
  | { method: 'folds'; k: number; seed: number }
  | { method: 'bootstrap'; B: number; seed: number };

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

function bootstrapMatrix(matrix: RatingMatrix, cells: Int32Array, rng: ReturnType<typeof createRng>): RatingMatrix {
  const values = new Float64Array(matrix.values.length).fill(NaN);
  const n = cells.length;
  for (let t = 0; t < n; t++) {
    const c = cells[rng.int(n)];
    values[c] = matrix.values[c];
  }
  return { rowLabels: matrix.rowLabels, colLabels: matrix.colLabels, values, scale: matrix.scale };
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
  matrix: RatingMatrix,
  settings: FitSettings,
  options: TrustOptions,
  progress: TrustProgressOptions = {},
): CellTrust {
  const rows = matrix.rowLabels.length;
  const cols = matrix.colLabels.length;
  const values = matrix.values;
  const { rowSupport, colSupport, weakRows, weakCols, observed: n } = supportOf(values, rows, cols, weakThreshold(settings));
  const m = options.method === 'folds' ? options.k : options.B;
  if (!Number.isInteger(m) || m < 2) throw new Error(`trust needs an ensemble of at least 2 fits (got ${m})`);
  const ensemble = new EnsembleSpread(rows * cols);
  const foldsOrCells =
    options.method === 'folds' ? makeFolds(matrix, options.k, options.seed) : undefined;
  const cells = new Int32Array(n);
  if (options.method === 'bootstrap') {
    let t = 0;
    for (let c = 0; c < values.length; c++) if (values[c] === values[c]) cells[t++] = c;
  }
  const rng = createRng(options.seed);
  const heldOut = foldsOrCells && progress.full ? new HeldOutCollector(values, foldsOrCells.foldOf, foldsOrCells.k) : undefined;
  for (let e = 0; e < m; e++) {
    const train = foldsOrCells ? trainingMatrix(matrix, foldsOrCells, e) : bootstrapMatrix(matrix, cells, rng);
    const fit = fitModel(train, settings, { shouldStop: progress.shouldStop });
    const p = fit.predictions;
    heldOut?.add(e, p, fit.spread);
    ensemble.add(p);
    progress.onProgress?.({ done: e + 1, total: m });
  }
  const spread = ensemble.spread();
  const intervals =
    heldOut && progress.full
      ? calibrateIntervals(heldOut, { rows, cols, values, family: settings.model, ensembleSpread: spread, ownSpread: progress.full.spread })
      : undefined;
  return { spread, rowSupport, colSupport, weakRows, weakCols, ...(intervals ? { intervals } : {}) };
}
