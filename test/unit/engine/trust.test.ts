import { describe, expect, it } from 'vitest';
import { cellTrust } from '../../../src-shared/engine/trust';
import { cellFolds, makeFolds } from '../../../src-shared/engine/crossValidation';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { lowRankCase } from './helpers';

describe('cellTrust', () => {
  it('fold ensemble of a rank-0 column model: spread is the sd of the training column means', () => {
    // Source: definition of the sample standard deviation across the k fold models; the
    // rank-0 column-centred model predicts every cell of column j by its training mean.
    const { matrix } = lowRankCase(25, 6, 1, 0.5, 0.7, 61);
    const rows = 25;
    const cols = 6;
    const settings = { ...defaultLowRankSettings(), rank: 0, centering: 'column' as const, clipToScale: false };
    const trust = cellTrust(matrix, settings, { method: 'folds', k: 5, seed: 4 });
    const foldOf = cellFolds(matrix, makeFolds(matrix, 5, 4));
    for (let j = 0; j < cols; j++) {
      const means: number[] = [];
      for (let f = 0; f < 5; f++) {
        let s = 0;
        let m = 0;
        for (let i = 0; i < rows; i++) {
          const c = i * cols + j;
          if (foldOf[c] >= 0 && foldOf[c] !== f) {
            s += matrix.values[c];
            m++;
          }
        }
        means.push(s / m);
      }
      const mu = means.reduce((a, b) => a + b, 0) / 5;
      const sd = Math.sqrt(means.reduce((a, b) => a + (b - mu) ** 2, 0) / 4);
      for (let i = 0; i < rows; i++) expect(trust.spread[i * cols + j]).toBeCloseTo(sd, 10);
    }
  });

  it('counts support and flags rows/columns with fewer observations than the rank', () => {
    // Source: a k-dimensional factor fitted from fewer than k values is underdetermined (rank argument).
    const { matrix } = lowRankCase(20, 10, 2, 0.3, 0.8, 62);
    const cols = 10;
    for (let j = 1; j < cols; j++) matrix.values[3 * cols + j] = NaN; // row 4 keeps one value
    matrix.values[3 * cols] = 1;
    const trust = cellTrust(matrix, { ...defaultLowRankSettings(), rank: 3 }, { method: 'bootstrap', B: 4, seed: 2 });
    expect(trust.rowSupport[3]).toBe(1);
    expect(trust.weakRows).toContain(3);
    let obs = 0;
    for (let j = 0; j < cols; j++) if (matrix.values[j] === matrix.values[j]) obs++;
    expect(trust.rowSupport[0]).toBe(obs);
    expect(trust.colSupport.reduce((a, b) => a + b, 0)).toBe(trust.rowSupport.reduce((a, b) => a + b, 0));
    // Bootstrap refits differ, so the spread is positive somewhere and finite everywhere.
    expect(Math.max(...trust.spread)).toBeGreaterThan(0);
    expect(trust.spread.every((x) => Number.isFinite(x))).toBe(true);
  });
});
