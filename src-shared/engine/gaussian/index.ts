/** The conditional-Gaussian model family (EM for the multivariate normal with missing values). */

export { fitGaussian, gaussianRefusal, gaussianDataBlock, type GaussianFitOptions } from './fitGaussian';
export { defaultGaussianSettings } from './settings';
export { emGaussian, availableCaseStart, type EmGaussianOptions, type EmGaussianResult } from './emGaussian';
export {
  GAUSSIAN_MAX_VARIABLES,
  GAUSSIAN_MIN_OBSERVED_PER_VARIABLE,
  GAUSSIAN_MAX_WORK_PER_ITERATION,
  gaussianRefusalReason,
  emWorkPerIteration,
} from './limits';
