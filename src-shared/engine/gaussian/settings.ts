/** Default settings of the conditional-Gaussian model. */

import type { GaussianSettings } from '../types';

export function defaultGaussianSettings(): GaussianSettings {
  return {
    model: 'gaussian',
    // a little shrinkage keeps small panels well-conditioned; tuning tries 0–0.2
    shrinkage: 0.05,
    transpose: false,
    maxIterations: 200,
    tolerance: 1e-6,
    // EM here is deterministic; the seed is kept for a uniform settings shape
    seed: 1,
    clipToScale: true,
    snapToStep: false,
  };
}
