import { describe, expect, it } from 'vitest';
import { cellFolds, crossValidate, makeFolds } from '../../../src-shared/engine/crossValidation';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { lowRankCase, matrixOf } from './helpers';

describe('makeFolds', () => {
  const { matrix } = lowRankCase(40, 25, 2, 0.3, 0.15, 31);
  const k = 5;
  const folds = makeFolds(matrix, k, 7);
  const foldOf = cellFolds(matrix, folds);

  it('puts every observed cell in exactly one fold and no missing cell in any', () => {
    // Source: definition of k-fold cross-validation (a partition of the observed cells).
    let n = 0;
    for (let c = 0; c < matrix.values.length; c++) {
      const obs = matrix.values[c] === matrix.values[c];
      if (obs) n++;
      expect(foldOf[c] >= 0).toBe(obs);
      expect(foldOf[c]).toBeLessThan(k);
    }
    expect(folds.sizes.reduce((a, b) => a + b, 0)).toBe(n);
    // Balanced: round-robin sizes are within one, the repair moves only a few cells.
    expect(Math.max(...folds.sizes) - Math.min(...folds.sizes)).toBeLessThanOrEqual(Math.ceil(0.05 * n));
  });

  it('leaves every row and column with ≥ 2 observed cells a training value in every fold', () => {
    // common practice, no source: a row with no training value can only be predicted by its baseline fallback.
    const rows = 40;
    const cols = 25;
    for (let f = 0; f < k; f++) {
      for (let i = 0; i < rows; i++) {
        let obs = 0;
        let train = 0;
        for (let j = 0; j < cols; j++) {
          const fo = foldOf[i * cols + j];
          if (fo >= 0) obs++;
          if (fo >= 0 && fo !== f) train++;
        }
        if (obs >= 2) expect(train).toBeGreaterThan(0);
      }
      for (let j = 0; j < cols; j++) {
        let obs = 0;
        let train = 0;
        for (let i = 0; i < rows; i++) {
          const fo = foldOf[i * cols + j];
          if (fo >= 0) obs++;
          if (fo >= 0 && fo !== f) train++;
        }
        if (obs >= 2) expect(train).toBeGreaterThan(0);
      }
    }
  });

  it('is deterministic for a seed and changes with it', () => {
    expect(Array.from(makeFolds(matrix, k, 7).foldOf)).toEqual(Array.from(folds.foldOf));
    expect(Array.from(makeFolds(matrix, k, 8).foldOf)).not.toEqual(Array.from(folds.foldOf));
  });
});

describe('crossValidate', () => {
  it('scores rank-0 column centering exactly as held-out column means', () => {
    // Source: definitions of RMSE/MAE and of the sample standard deviation; the rank-0
    // column-centred model predicts a held-out cell by its column's training mean.
    const { matrix } = lowRankCase(30, 8, 1, 0.5, 0.6, 41);
    const rows = 30;
    const cols = 8;
    const folds = makeFolds(matrix, 4, 3);
    const foldOf = cellFolds(matrix, folds);
    const cv = crossValidate(
      matrix,
      { ...defaultLowRankSettings(), rank: 0, centering: 'column', clipToScale: false },
      folds,
    );
    const rmses: number[] = [];
    for (let f = 0; f < 4; f++) {
      let se = 0;
      let ae = 0;
      let n = 0;
      for (let j = 0; j < cols; j++) {
        let s = 0;
        let m = 0;
        for (let i = 0; i < rows; i++) {
          const c = i * cols + j;
          if (foldOf[c] >= 0 && foldOf[c] !== f) {
            s += matrix.values[c];
            m++;
          }
        }
        for (let i = 0; i < rows; i++) {
          const c = i * cols + j;
          if (foldOf[c] === f) {
            const e = s / m - matrix.values[c];
            se += e * e;
            ae += Math.abs(e);
            n++;
          }
        }
      }
      expect(cv.folds[f].n).toBe(n);
      expect(cv.folds[f].rmse).toBeCloseTo(Math.sqrt(se / n), 10);
      expect(cv.folds[f].mae).toBeCloseTo(ae / n, 10);
      rmses.push(Math.sqrt(se / n));
    }
    const mean = rmses.reduce((a, b) => a + b, 0) / 4;
    const sd = Math.sqrt(rmses.reduce((a, b) => a + (b - mean) ** 2, 0) / 3);
    expect(cv.meanRmse).toBeCloseTo(mean, 10);
    expect(cv.sdRmse).toBeCloseTo(sd, 10);
  });

  it('refuses more folds than observed cells', () => {
    expect(() => makeFolds(matrixOf(2, 2, Float64Array.from([1, NaN, NaN, 2])), 3, 1)).toThrow('at least 3 observed');
  });
});
