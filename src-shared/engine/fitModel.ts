/**
 * The single entry point for fitting any model family. Cross-validation, tuning,
 * trust, the worker and the command line all fit through here.
 */
import type { RatingMatrix } from '../matrix/ratingMatrix';
import type { FitProgress, FitResult, FitSettings } from './types';
import { fitLowRank } from './lowRank';
import { fitGaussian } from './gaussian/fitGaussian';

export interface FitModelOptions {
  onProgress?: (p: FitProgress) => void;
  /** Polled inside the iteration loop; returning true aborts with FitCancelledError. */
  shouldStop?: () => boolean;
  warmStart?: { rowFactors: Float64Array; colFactors: Float64Array };
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

export { FitCancelledError, FitFailedError } from './errors';
