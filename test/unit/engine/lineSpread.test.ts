import { describe, expect, it } from 'vitest';
import { EnsembleSpread } from '../../../src-shared/engine/cellIntervals';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { LineSpreadSample } from '../../../src-shared/engine/lineSpread';
import { fitLowRankSparse } from '../../../src-shared/engine/lowRank';
import { predictRow } from '../../../src-shared/engine/predictions';
import { sparseFromDense } from '../../../src-shared/matrix/sparseRatings';
import { lowRankCase } from './helpers';

describe('LineSpreadSample', () => {
  it('equals the mean ensemble spread over every blank cell of a line when the line has at most S blanks', () => {
    // Source: definition of the sample standard deviation (divisor M − 1) and of the mean;
    // with no more blanks than the sample size the sample is the whole line.
    const rows = 12;
    const cols = 9;
    const { matrix } = lowRankCase(rows, cols, 2, 0.4, 0.6, 17);
    const data = sparseFromDense(matrix.values, rows, cols);
    const sample = new LineSpreadSample(data);
    const ensemble = new EnsembleSpread(rows * cols);
    const dense = new Float64Array(rows * cols);
    for (const seed of [1, 2, 3]) {
      const fit = fitLowRankSparse(data, {
        ...defaultLowRankSettings(),
        rank: 2,
        init: 'random',
        seed,
        maxIterations: 3,
      });
      for (let i = 0; i < rows; i++) predictRow(fit, matrix.scale, i, dense.subarray(i * cols, (i + 1) * cols));
      ensemble.add(dense);
      sample.add(fit, matrix.scale);
    }
    const spread = ensemble.spread();
    const { rowSpread, colSpread } = sample.result();
    for (let i = 0; i < rows; i++) {
      let s = 0;
      let m = 0;
      for (let j = 0; j < cols; j++)
        if (Number.isNaN(matrix.values[i * cols + j])) {
          s += spread[i * cols + j];
          m++;
        }
      expect(rowSpread[i]).toBeCloseTo(m > 0 ? s / m : 0, 12);
    }
    for (let j = 0; j < cols; j++) {
      let s = 0;
      let m = 0;
      for (let i = 0; i < rows; i++)
        if (Number.isNaN(matrix.values[i * cols + j])) {
          s += spread[i * cols + j];
          m++;
        }
      expect(colSpread[j]).toBeCloseTo(m > 0 ? s / m : 0, 12);
    }
    expect(rowSpread.some((x) => x > 0)).toBe(true);
  });

  it('takes min(S, blanks) cells from every row and column', () => {
    // Common practice, no source: an evenly spaced subsample of the blank positions.
    const rows = 2;
    const cols = 1000;
    const values = new Float64Array(rows * cols).fill(NaN);
    for (let j = 0; j < cols; j += 7) values[j] = 3; // row 0: 143 observed, 857 blank
    values[cols + 5] = 4; // row 1: one observed
    const data = sparseFromDense(values, rows, cols);
    const sample = new LineSpreadSample(data, 64);
    // Rows: 64 + 64; columns: up to 64 blanks each, but a column has at most 2 rows (1 or 2 blank).
    let colBlanks = 0;
    for (let j = 0; j < cols; j++) colBlanks += 2 - (Number.isNaN(values[j]) ? 0 : 1) - (j === 5 ? 1 : 0);
    expect(sample.size).toBe(128 + colBlanks);
  });
});
