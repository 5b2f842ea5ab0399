import { describe, expect, it } from 'vitest';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { chooseFromTable, expandLowRankGrid, tune, type TuneRow } from '../../../src-shared/engine/tuning';
import { defaultGaussianSettings } from '../../../src-shared/engine/gaussian';
import { ar1Covariance, drawNormal, hideAtRandom, toMatrix } from './helpers';

describe('the Gaussian family inside fitModel and tuning', () => {
  it('fitModel dispatches gaussian settings to the EM fit', () => {
    const n = 40;
    const p = 4;
    const values = hideAtRandom(drawNormal(n, [1, 2, 3, 4], ar1Covariance([1, 1, 1, 1], 0.5), 8), 0.2, 9);
    const r = fitModel(toMatrix(values, n, p), { ...defaultGaussianSettings(), shrinkage: 0 });
    expect(r.settings.model).toBe('gaussian');
    expect(r.rank).toBe(0);
    expect(r.objectiveTrace.length).toBe(r.iterations);
  });

  it('on a tall panel with full-rank correlation, cross-validation prefers the Gaussian family', () => {
    // Source: the conditional mean under the true normal model is the minimum-MSE predictor
    // (regression on the observed items); AR(1) correlation ρ^|j−k| has full rank, which a
    // rank-1/2 factorization cannot represent, so the Gaussian fit should win on held-out cells.
    const n = 300;
    const p = 10;
    const values = hideAtRandom(drawNormal(n, Array(p).fill(4), ar1Covariance(Array(p).fill(1.2), 0.8), 31), 0.2, 32);
    const m = toMatrix(values, n, p);
    const low = expandLowRankGrid({ ranks: [1, 2], lambdas: [1, 5], centerings: ['column'] });
    const gauss = [0, 0.1].map((s) => ({ ...defaultGaussianSettings(), shrinkage: s }));
    const r = tune(m, { settings: [...low, ...gauss] }, 3, 7);
    expect(r.best.settings.model).toBe('gaussian');
    const bestLow = Math.min(...r.table.filter((t) => t.settings.model === 'lowrank').map((t) => t.meanRmse));
    expect(r.best.meanRmse).toBeLessThan(bestLow);
  });

  it('the one-standard-error choice stays in the family with the lowest mean RMSE', () => {
    // Source: one-standard-error rule (Hastie, Tibshirani & Friedman, The Elements of
    // Statistical Learning, §7.10): the simplest model within one SE of the best; here
    // "simplest" is read inside the winning family (largest shrinkage for the Gaussian one).
    const g = (shrinkage: number, meanRmse: number): TuneRow => ({
      settings: { ...defaultGaussianSettings(), shrinkage },
      meanRmse,
      sdRmse: 0.02,
      meanMae: meanRmse,
      sdMae: 0,
      folds: [],
    });
    const l = (rank: number, meanRmse: number): TuneRow => ({
      settings: { ...expandLowRankGrid({ ranks: [rank], lambdas: [1], centerings: ['both'] })[0] },
      meanRmse,
      sdRmse: 0.02,
      meanMae: meanRmse,
      sdMae: 0,
      folds: [],
    });
    // SE = 0.02 / √4 = 0.01; threshold 0.81
    const a = chooseFromTable([l(1, 0.805), l(3, 0.83), g(0, 0.8), g(0.1, 0.808), g(0.2, 0.85)], 4);
    expect(a.best.settings).toMatchObject({ model: 'gaussian', shrinkage: 0 });
    expect(a.threshold).toBeCloseTo(0.81, 12);
    expect(a.oneStandardError.settings).toMatchObject({ model: 'gaussian', shrinkage: 0.1 });
    const b = chooseFromTable([l(1, 0.799), l(3, 0.79), g(0, 0.795)], 4);
    expect(b.oneStandardError.settings).toMatchObject({ model: 'lowrank', rank: 1 });
  });
});
