/**
 * The conditional-Gaussian model family as a FitResult.
 *
 * Variables are the matrix columns (or its rows when `transpose` is set); each
 * row (column) is one draw from N(μ, Σ), fitted by EM (emGaussian.ts).
 *
 * Output layer, per cell (i, j) with variable v(i, j):
 *   predictions  observed cell → the observed value itself (the model conditions on
 *                it, so its conditional expectation is that value);
 *                missing cell  → E[x_missing | x_observed], then clipped to the scale /
 *                snapped to its step when the settings ask for it
 *   spread       √Var[x_missing | x_observed] for missing cells, 0 for observed cells
 *   baseline     μ_v(i,j)  (centering is part of this model; no centering option)
 *   rowBaseline / colBaseline  μ on the variable axis, zeros on the other
 *   globalMean   mean of all observed values
 *   objectiveTrace  observed-data log-likelihood after each EM iteration
 *   covariance   Σ of the last E-step (the one that made the conditional means)
 *   rank 0, empty factors.
 * Errors: FitFailedError when the model refuses the matrix (limits.ts) or a setting is
 * out of range; FitCancelledError when shouldStop returns true (checked every iteration).
 */

import type { RatingMatrix } from '../../matrix/ratingMatrix';
import type { FitProgress, FitResult, GaussianSettings } from '../types';
import { FitCancelledError, FitFailedError } from '../errors';
import { findNonFinite } from '../observed';
import { clipSnap } from '../predictions';
import { emGaussian } from './emGaussian';
import {
  GAUSSIAN_MAX_VARIABLES,
  assertGaussianLimits,
  emWorkPerIteration,
  emWorkloadRefusal,
  gaussianRefusalReason,
} from './limits';
import { groupByPattern } from './patterns';

export interface GaussianFitOptions {
  onProgress?: (p: FitProgress) => void;
  shouldStop?: () => boolean;
}

/** The n × p data block the model sees (variables as columns); copies only when transposing. */
function gaussianDataBlock(
  matrix: RatingMatrix,
  transpose: boolean,
): { data: Float64Array; n: number; p: number; labels: string[] } {
  const rows = matrix.rowLabels.length;
  const cols = matrix.colLabels.length;
  if (!transpose) return { data: matrix.values, n: rows, p: cols, labels: matrix.colLabels };
  const data = new Float64Array(rows * cols);
  const v = matrix.values;
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) data[j * rows + i] = v[i * cols + j];
  return { data, n: cols, p: rows, labels: matrix.rowLabels };
}

/**
 * Why the Gaussian model would refuse this matrix (too many variables, too few observed
 * values for a variable, or iterations too slow), or undefined when it can run.
 */
export function gaussianRefusal(matrix: RatingMatrix, transpose = false): string | undefined {
  const rows = matrix.rowLabels.length;
  const cols = matrix.colLabels.length;
  const p = transpose ? rows : cols;
  if (p > GAUSSIAN_MAX_VARIABLES) {
    // decide on the shape alone, without building the block
    return gaussianRefusalReason(new Float64Array(0), transpose ? cols : rows, p, [], transpose ? 'row' : 'column');
  }
  const block = gaussianDataBlock(matrix, transpose);
  const reason = gaussianRefusalReason(block.data, block.n, block.p, block.labels, transpose ? 'row' : 'column');
  if (reason !== undefined) return reason;
  return emWorkloadRefusal(emWorkPerIteration(groupByPattern(block.data, block.n, block.p), block.p));
}

export function fitGaussian(
  matrix: RatingMatrix,
  settings: GaussianSettings,
  opts: GaussianFitOptions = {},
): FitResult {
  const t0 = Date.now();
  const rows = matrix.rowLabels.length;
  const cols = matrix.colLabels.length;
  const bad = findNonFinite(matrix.values, cols);
  if (bad !== undefined) {
    throw new FitFailedError(
      `The value in row "${matrix.rowLabels[bad.row]}", column "${matrix.colLabels[bad.col]}" is not a finite number.`,
    );
  }
  const transpose = settings.transpose;
  if ((transpose ? rows : cols) > GAUSSIAN_MAX_VARIABLES) {
    // refuse on the shape alone, before copying anything
    assertGaussianLimits(
      new Float64Array(0),
      transpose ? cols : rows,
      transpose ? rows : cols,
      [],
      transpose ? 'row' : 'column',
    );
  }
  const { data, n, p, labels } = gaussianDataBlock(matrix, transpose);
  assertGaussianLimits(data, n, p, labels, transpose ? 'row' : 'column');

  if (!(settings.shrinkage >= 0 && settings.shrinkage < 1)) {
    throw new FitFailedError(`The shrinkage must be at least 0 and below 1 (got ${settings.shrinkage}).`);
  }
  const em = emGaussian(data, n, p, {
    shrinkage: settings.shrinkage,
    maxIterations: settings.maxIterations,
    tolerance: settings.tolerance,
    shouldStop: opts.shouldStop,
    onIteration: opts.onProgress
      ? (iteration, objective) => opts.onProgress!({ iteration, objective, elapsedMs: Date.now() - t0 })
      : undefined,
  });

  if (em.stopped) throw new FitCancelledError();

  const total = rows * cols;
  const predictions = new Float64Array(total);
  const spread = new Float64Array(total);
  const baseline = new Float64Array(total);
  const scale = matrix.scale;
  const observedValues = matrix.values;
  let sum = 0;
  let count = 0;
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      const cell = i * cols + j;
      // position in the n × p block
      const b = transpose ? j * rows + i : cell;
      const x = observedValues[cell];
      baseline[cell] = em.mu[transpose ? i : j];
      if (x === x) {
        predictions[cell] = x;
        spread[cell] = 0;
        sum += x;
        count++;
      } else {
        predictions[cell] = clipSnap(em.filled[b], scale, settings.clipToScale, settings.snapToStep);
        spread[cell] = Math.sqrt(Math.max(0, em.conditionalVariance[b]));
      }
    }
  }
  const mu = new Float64Array(em.mu);
  return {
    settings: { ...settings },
    rows,
    cols,
    predictions,
    baseline,
    rowBaseline: transpose ? mu : new Float64Array(rows),
    colBaseline: transpose ? new Float64Array(cols) : mu,
    globalMean: count > 0 ? sum / count : 0,
    rowFactors: new Float64Array(0),
    colFactors: new Float64Array(0),
    rank: 0,
    objectiveTrace: em.logLikelihoodTrace.slice(),
    iterations: em.iterations,
    converged: em.converged,
    elapsedMs: Date.now() - t0,
    spread,
    covariance: new Float64Array(em.sigma),
  };
}
