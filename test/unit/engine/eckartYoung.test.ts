import { describe, expect, it } from 'vitest';
import { Matrix, SVD } from 'ml-matrix';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { lowRankCase } from './helpers';

describe('rank-k fit of a fully observed matrix', () => {
  // Source: Eckart–Young–Mirsky theorem — the best rank-k approximation in Frobenius norm is
  // the truncated SVD; with λ = 0 and no centering the ALS objective is exactly that problem.
  // Reference SVD: ml-matrix.
  for (const [rows, cols, k, seed] of [
    [30, 20, 3, 1],
    [25, 40, 2, 2],
  ] as const) {
    it(`${rows}×${cols}, rank ${k}: reconstruction equals the truncated SVD to 1e-6`, () => {
      const { matrix, noisy } = lowRankCase(rows, cols, k, 0.5, 1.1, seed); // observed fraction > 1 → all cells
      const fit = fitModel(matrix, {
        ...defaultLowRankSettings(),
        rank: k,
        lambda: 0,
        centering: 'none',
        clipToScale: false,
        maxIterations: 2000,
        tolerance: 1e-15,
      });
      const a = new Matrix(rows, cols);
      for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) a.set(i, j, noisy[i * cols + j]);
      const svd = new SVD(a, { autoTranspose: true });
      const u = svd.leftSingularVectors;
      const v = svd.rightSingularVectors;
      const s = svd.diagonal;
      let num = 0;
      let den = 0;
      for (let i = 0; i < rows; i++)
        for (let j = 0; j < cols; j++) {
          let ref = 0;
          for (let c = 0; c < k; c++) ref += u.get(i, c) * s[c] * v.get(j, c);
          num += (fit.predictions[i * cols + j] - ref) ** 2;
          den += ref * ref;
        }
      expect(Math.sqrt(num / den)).toBeLessThan(1e-6);
    });
  }
});
