/** Test data for the Gaussian model: seeded multivariate normal draws and MCAR masks. */

import { Matrix, CholeskyDecomposition } from 'ml-matrix';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';
import { createRng } from '../../../src-shared/engine/random';

/** n draws from N(mu, sigma), row-major n × p (x = μ + L z with Σ = L Lᵀ). */
export function drawNormal(n: number, mu: number[], sigma: number[][], seed: number): Float64Array {
  const p = mu.length;
  const l = new CholeskyDecomposition(new Matrix(sigma)).lowerTriangularMatrix;
  const rng = createRng(seed);
  const out = new Float64Array(n * p);
  const z = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < p; j++) z[j] = rng.normal();
    for (let j = 0; j < p; j++) {
      let s = mu[j];
      for (let k = 0; k <= j; k++) s += l.get(j, k) * z[k];
      out[i * p + j] = s;
    }
  }
  return out;
}

/** Hide each cell with probability `rate` (missing completely at random); returns a copy. */
export function hideAtRandom(values: Float64Array, rate: number, seed: number): Float64Array {
  const rng = createRng(seed);
  const out = new Float64Array(values);
  for (let c = 0; c < out.length; c++) if (rng.next() < rate) out[c] = NaN;
  return out;
}

export function toMatrix(
  values: Float64Array,
  rows: number,
  cols: number,
  min = -1e6,
  max = 1e6,
  step = 0,
): RatingMatrix {
  return {
    rowLabels: Array.from({ length: rows }, (_, i) => `r${i + 1}`),
    colLabels: Array.from({ length: cols }, (_, j) => `c${j + 1}`),
    values,
    scale: { min, max, step },
  };
}

/** Σ_jk = sd_j sd_k ρ^|j−k| (an AR(1)-style correlation, positive definite for |ρ| < 1). */
export function ar1Covariance(sd: number[], rho: number): number[][] {
  return sd.map((a, j) => sd.map((b, k) => a * b * rho ** Math.abs(j - k)));
}
