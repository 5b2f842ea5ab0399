import { describe, expect, it } from 'vitest';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { lowRankCase } from './helpers';

describe('low-rank recovery', () => {
  // Source: Jain, Netrapalli & Sanghavi (2013), "Low-rank matrix completion using alternating
  // minimization": from a spectral start, ALS recovers an incoherent rank-r matrix from
  // O(r·(m+n)·log) samples. Sizes: 120 × 80, rank 3, σ = 0.1, half the cells hidden.
  // Reasoning: the model has r(m+n−r) = 3·197 = 591 degrees of freedom against ~4,800
  // observed cells (8× more), so the estimation error on a hidden cell is about
  // σ·√(591/4800) ≈ 0.35σ; measured against the noisy hidden values (which carry their own
  // noise σ) the expected RMSE is σ·√(1 + 0.12) ≈ 1.06σ, well below the 1.5σ bound.
  const sigma = 0.1;
  for (const seed of [11, 12, 13]) {
    it(`recovers hidden cells to RMSE < 1.5σ (seed ${seed})`, () => {
      const { matrix, noisy, mask } = lowRankCase(120, 80, 3, sigma, 0.5, seed);
      const fit = fitModel(matrix, {
        ...defaultLowRankSettings(),
        rank: 3,
        lambda: 0.1,
        centering: 'none',
        clipToScale: false,
        seed,
        maxIterations: 300,
      });
      let se = 0;
      let n = 0;
      for (let c = 0; c < mask.length; c++)
        if (!mask[c]) {
          se += (fit.predictions[c] - noisy[c]) ** 2;
          n++;
        }
      const rmse = Math.sqrt(se / n);
      expect(rmse).toBeLessThan(1.5 * sigma);
      // And the fit is not trivially the baseline: the signal has variance r = 3.
      expect(rmse).toBeGreaterThan(0.5 * sigma);
    });
  }

  it('objective never increases along the trace', () => {
    // Source: block coordinate descent — each exact ridge half-step minimizes the objective in its block.
    const { matrix } = lowRankCase(60, 50, 4, 0.3, 0.4, 5);
    const fit = fitModel(matrix, {
      ...defaultLowRankSettings(),
      rank: 4,
      lambda: 0.5,
      centering: 'both',
      tolerance: 0,
      maxIterations: 40,
    });
    for (let t = 1; t < fit.objectiveTrace.length; t++) {
      expect(fit.objectiveTrace[t]).toBeLessThanOrEqual(fit.objectiveTrace[t - 1] * (1 + 1e-12));
    }
    expect(fit.iterations).toBe(40);
  });
});
