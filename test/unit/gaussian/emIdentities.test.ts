import { describe, expect, it } from 'vitest';
import { Matrix, determinant, inverse } from 'ml-matrix';
import { emGaussian } from '../../../src-shared/engine/gaussian';
import { ar1Covariance, drawNormal, hideAtRandom } from './helpers';

describe('EM for the multivariate normal: outside identities', () => {
  it('on complete data one EM step gives the sample mean and the ML covariance (divisor n)', () => {
    // Source: textbook identity — with nothing missing the E-step is the data itself and the
    // M-step is the complete-data MLE: x̄ and (1/n) Σ (x_i − x̄)(x_i − x̄)ᵀ (e.g. Little & Rubin, §11.2).
    const n = 40;
    const p = 4;
    const data = drawNormal(n, [1, -2, 0.5, 3], ar1Covariance([1, 2, 0.5, 1.5], 0.6), 11);
    const fit = emGaussian(data, n, p, { shrinkage: 0, maxIterations: 1, tolerance: 0 });
    expect(fit.iterations).toBe(1);

    // Reference computed independently with ml-matrix: mean via column sums, covariance via XcᵀXc / n.
    const x = new Matrix(n, p);
    for (let i = 0; i < n; i++) for (let j = 0; j < p; j++) x.set(i, j, data[i * p + j]);
    const mean = x.mean('column');
    const xc = x.clone().subRowVector(mean);
    const cov = xc.transpose().mmul(xc).div(n);
    for (let j = 0; j < p; j++) {
      expect(fit.mu[j]).toBeCloseTo(mean[j], 12);
      for (let k = 0; k < p; k++) expect(fit.sigma[j * p + k]).toBeCloseTo(cov.get(j, k), 12);
    }
    // and it is not the unbiased (n − 1) estimate
    expect(Math.abs(fit.sigma[0] - (cov.get(0, 0) * n) / (n - 1))).toBeGreaterThan(1e-6);
  });

  it('recovers a known 6-variable covariance from 2,000 draws with 20 % of cells missing at random', () => {
    // Source: consistency of the ML estimate under MCAR (Little & Rubin, ch. 11); the sampling
    // error of each entry at n = 2,000 is at most √(2/2000) ≈ 0.032 (unit variances), so every
    // entry should land within 0.1 of the truth (about 3 standard errors).
    const p = 6;
    const mu = [3, 2.5, 4, 1, 3.5, 2];
    const sigma = ar1Covariance([1, 0.8, 0.9, 0.9, 1, 0.7], 0.7);
    sigma[0][5] = sigma[5][0] = -0.2; // one non-AR entry, still positive definite
    const n = 2000;
    const full = drawNormal(n, mu, sigma, 2024);
    const data = hideAtRandom(full, 0.2, 99);
    const fit = emGaussian(data, n, p, { shrinkage: 0, maxIterations: 500, tolerance: 1e-10 });
    expect(fit.converged).toBe(true);
    let worst = 0;
    for (let j = 0; j < p; j++) {
      expect(Math.abs(fit.mu[j] - mu[j])).toBeLessThan(0.1);
      for (let k = 0; k < p; k++) worst = Math.max(worst, Math.abs(fit.sigma[j * p + k] - sigma[j][k]));
    }
    expect(worst).toBeLessThan(0.1);
  });

  it('the last log-likelihood of the trace equals log N(x_o; μ_o, Σ_oo) summed over rows, computed with ml-matrix', () => {
    // Source: the multivariate normal density, log N(x; μ, Σ) = −½[k log 2π + log|Σ| + (x−μ)ᵀΣ⁻¹(x−μ)].
    const n = 60;
    const p = 5;
    const data = hideAtRandom(drawNormal(n, [0, 1, 2, 3, 4], ar1Covariance([1, 1, 2, 1, 0.5], 0.5), 5), 0.25, 6);
    const fit = emGaussian(data, n, p, { shrinkage: 0, maxIterations: 7, tolerance: 0 });
    let ll = 0;
    for (let i = 0; i < n; i++) {
      const obs: number[] = [];
      for (let j = 0; j < p; j++) if (!Number.isNaN(data[i * p + j])) obs.push(j);
      if (obs.length === 0) continue;
      const s = new Matrix(obs.map((a) => obs.map((b) => fit.sigma[a * p + b])));
      const d = Matrix.columnVector(obs.map((a) => data[i * p + a] - fit.mu[a]));
      const q = d.transpose().mmul(inverse(s)).mmul(d).get(0, 0);
      ll += -0.5 * (obs.length * Math.log(2 * Math.PI) + Math.log(determinant(s)) + q);
    }
    expect(fit.logLikelihoodTrace.length).toBe(7);
    expect(fit.logLikelihoodTrace[6]).toBeCloseTo(ll, 8);
  });
});
