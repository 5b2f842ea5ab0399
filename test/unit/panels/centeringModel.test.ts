import { describe, expect, it } from 'vitest';
import type { TunePayload } from '../../../src-shared/api';
import { tuneToPayload } from '../../../src-shared/apiCodec';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { tune } from '../../../src-shared/engine/tuning';
import type { GaussianSettings } from '../../../src-shared/engine/types';
import {
  centeringRows,
  CENTERING_MODES,
  COMPARE_FOLDS,
  planCenteringComparison,
} from '../../../src-renderer/panels/centeringModel';
import { lowRankCase } from '../engine/helpers';

describe('planCenteringComparison', () => {
  it('varies only the centering of the form’s low-rank settings', () => {
    const form = {
      ...defaultLowRankSettings(),
      rank: 3,
      lambda: 7,
      seed: 42,
      maxIterations: 55,
      centering: 'row' as const,
    };
    const plan = planCenteringComparison(form);
    expect(plan.note).toBeNull();
    expect(plan.seed).toBe(42);
    expect(plan.settingsList.map((s) => s.centering)).toEqual(['none', 'row', 'column', 'both']);
    for (const s of plan.settingsList) expect({ ...s, centering: form.centering }).toEqual(form);
  });

  it('falls back to the low-rank family (with a note) when the form is Gaussian', () => {
    const form: GaussianSettings = {
      model: 'gaussian',
      shrinkage: 0.2,
      transpose: false,
      maxIterations: 30,
      tolerance: 1e-6,
      seed: 9,
      clipToScale: false,
      snapToStep: false,
    };
    const plan = planCenteringComparison(form);
    expect(plan.note).toMatch(/does not apply to the Gaussian/);
    expect(plan.settingsList).toHaveLength(4);
    for (const s of plan.settingsList) {
      expect(s.model).toBe('lowrank');
      expect(s.seed).toBe(9);
      expect(s.maxIterations).toBe(30);
      expect(s.clipToScale).toBe(false);
    }
  });
});

describe('centeringRows', () => {
  it('reads fold spread and the best mark from a real comparison on shared folds', () => {
    const { matrix } = lowRankCase(24, 16, 2, 0.3, 0.6, 5);
    // Give rows systematic offsets so the centering modes differ.
    for (let i = 0; i < 24; i++) for (let j = 0; j < 16; j++) matrix.values[i * 16 + j] += i * 0.25;
    const plan = planCenteringComparison({ ...defaultLowRankSettings(), rank: 1, lambda: 1 });
    const reply: TunePayload = tuneToPayload(tune(matrix, { settings: plan.settingsList }, COMPARE_FOLDS, plan.seed));
    const rows = centeringRows(reply);
    expect(rows.map((r) => r.centering)).toEqual([...CENTERING_MODES]);
    // Exactly one best, and it has the smallest mean RMSE (definition of "best": arg min of the mean).
    expect(rows.filter((r) => r.best)).toHaveLength(1);
    const minMean = Math.min(...rows.map((r) => r.meanRmse));
    expect(rows.find((r) => r.best)!.meanRmse).toBe(minMean);
    for (const r of rows) {
      expect(r.foldRmse).toHaveLength(COMPARE_FOLDS);
      // Source: the arithmetic mean of values lies between their minimum and maximum (common fact).
      expect(r.meanRmse).toBeGreaterThanOrEqual(r.minRmse - 1e-12);
      expect(r.meanRmse).toBeLessThanOrEqual(r.maxRmse + 1e-12);
      // Mean of the per-fold values, recomputed here (common practice, no source).
      const mean = r.foldRmse.reduce((a, b) => a + b, 0) / r.foldRmse.length;
      expect(r.meanRmse).toBeCloseTo(mean, 12);
    }
    // Row offsets of 0.25 per row (range 5.75) are far above the noise: leaving them in
    // (centering none, rank 1) must score worse than taking row means out.
    // Source: a rank-1 term cannot absorb both the row trend and the rank-2 signal (from memory).
    const by = Object.fromEntries(rows.map((r) => [r.centering, r.meanRmse]));
    expect(by.row).toBeLessThan(by.none);
  });

  it('keeps a failed mode as a row with its message and NaN metrics', () => {
    const s = defaultLowRankSettings();
    const reply: TunePayload = {
      k: 5,
      seed: 1,
      table: [
        {
          settings: { ...s, centering: 'none' },
          folds: [],
          meanRmse: null,
          sdRmse: null,
          meanMae: null,
          sdMae: null,
          error: 'too few values',
        },
        {
          settings: { ...s, centering: 'row' },
          folds: [
            { rmse: 1, mae: 0.8, n: 3 },
            { rmse: 2, mae: 1.5, n: 3 },
          ],
          meanRmse: 1.5,
          sdRmse: 0.7,
          meanMae: 1.15,
          sdMae: 0.5,
        },
      ],
      bestIndex: 1,
      oneStandardErrorIndex: 1,
      threshold: 1.8,
    };
    const rows = centeringRows(reply);
    expect(rows[0].error).toBe('too few values');
    expect(Number.isNaN(rows[0].meanRmse)).toBe(true);
    expect(Number.isNaN(rows[0].minRmse)).toBe(true);
    expect(rows[1]).toMatchObject({ minRmse: 1, maxRmse: 2, best: true });
  });
});
