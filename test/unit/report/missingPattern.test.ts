import { describe, expect, it } from 'vitest';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { defaultGaussianSettings } from '../../../src-shared/engine/gaussian/settings';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';
import { missingPattern } from '../../../src-shared/report/missingPattern';

function matrix(rows: number, cols: number, observed: (i: number, j: number) => boolean): RatingMatrix {
  const values = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) values[i * cols + j] = observed(i, j) ? 1 + ((i + j) % 5) : NaN;
  return {
    rowLabels: Array.from({ length: rows }, (_, i) => `r${i}`),
    colLabels: Array.from({ length: cols }, (_, j) => `c${j}`),
    values,
    scale: { min: 1, max: 5, step: 1 },
  };
}

describe('missing pattern', () => {
  it('counts observed cells per row and column (checked by direct counting, common practice, no source)', () => {
    const m = matrix(7, 5, (i, j) => (i * 3 + j * 7) % 4 !== 0);
    const p = missingPattern(m, defaultLowRankSettings());
    for (let i = 0; i < 7; i++) {
      let n = 0;
      for (let j = 0; j < 5; j++) if ((i * 3 + j * 7) % 4 !== 0) n++;
      expect(p.rowCounts[i]).toBe(n);
    }
    for (let j = 0; j < 5; j++) {
      let n = 0;
      for (let i = 0; i < 7; i++) if ((i * 3 + j * 7) % 4 !== 0) n++;
      expect(p.colCounts[j]).toBe(n);
    }
    expect(p.observed).toBe([...p.rowCounts].reduce((a, b) => a + b, 0));
    // Small matrices keep one block per cell, the share being 1 or 0.
    expect([p.map.blockRows, p.map.blockCols, p.map.rowsPerBlock, p.map.colsPerBlock]).toEqual([7, 5, 1, 1]);
    // Cell (1, 3): (1·3 + 3·7) % 4 = 0, so it is blank and its block's share is 0; cell (1, 2) is observed.
    expect(p.map.share[1 * 5 + 3]).toBe(0);
    expect(p.map.share[1 * 5 + 2]).toBe(1);
  });

  it('downsamples a large matrix into blocks whose share is the observed fraction of the block', () => {
    // 200 × 250 with the left 100 columns fully observed and every other cell of the rest.
    const m = matrix(200, 250, (i, j) => j < 100 || (i + j) % 2 === 0);
    const p = missingPattern(m, defaultLowRankSettings(), 90, 120);
    expect(p.map.rowsPerBlock).toBe(3); // ⌈200 / 90⌉
    expect(p.map.colsPerBlock).toBe(3); // ⌈250 / 120⌉
    expect(p.map.blockRows).toBe(67);
    expect(p.map.blockCols).toBe(84);
    expect(p.map.share[0]).toBe(1);
    // Block (0, 40) covers rows 0–2, columns 120–122: 5 of 9 cells have i + j even.
    expect(p.map.share[40]).toBeCloseTo(5 / 9, 12);
    // The last block row holds only rows 198–199 (2 × 3 cells).
    const last = (p.map.blockRows - 1) * p.map.blockCols + 40;
    expect(p.map.share[last]).toBeCloseTo(3 / 6, 12);
  });

  it('names rows and columns with fewer observed values than the rank (at least 1), as the window marks them', () => {
    const m = matrix(6, 6, (i, j) => !(i === 2 && j > 0) && !(i === 4) && !(j === 5 && i > 1));
    const rank3 = { ...defaultLowRankSettings(), rank: 3 };
    const p = missingPattern(m, rank3);
    expect(p.thinBelow).toBe(3);
    expect(p.thinRows).toEqual([2, 4]); // row 2 has 1 observed value, row 4 none
    expect(p.thinCols).toEqual([5]); // column 5 has 2
    expect(missingPattern(m, { ...defaultLowRankSettings(), rank: 0 }).thinRows).toEqual([4]);
    expect(missingPattern(m, defaultGaussianSettings()).thinRows).toEqual([4]);
  });
});
