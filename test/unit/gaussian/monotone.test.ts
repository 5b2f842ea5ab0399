import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { emGaussian } from '../../../src-shared/engine/gaussian';
import { ar1Covariance, drawNormal, hideAtRandom } from './helpers';

describe('EM monotonicity', () => {
  it('the observed-data log-likelihood never decreases from one iteration to the next', () => {
    // Source: EM monotonicity property, Dempster, Laird & Rubin (1977), Theorem 1:
    // ℓ(θ_{t+1}) ≥ ℓ(θ_t) for every EM iteration (shrinkage 0 = plain maximum likelihood).
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 6 }), // variables
        fc.integer({ min: 12, max: 60 }), // rows
        fc.double({ min: -0.6, max: 0.9, noNaN: true }), // correlation
        fc.double({ min: 0.05, max: 0.45, noNaN: true }), // missing rate
        fc.integer({ min: 1, max: 1_000_000 }), // seed
        (p, n, rho, rate, seed) => {
          const sd = Array.from({ length: p }, (_, j) => 0.5 + ((j * 37 + seed) % 7) / 4);
          const mu = Array.from({ length: p }, (_, j) => j - 1);
          const data = hideAtRandom(drawNormal(n, mu, ar1Covariance(sd, rho), seed), rate, seed + 1);
          // every variable keeps ≥ 3 observed values, like the model's own limit
          for (let j = 0; j < p; j++)
            for (let i = 0; i < 3; i++) if (Number.isNaN(data[i * p + j])) data[i * p + j] = mu[j];
          const fit = emGaussian(data, n, p, { shrinkage: 0, maxIterations: 25, tolerance: 0 });
          const lls = [fit.initialLogLikelihood, ...fit.logLikelihoodTrace];
          for (let t = 1; t < lls.length; t++) {
            // tiny slack for floating-point rounding once EM has converged
            expect(lls[t]).toBeGreaterThanOrEqual(lls[t - 1] - 1e-9 * Math.max(1, Math.abs(lls[t - 1])));
          }
          expect(fit.logLikelihoodTrace.length).toBeGreaterThan(0);
        },
      ),
      { numRuns: 60, seed: 424242 },
    );
  });

  it('the likelihood genuinely rises on incomplete correlated data (the check above can fail)', () => {
    // Source: same theorem; a strictly better fit than the diagonal start is expected when
    // variables are correlated (the diagonal start ignores the correlation).
    const data = hideAtRandom(drawNormal(200, [0, 0, 0], ar1Covariance([1, 1, 1], 0.8), 3), 0.2, 4);
    const fit = emGaussian(data, 200, 3, { shrinkage: 0, maxIterations: 30, tolerance: 0 });
    expect(fit.logLikelihoodTrace[fit.logLikelihoodTrace.length - 1]).toBeGreaterThan(fit.initialLogLikelihood + 10);
  });
});
