/**
 * Cross-validation folds used wherever the user does not choose them: the
 * per-cell spread of a Fill, Evaluate, Compare centering, the tuning form's
 * first value, the study report and the command line's --folds.
 */
export const DEFAULT_FOLDS = 5;

/** Default settings of the low-rank family. */
import type { LowRankSettings } from './types';

export function defaultLowRankSettings(): LowRankSettings {
  return {
    model: 'lowrank',
    // Rank 2: a small number of latent factors; tune to choose it from the data.
    rank: 2,
    // Ridge weight λ on ‖U‖² + ‖V‖² (in squared rating units); 1 keeps sparse rows stable
    // without shrinking well-observed ones much.
    lambda: 1,
    // Two-way centering (global mean + shrunk row and column offsets): the usual baseline
    // for rating data, since rows and columns both carry systematic offsets.
    centering: 'both',
    // λ is the same for every row/column (not multiplied by its observed count).
    scaleLambdaByCount: false,
    // At most 100 alternating sweeps; the relative-change test usually stops far earlier.
    maxIterations: 100,
    // Stop when the objective changes by less than 1e-6 of itself between sweeps.
    tolerance: 1e-6,
    // Seed of every random choice (power-iteration start, random init); same seed, same result.
    seed: 1,
    // Spectral start (top-k singular subspace of the rescaled residuals), see spectral.ts.
    init: 'spectral',
    // Ridge weight γ of the row/column offsets under `both` centering: an offset estimated
    // from n values is shrunk by the factor n / (n + 5) toward 0.
    offsetLambda: 5,
    // Predictions are clipped to the rating scale [min, max] ...
    clipToScale: true,
    // ... but not rounded to the scale's step (rounding loses information; opt in for display).
    snapToStep: false,
  };
}
