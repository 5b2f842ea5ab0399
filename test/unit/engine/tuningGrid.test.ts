import { describe, expect, it } from 'vitest';
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import {
  centreLambda,
  defaultLambdas,
  defaultRanks,
  maxSupportedRank,
  refineLambdas,
  simplerLowRank,
  summarizeForGrid,
} from '../../../src-shared/engine/tuningGrid';
import { chooseFromTable, type TuneRow } from '../../../src-shared/engine/tuning';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { createRng } from '../../../src-shared/engine/random';
import { matrixOf } from './helpers';
import { fitModel } from '../../../src-shared/engine/fitModel';

describe('data-derived λ centre', () => {
  it('matches the largest singular value of zero-filled noise (Marchenko–Pastur edge)', () => {
    // Source: for an m × n matrix of iid entries with variance v, the largest singular value
    // tends to √v (√m + √n) (Marchenko–Pastur law, edge of the spectrum; Geman 1980). Zero-filled
    // noise observed on a fraction p has v = σ² p, so σ₁ ≈ σ (√(N/m) + √(N/n)) = λ₀.
    // Measured here with ml-matrix's SVD (an outside reference implementation).
    const rows = 240;
    const cols = 120;
    const sigma = 0.7;
    const rng = createRng(8);
    const values = new Float64Array(rows * cols).fill(NaN);
    const dense = new Matrix(rows, cols);
    for (let i = 0; i < rows; i++)
      for (let j = 0; j < cols; j++)
        if (rng.next() < 0.3) {
          const y = sigma * rng.normal();
          values[i * cols + j] = y;
          dense.set(i, j, y);
        }
    const s = summarizeForGrid(matrixOf(rows, cols, values));
    const sigma1 = new SingularValueDecomposition(dense, {
      computeLeftSingularVectors: false,
      computeRightSingularVectors: false,
    }).diagonal[0];
    // The two-way baseline takes a little out of the noise; finite-size fluctuation is a few %.
    expect(centreLambda(s) / sigma1).toBeGreaterThan(0.9);
    expect(centreLambda(s) / sigma1).toBeLessThan(1.1);
    expect(s.residualRms).toBeGreaterThan(0.6 * sigma);
    expect(s.residualRms).toBeLessThan(1.05 * sigma);
  });

  it('spaces the coarse λ values at most ×2 apart (σ₁ unknown: λ₀/4 … 4λ₀)', () => {
    // Hand figures (from the header's formula): σ 1, N 400, m 100, n 16 → λ₀ = √4 + √25 = 7.
    const s = { rows: 100, cols: 16, observed: 400, residualRms: 1 };
    expect(centreLambda(s)).toBeCloseTo(7, 12);
    // Without σ₁ the grid tops out at 4λ₀ = 28 and steps down ×2.
    const l = defaultLambdas(s);
    expect(l).toEqual([1.8, 3.5, 7, 14, 28]);
    for (let t = 1; t < l.length; t++) expect(l[t] / l[t - 1]).toBeLessThanOrEqual(2.06); // two-digit rounding
    expect(defaultLambdas({ rows: 3, cols: 3, observed: 0, residualRms: 0 })).toEqual([1]);
  });
});

describe('top of the λ grid', () => {
  it('is below σ₁: at λ ≥ σ₁ of the zero-filled residuals the fitted traits vanish', () => {
    // Source: Mazumder, Hastie & Tibshirani (2010), "Spectral regularization algorithms for
    // learning large incomplete matrices": the nuclear-norm solution is 0 for λ ≥ σ₁(P_Ω(R)),
    // and ½(‖U‖² + ‖V‖²) ≥ ‖UVᵀ‖_* makes the factored problem's minimum 0 there too.
    const rows = 50;
    const cols = 30;
    const rng = createRng(5);
    const values = new Float64Array(rows * cols).fill(NaN);
    const u = Array.from({ length: rows }, () => rng.normal());
    const v = Array.from({ length: cols }, () => rng.normal());
    for (let i = 0; i < rows; i++)
      for (let j = 0; j < cols; j++) if (rng.next() < 0.5) values[i * cols + j] = u[i] * v[j] + 0.3 * rng.normal();
    const m = matrixOf(rows, cols, values);
    const s = summarizeForGrid(m);
    const sigma1 = s.topSingular!;
    const settings = {
      ...defaultLowRankSettings(),
      rank: 2,
      centering: 'both' as const,
      clipToScale: false,
      maxIterations: 400,
      tolerance: 0,
    };
    const above = fitModel(m, { ...settings, lambda: 1.1 * sigma1 });
    expect(Math.max(...above.rowFactors.map(Math.abs))).toBeLessThan(1e-3);
    const below = fitModel(m, { ...settings, lambda: 0.9 * sigma1 });
    expect(Math.max(...below.rowFactors.map(Math.abs))).toBeGreaterThan(0.01);
    expect(defaultLambdas(s)[4]).toBe(Number((sigma1 / 2).toPrecision(2)));
  });
});

describe('ranks the data supports', () => {
  it('stop at the mean count per row-or-column, half the smaller side and 20', () => {
    // Movie-set shape at 80 %: 2·80,667 / (9,724 + 610) = 15.6 → ladder up to 12.
    expect(maxSupportedRank({ rows: 9724, cols: 610, observed: 80667, residualRms: 0.82 })).toBe(15);
    expect(defaultRanks({ rows: 9724, cols: 610, observed: 80667, residualRms: 0.82 })).toEqual([0, 1, 2, 3, 5, 8, 12]);
    // A 24 × 12 tasting panel, 60 % rated: half of 12 = 6 → up to 5.
    expect(defaultRanks({ rows: 24, cols: 12, observed: 173, residualRms: 1 })).toEqual([0, 1, 2, 3, 5]);
    // A tall 600 × 20 questionnaire: half of 20 = 10 → up to 8.
    expect(defaultRanks({ rows: 600, cols: 20, observed: 8400, residualRms: 1 })).toEqual([0, 1, 2, 3, 5, 8]);
    // Dense and large: capped at 20.
    expect(maxSupportedRank({ rows: 2000, cols: 2000, observed: 2_000_000, residualRms: 1 })).toBe(20);
    expect(defaultRanks({ rows: 1, cols: 5, observed: 3, residualRms: 1 })).toEqual([0]);
  });
});

describe('refinement around the best λ', () => {
  it('adds the geometric midpoints with the neighbours, or one ×2 step past an edge', () => {
    const grid = [3.3, 6.6, 13, 26, 53];
    expect(refineLambdas(13, grid)).toEqual([9.3, 18]); // √(6.6·13) = 9.26, √(13·26) = 18.4
    expect(refineLambdas(53, grid)).toEqual([37, 110]);
    expect(refineLambdas(3.3, grid)).toEqual([1.6, 4.7]); // 3.3 / 2 = 1.65 is 1.6499… in binary
    expect(refineLambdas(7, grid)).toEqual([]); // not a grid value
  });
});

describe('complexity order for the one-standard-error rule', () => {
  const row = (rank: number, lambda: number, meanRmse: number, sdRmse = 0.02): TuneRow => ({
    settings: { ...defaultLowRankSettings(), rank, lambda },
    meanRmse,
    sdRmse,
    meanMae: 0,
    sdMae: 0,
    folds: [],
  });

  it('smaller rank first, then larger λ', () => {
    expect(simplerLowRank({ rank: 2, lambda: 1 }, { rank: 3, lambda: 30 })).toBe(true);
    expect(simplerLowRank({ rank: 3, lambda: 30 }, { rank: 3, lambda: 10 })).toBe(true);
    expect(simplerLowRank({ rank: 3, lambda: 10 }, { rank: 3, lambda: 30 })).toBe(false);
    expect(simplerLowRank({ rank: 3, lambda: 10 }, { rank: 3, lambda: 10 })).toBe(false);
  });

  it('within one SE picks the smallest rank and, at that rank, the largest λ', () => {
    // Source: Hastie, Tibshirani & Friedman, The Elements of Statistical Learning (2nd ed.), §7.10.
    // SE = 0.02 / √4 = 0.01, threshold 0.91: rank 5 qualifies at λ 10 and 20 (not 40); rank 3 does not.
    const table = [row(3, 10, 0.95), row(5, 10, 0.905), row(5, 20, 0.909), row(5, 40, 0.92), row(8, 10, 0.9)];
    const c = chooseFromTable(table, 4);
    expect(c.bestIndex).toBe(4);
    expect(c.threshold).toBeCloseTo(0.91, 12);
    expect(c.oneStandardErrorIndex).toBe(2);
  });
});
