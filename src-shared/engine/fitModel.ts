/**
 * The single entry point for fitting any model family. Cross-validation, tuning,
 * trust, the worker and the command line all fit through here.
 *
 * fitModel fits a dense matrix and returns the per-cell layers the window draws;
 * fitModelSparse fits the sparse storage of the observed cells and returns a model
 * (SparseFit) whose predictions are made only where needed (predictAt). The Gaussian
 * family works on a dense n × p block by nature, so it is densified there.
 */
import type { RatingMatrix, RatingScale } from '../matrix/ratingMatrix';
import { toDenseMatrix, type SparseMatrix } from '../matrix/sparseRatings';
import type { FitProgress, FitResult, FitSettings, SparseFit } from './types';
import { fitLowRank, fitLowRankSparse } from './lowRank';
import { fitGaussian } from './gaussian/fitGaussian';
import { predictCells } from './predictions';
import type { Baseline } from './baseline';

export interface FitModelOptions {
  onProgress?: (p: FitProgress) => void;
  /** Polled inside the iteration loop; returning true aborts with FitCancelledError. */
  shouldStop?: () => boolean;
  warmStart?: { rowFactors: Float64Array; colFactors: Float64Array };
  /** Low-rank only: a baseline already fitted on this data with these settings' centering. */
  baseline?: Baseline;
  /** Low-rank only: a warm start for the two-way baseline's sweeps. */
  baselineStart?: Baseline;
}

export function fitModel(matrix: RatingMatrix, settings: FitSettings, opts: FitModelOptions = {}): FitResult {
  switch (settings.model) {
    case 'lowrank':
      return fitLowRank(matrix, settings, opts);
    case 'gaussian':
      return fitGaussian(matrix, settings, opts);
    default: {
      const never: never = settings;
      throw new Error(`unknown model family: ${(never as { model: string }).model}`);
    }
  }
}

/** A model fitted on sparse storage: low-rank without dense layers, Gaussian with them. */
export type SparseModel = SparseFit | FitResult;

export function fitModelSparse(matrix: SparseMatrix, settings: FitSettings, opts: FitModelOptions = {}): SparseModel {
  switch (settings.model) {
    case 'lowrank':
      return fitLowRankSparse(matrix.data, settings, opts);
    case 'gaussian':
      return fitGaussian(toDenseMatrix(matrix), settings, opts);
    default: {
      const never: never = settings;
      throw new Error(`unknown model family: ${(never as { model: string }).model}`);
    }
  }
}

/** The model's predictions at the cells (rowIdx[t], colIdx[t]) into out[t]. */
export function predictAt(
  model: SparseModel,
  scale: RatingScale,
  rowIdx: Int32Array,
  colIdx: Int32Array,
  out: Float64Array,
  count = rowIdx.length,
): Float64Array {
  if ('predictions' in model) {
    const p = model.predictions;
    const cols = model.cols;
    for (let t = 0; t < count; t++) out[t] = p[rowIdx[t] * cols + colIdx[t]];
    return out;
  }
  return predictCells(model, scale, rowIdx, colIdx, out, count);
}
