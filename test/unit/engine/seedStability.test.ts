import { describe, expect, it } from 'vitest';
import {
  compareSeedFits,
  describeSeedStability,
  moveThreshold,
  seedStability,
} from '../../../src-shared/engine/seedStability';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { lowRankCase, matrixOf } from './helpers';

describe('seed stability', () => {
  it('counts filled cells that move by more than half a scale step (hand-worked)', () => {
    // 1 × 5 on 1–5 in steps of 0.5: τ = 0.25. Cells 1–4 are missing; moves 0.1, 0.3, 0, 1.
    const m = matrixOf(1, 5, Float64Array.from([3, NaN, NaN, NaN, NaN]), { min: 1, max: 5, step: 0.5 });
    const a = Float64Array.from([3, 2, 2, 2, 2]);
    const b = Float64Array.from([9, 2.1, 2.3, 2, 3]);
    const r = compareSeedFits(m, a, b, [1, 2]);
    expect(r.threshold).toBe(0.25);
    expect(r.cells).toBe(4);
    expect(r.moved).toBe(2);
    expect(r.movedFraction).toBe(0.5);
    expect(r.maxMove).toBe(1);
    expect(r.meanMove).toBeCloseTo(1.4 / 4, 12);
    expect(r.flagged).toBe(true);
    expect(describeSeedStability(r)).toMatch(
      /^the estimates depend on the start: with seed 2 instead of 1, 2 of 4 filled cells \(50\.0 %\) move by more than 0\.25/,
    );
    expect(moveThreshold({ min: 0, max: 10, step: 0 })).toBe(0.5);
  });

  it('a well-posed fit from the spectral start does not depend on the seed', () => {
    // Source: from a spectral start ALS converges to the unique completion of a well-sampled
    // rank-2 matrix (Jain, Netrapalli & Sanghavi 2013), whatever the power iteration's seed.
    const { matrix } = lowRankCase(50, 40, 2, 0.05, 0.6, 3);
    const m = { ...matrix, scale: { min: -20, max: 20, step: 0.5 } };
    const r = seedStability(m, {
      ...defaultLowRankSettings(),
      rank: 2,
      lambda: 0.1,
      centering: 'none',
      maxIterations: 300,
      tolerance: 1e-10,
    });
    expect(r.cells).toBeGreaterThan(0);
    expect(r.moved).toBe(0);
    expect(r.flagged).toBe(false);
    expect(describeSeedStability(r)).toBe('');
  });

  it('flags a fit that stops early from random starts', () => {
    // Two random starts after 2 sweeps are far from each other on a rank-4 problem (common practice, no source).
    const { matrix } = lowRankCase(40, 30, 4, 0.1, 0.4, 8);
    const m = { ...matrix, scale: { min: -20, max: 20, step: 0.5 } };
    const r = seedStability(m, {
      ...defaultLowRankSettings(),
      rank: 4,
      lambda: 0.01,
      centering: 'none',
      init: 'random',
      maxIterations: 2,
      tolerance: 0,
    });
    expect(r.flagged).toBe(true);
    expect(r.movedFraction).toBeGreaterThan(0.01);
  });
});
