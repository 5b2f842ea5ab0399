import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { explainCell } from '../../../src-shared/engine/contributions';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { lowRankCase } from './helpers';

describe('contributions of observed cells to a filled value', () => {
  const { matrix } = lowRankCase(30, 20, 2, 0.3, 0.5, 11);
  const settings = {
    ...defaultLowRankSettings(),
    rank: 2,
    lambda: 2,
    centering: 'row' as const,
    tolerance: 1e-12,
    maxIterations: 500,
    clipToScale: false,
  };
  const result = fitModel(matrix, settings);
  const cols = 20;

  it('equal the ridge re-solve of the row given V, computed independently with ml-matrix', () => {
    // Source: ridge regression normal equations (Hoerl & Kennard, 1970): u = (XᵀX + λI)⁻¹ Xᵀr;
    // the interaction v_j·u is then linear in r, and its terms are the contributions.
    const i = 4;
    const j = [...Array(cols).keys()].find((c) => Number.isNaN(matrix.values[i * cols + c]))!;
    const ex = explainCell(matrix.values, result, i, j)!;
    const obs = [...Array(cols).keys()].filter((c) => !Number.isNaN(matrix.values[i * cols + c]));
    const V = result.colFactors;
    const X = new Matrix(obs.map((c) => [V[c * 2], V[c * 2 + 1]]));
    const r = Matrix.columnVector(obs.map((c) => matrix.values[i * cols + c] - result.baseline[i * cols + c]));
    const u = solve(X.transpose().mmul(X).add(Matrix.eye(2).mul(settings.lambda)), X.transpose().mmul(r)).to1DArray();
    const want = u[0] * V[j * 2] + u[1] * V[j * 2 + 1];
    expect(ex.interaction).toBeCloseTo(want, 10);
    expect(ex.contributions.length).toBe(obs.length);
    // Sorted by size of contribution.
    for (let t = 1; t < ex.contributions.length; t++) {
      expect(Math.abs(ex.contributions[t - 1].contribution)).toBeGreaterThanOrEqual(
        Math.abs(ex.contributions[t].contribution),
      );
    }
  });

  it('add up, at convergence, to the fitted interaction term: prediction = baseline + Σ contributions', () => {
    // Follows from ALS stationarity: at a fixed point u_i is the ridge solution given V (common practice, no source).
    for (const [i, j] of [
      [0, 1],
      [7, 3],
      [21, 19],
    ]) {
      const ex = explainCell(matrix.values, result, i, j)!;
      expect(ex.baseline + ex.interaction).toBeCloseTo(result.predictions[i * cols + j], 5);
    }
  });

  it('is undefined for a baseline-only fit', () => {
    const r0 = fitModel(matrix, { ...settings, rank: 0 });
    expect(explainCell(matrix.values, r0, 0, 0)).toBeUndefined();
  });
});
