import { describe, expect, it } from 'vitest';
import { chooseFromTable, expandLowRankGrid, tune, type TuneRow } from '../../../src-shared/engine/tuning';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { lowRankCase } from './helpers';

function row(rank: number, lambda: number, meanRmse: number, sdRmse: number): TuneRow {
  return { settings: { ...defaultLowRankSettings(), rank, lambda }, meanRmse, sdRmse, meanMae: 0, sdMae: 0, folds: [] };
}

describe('one-standard-error rule', () => {
  // Source: Hastie, Tibshirani & Friedman, The Elements of Statistical Learning (2nd ed.), §7.10:
  // choose the most parsimonious model whose error is within one standard error of the best.
  it('picks the smallest rank within best + sd/√k', () => {
    const table = [row(1, 1, 1.2, 0.1), row(2, 1, 0.93, 0.1), row(3, 1, 0.9, 0.1), row(5, 1, 0.92, 0.2)];
    const c = chooseFromTable(table, 4); // SE = 0.1/2 = 0.05, threshold 0.95
    expect(c.bestIndex).toBe(2);
    expect(c.threshold).toBeCloseTo(0.95, 12);
    expect(c.oneStandardErrorIndex).toBe(1);
  });

  it('falls back to the best when nothing smaller is close enough', () => {
    const table = [row(1, 1, 1.2, 0.01), row(4, 1, 0.9, 0.01)];
    expect(chooseFromTable(table, 5).oneStandardErrorIndex).toBe(1);
  });

  it('skips failed rows', () => {
    const bad = { ...row(0, 1, NaN, NaN), error: 'boom' };
    const c = chooseFromTable([bad, row(2, 1, 1, 0)], 5);
    expect(c.bestIndex).toBe(1);
  });
});

describe('tune', () => {
  it('expands the grid rank × λ × centering and prefers the true rank on rank-2 data', () => {
    // Source: a rank-2 signal with noise σ = 0.2 cannot be fitted below σ by rank 0 or 1
    // (the missing factor's variance is 1), so the best rank is ≥ 2.
    const grid = { ranks: [0, 1, 2], lambdas: [0.5, 5], centerings: ['none', 'both'] as const };
    const list = expandLowRankGrid({ ...grid, centerings: [...grid.centerings] });
    expect(list).toHaveLength(12);
    expect(new Set(list.map((s) => `${s.rank}/${s.lambda}/${s.centering}`)).size).toBe(12);
    const { matrix } = lowRankCase(40, 30, 2, 0.2, 0.5, 51);
    const progress: number[] = [];
    const result = tune(matrix, { settings: list }, 4, 9, (p) => progress.push(p.done));
    expect(result.table).toHaveLength(12);
    expect(progress[progress.length - 1]).toBe(48);
    expect(result.best.settings.model === 'lowrank' && result.best.settings.rank).toBe(2);
    expect(result.best.meanRmse).toBeLessThan(0.35);
    const rank1 = result.table.filter((r) => r.settings.model === 'lowrank' && r.settings.rank === 1);
    for (const r of rank1) expect(r.meanRmse).toBeGreaterThan(result.threshold);
    // Same folds for every row: rerunning one setting alone reproduces its table row exactly
    // when the grid is fitted cold (no shared starts), and to within the reuse tolerance otherwise.
    const cold = tune(matrix, { settings: list }, 4, 9, undefined, undefined, { reuse: false });
    const again = tune(matrix, { settings: [list[7]] }, 4, 9);
    expect(again.table[0].folds).toEqual(cold.table[7].folds);
    for (let t = 0; t < list.length; t++)
      expect(Math.abs(result.table[t].meanRmse - cold.table[t].meanRmse)).toBeLessThan(1e-3);
  });
});
