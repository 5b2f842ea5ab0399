import { describe, expect, it } from 'vitest';
import { tuneDefault } from '../../../src-shared/engine/defaultTune';
import { defaultGrid } from '../../../src-shared/engine/tuningGrid';
import { tune } from '../../../src-shared/engine/tuning';
import {
  autoSettings,
  baselineCandidates,
  chooseAuto,
  factorCandidates,
  spreadRanks,
} from '../../../src-shared/engine/autoSettings';
import { crossValidate, makeFolds } from '../../../src-shared/engine/crossValidation';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import type { LowRankSettings } from '../../../src-shared/engine/types';
import { createRng } from '../../../src-shared/engine/random';
import { lowRankCase, matrixOf } from './helpers';

/** Row and column effects plus noise, no interaction: the baselines alone are the right model. */
function additiveCase(rows: number, cols: number, seed: number) {
  const rng = createRng(seed);
  const a = Array.from({ length: rows }, () => rng.normal());
  const b = Array.from({ length: cols }, () => rng.normal());
  const values = new Float64Array(rows * cols).fill(NaN);
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) if (rng.next() < 0.5) values[i * cols + j] = 3 + a[i] + b[j] + 0.5 * rng.normal();
  return matrixOf(rows, cols, values);
}

describe('tuning with the data-derived grid', () => {
  it('finds the optimum of a fine λ scan at the chosen rank (refinement included)', async () => {
    // Check: the best of the coarse grid + refinement must come within 0.5 % of the best mean
    // RMSE over a fine λ scan (×1.19 apart) at the same rank and on the same folds — a grid
    // that skips the optimum fails this (common practice, no source).
    const { matrix } = lowRankCase(70, 50, 3, 0.5, 0.45, 21);
    // 70 × 50 at 45 %: 2N/(m + n) ≈ 26, half of 50 = 25 → the ladder up to 20.
    expect(defaultGrid(matrix).ranks).toEqual([0, 1, 2, 3, 5, 8, 12, 16, 20]);
    // Fewer ranks here to keep the test quick; the λ grid is the data-derived one.
    const r = await tuneDefault(matrix, { folds: 4, seed: 3, ranks: [0, 2, 3, 5] });
    // The data have no row or column offsets: the baselines-alone stage picks centering none.
    expect(r.grid.centerings).toEqual(['none']);
    const best = r.best.settings as LowRankSettings;
    expect(best.rank).toBeGreaterThanOrEqual(3);
    expect(r.refinedLambdas.length).toBeGreaterThan(0);
    // Rank 0 appears once per centering (λ does not act on it).
    expect(r.table.filter((t) => t.settings.model === 'lowrank' && t.settings.rank === 0)).toHaveLength(4);
    const folds = makeFolds(matrix, 4, 3);
    let fine = Infinity;
    for (let t = -12; t <= 12; t++) {
      const lambda = best.lambda * 2 ** (t / 4);
      fine = Math.min(fine, crossValidate(matrix, { ...best, lambda }, folds).meanRmse);
    }
    expect(r.best.meanRmse).toBeLessThan(fine * 1.005);
    // The one-SE choice is never more complex than the best.
    const one = r.oneStandardError.settings as LowRankSettings;
    expect(one.rank).toBeLessThanOrEqual(best.rank);
    expect(r.oneStandardError.meanRmse).toBeLessThanOrEqual(r.threshold);
  });

  it('scores every pass on the same folds', async () => {
    const { matrix } = lowRankCase(40, 30, 2, 0.3, 0.5, 4);
    const r = await tuneDefault(matrix, { folds: 3, seed: 9 });
    const someRefined = r.table[r.table.length - 1];
    const alone = tune(matrix, { settings: [someRefined.settings] }, 3, 9);
    expect(alone.table[0].folds).toEqual(someRefined.folds);
  });
});

describe('the adaptive default for a first Fill', () => {
  it('spreads three ranks over the ladder', () => {
    expect(spreadRanks([0, 1, 2, 3, 5, 8, 12])).toEqual([2, 5, 12]);
    expect(spreadRanks([0, 1, 2, 3, 5])).toEqual([2, 3, 5]);
    expect(spreadRanks([0, 1, 2])).toEqual([1, 2]);
    expect(spreadRanks([0])).toEqual([]);
  });

  it('has rank 0 among its candidates, so it is never worse in its cross-validation than the baselines', () => {
    const m = additiveCase(40, 25, 2);
    expect(baselineCandidates(m).map((s) => `${s.rank}/${s.centering}`)).toEqual([
      '0/none',
      '0/row',
      '0/column',
      '0/both',
    ]);
    const factors = factorCandidates(m, 'both');
    expect(factors.length).toBe(9);
    expect(factors.every((s) => s.rank > 0 && s.centering === 'both')).toBe(true);
    const a = autoSettings(m);
    expect(a.table.length).toBe(13);
    expect(a.rmse).toBeLessThanOrEqual(a.baselineRmse);
    // Source: no model beats the noise level σ = 0.5 on held-out cells (the irreducible
    // error; Hastie, Tibshirani & Friedman §7.3).
    expect(a.rmse).toBeGreaterThan(0.5);
    expect(a.settings.centering).toBe('both');
    expect(a.reason).toMatch(/^rank \d+.*: lowest 3-fold error of 13 settings; /);
    expect(a.settings.maxIterations).toBe(defaultLowRankSettings().maxIterations);
  });

  it('picks hidden traits when the data have them and says how much they gain', () => {
    // Rank-3 signal (variance 3) plus noise σ 0.5: a model with traits beats the baselines by far.
    const { matrix } = lowRankCase(60, 40, 3, 0.5, 0.5, 7);
    const a = autoSettings(matrix, { seed: 2 });
    expect(a.settings.rank).toBeGreaterThanOrEqual(3);
    expect(a.baselineRmse - a.rmse).toBeGreaterThan(0.5);
    expect(a.reason).toMatch(
      /^rank \d+, λ [\d.]+, none: lowest 3-fold error of 13 settings; \d\.\d{3} better than baselines alone$/,
    );
  });

  it('chooses rank 0 when nothing beats it, and falls back to the defaults on tiny data', () => {
    const s = defaultLowRankSettings();
    const row = (rank: number, meanRmse: number) => ({
      settings: { ...s, rank },
      meanRmse,
      sdRmse: 0,
      meanMae: 0,
      sdMae: 0,
      folds: [],
    });
    const c = chooseAuto([row(0, 0.8), row(2, 0.81), row(5, 0.85)], 3, s);
    expect(c.settings.rank).toBe(0);
    expect(c.reason).toBe(
      'rank 0 (baselines alone), both: lowest 3-fold error of 3 settings; no setting with hidden traits did better',
    );
    const tiny = autoSettings(matrixOf(2, 2, Float64Array.from([1, 2, NaN, 4])));
    expect(tiny.settings.rank).toBe(s.rank);
    expect(tiny.reason).toMatch(/too few to cross-validate/);
  });
});
