/** The conditional-Gaussian model family (EM for the multivariate normal with missing values). */

export { fitGaussian, gaussianRefusal } from './fitGaussian';
export { defaultGaussianSettings } from './settings';
export { emGaussian } from './emGaussian';
