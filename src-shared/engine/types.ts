/**
 * Engine contracts shared by every model family, the worker, the CLI and the API.
 * Plain data only (typed arrays and numbers), so results can cross a worker
 * boundary by structured clone.
 */

export type Centering = 'none' | 'row' | 'column' | 'both';
export type ModelFamily = 'lowrank' | 'gaussian';

export interface LowRankSettings {
  model: 'lowrank';
  rank: number;
  lambda: number;
  centering: Centering;
  /** Scale λ by each row's / column's observed count. */
  scaleLambdaByCount: boolean;
  maxIterations: number;
  tolerance: number;
  seed: number;
  init: 'spectral' | 'random';
  /** Regularization of the row/column offsets under `both` centering. */
  offsetLambda: number;
  clipToScale: boolean;
  snapToStep: boolean;
}

export interface GaussianSettings {
  model: 'gaussian';
  /** Shrink Σ toward its diagonal by this factor, in [0, 1). */
  shrinkage: number;
  /** When true the variables are the rows instead of the columns. */
  transpose: boolean;
  maxIterations: number;
  tolerance: number;
  seed: number;
  clipToScale: boolean;
  snapToStep: boolean;
}

export type FitSettings = LowRankSettings | GaussianSettings;

/** Progress posted while fitting. */
export interface FitProgress {
  iteration: number;
  objective: number;
  elapsedMs: number;
}

/**
 * A fitted model without per-cell layers (what jobs on sparse storage produce): the
 * prediction of any cell follows from the baselines and factors (predictions.ts).
 */
export interface SparseFit {
  settings: FitSettings;
  rows: number;
  cols: number;
  /** Per-row baseline (row mean or global + row offset); length rows. */
  rowBaseline: Float64Array;
  /** Per-column baseline (column mean or column offset); length cols; zeros when unused. */
  colBaseline: Float64Array;
  globalMean: number;
  /** Low-rank factors (rows × k and cols × k, row-major); empty for the gaussian family. */
  rowFactors: Float64Array;
  colFactors: Float64Array;
  rank: number;
  /** Objective (low-rank) or observed-data log-likelihood (gaussian) per iteration. */
  objectiveTrace: number[];
  iterations: number;
  converged: boolean;
  elapsedMs: number;
}

/** The model's output: a separate layer, never mixed into the observed values. */
export interface FitResult extends SparseFit {
  /** Row-major predictions for every cell (clipped/snapped per settings). */
  predictions: Float64Array;
  /** Row-major baseline b_ij for every cell (0 under centering none). */
  baseline: Float64Array;
  /** Row-major per-cell spread (std. dev.) when computed; NaN where unknown. */
  spread?: Float64Array;
  /** Gaussian family: the fitted covariance Σ of the variables (p × p, row-major), as used for the conditional means. */
  covariance?: Float64Array;
}
