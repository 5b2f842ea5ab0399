import { describe, expect, it } from 'vitest';
import {
  conformalQuantile,
  conformalRank,
  intervalBound,
  intervalBounds,
  nonNegativeLeastSquares,
  ratingsInside,
  summarizeLevel,
} from '../../../src-shared/engine/intervals';
import { createRng } from '../../../src-shared/engine/random';

describe('conformal quantile', () => {
  it('takes the ⌈(n + 1)(1 − α)⌉-th smallest score (hand-worked)', () => {
    // Source: Vovk, Gammerman & Shafer (2005), Algorithmic Learning in a Random World;
    // Lei, G'Sell, Rinaldo, Tibshirani & Wasserman (2018), JASA, §2.2 (split conformal).
    // Worked by hand: n = 9 scores; sorted 0.3 0.4 0.5 0.7 0.9 1.1 1.2 1.5 2.0.
    const scores = [0.5, 1.2, 0.3, 2.0, 0.9, 1.5, 0.7, 1.1, 0.4];
    expect(conformalRank(9, 0.8)).toBe(8); // ⌈10 · 0.8⌉ = 8, exactly (no round-up from float noise)
    expect(conformalQuantile(scores, 0.8)).toBe(1.5);
    expect(conformalRank(9, 0.9)).toBe(9); // ⌈10 · 0.9⌉ = 9
    expect(conformalQuantile(scores, 0.9)).toBe(2.0);
    expect(conformalQuantile(scores, 0.5)).toBe(0.9); // ⌈5⌉ = 5th smallest
    expect(conformalRank(9, 0.95)).toBe(10); // ⌈9.5⌉ = 10 > n: the interval must be unbounded
    expect(conformalQuantile(scores, 0.95)).toBe(Infinity);
    expect(conformalRank(99, 0.8)).toBe(80); // ⌈100 · 0.8⌉
    expect(conformalRank(100, 0.8)).toBe(81); // ⌈80.8⌉
  });

  it('covers exchangeable cells with probability between 1 − α and 1 − α + 1/(n + 1)', () => {
    // Source: Lei et al. (2018), Theorem 2.1 (coverage bounds of split conformal for
    // continuous scores); with n = 19 and level 0.8 the coverage is exactly 16/20 = 0.8.
    const rng = createRng(11);
    const trials = 20000;
    let inside = 0;
    const cal = new Float64Array(19);
    for (let t = 0; t < trials; t++) {
      for (let c = 0; c < 19; c++) cal[c] = Math.abs(rng.normal());
      const q = conformalQuantile(cal, 0.8);
      if (Math.abs(rng.normal()) <= q) inside++;
    }
    // Binomial sd √(0.8 · 0.2 / 20000) ≈ 0.0028; allow 3 sd.
    expect(inside / trials).toBeGreaterThan(0.8 - 0.0085);
    expect(inside / trials).toBeLessThan(0.8 + 0.0085);
  });
});

describe('interval bounds', () => {
  it('are estimate ± q·σ̂ clipped to the scale, inclusive', () => {
    // Hand-worked: 4.6 ± 1.2 · 1 = 3.4 … 5.8, clipped to the 1–5 scale → 3.4 … 5.
    const scale = { min: 1, max: 5, step: 0.5 };
    expect(intervalBound(4.6, 1, 1.2, scale, -1)).toBeCloseTo(3.4, 12);
    expect(intervalBound(4.6, 1, 1.2, scale, 1)).toBe(5);
    const b = intervalBounds([4.6, 2, NaN], [1, 0.5, 1], 1.2, scale);
    expect(b.lower[1]).toBeCloseTo(1.4, 12);
    expect(b.upper[1]).toBeCloseTo(2.6, 12);
    expect(Number.isNaN(b.lower[2])).toBe(true);
    // On a half-step scale the ratings inside [3.4, 5] are 3.5 … 5 (both bounds inclusive).
    expect(ratingsInside(3.4, 5, scale)).toEqual({ first: 3.5, last: 5 });
    expect(ratingsInside(3.5, 4, scale)).toEqual({ first: 3.5, last: 4 });
    expect(ratingsInside(3.6, 3.9, scale)).toBeUndefined();
    expect(ratingsInside(3.4, 5, { min: 1, max: 5, step: 0 })).toBeUndefined();
  });
});

describe('held-out coverage by fold', () => {
  it('calibrates each fold on the other folds (hand-worked)', () => {
    // Two folds, estimate 0 and σ̂ = 1, so each score is the observed value.
    // Fold 0 scores 1 2 3, fold 1 scores 0.5 1.5 2.5; level 0.5 (k = ⌈4 · 0.5⌉ = 2 of 3):
    //   fold 0: q from fold 1 = 1.5 → covers {1}: 1/3, width 3;
    //   fold 1: q from fold 0 = 2   → covers {0.5, 1.5}: 2/3, width 4;
    //   all six: k = ⌈7 · 0.5⌉ = 4 → q = 2.
    const h = {
      k: 2,
      fold: Int32Array.from([0, 0, 0, 1, 1, 1]),
      estimate: new Float64Array(6),
      observed: Float64Array.from([1, 2, 3, 0.5, 1.5, 2.5]),
      sigma: new Float64Array(6).fill(1),
    };
    const s = summarizeLevel(h, 0.5, { min: -10, max: 10, step: 0 });
    expect(s.q).toBe(2);
    expect(s.folds[0]).toEqual({ n: 3, coverage: 1 / 3, meanWidth: 3 });
    expect(s.folds[1]).toEqual({ n: 3, coverage: 2 / 3, meanWidth: 4 });
    expect(s.coverage).toBeCloseTo(0.5, 12);
    expect(s.meanWidth).toBeCloseTo(3.5, 12);
    // σ̂ = 2 on fold 1: its scores halve to 0.25 0.75 1.25.
    //   fold 1: q from fold 0 (1 2 3) = 2 → all three ≤ 2: coverage 1, width 2 · 2 · σ̂ 2 = 8;
    //   fold 0: q from fold 1 = 0.75 → none of 1 2 3: coverage 0, width 2 · 0.75 = 1.5.
    const h2 = { ...h, sigma: Float64Array.from([1, 1, 1, 2, 2, 2]) };
    const s2 = summarizeLevel(h2, 0.5, { min: -10, max: 10, step: 0 });
    expect(s2.folds[1]).toEqual({ n: 3, coverage: 1, meanWidth: 8 });
    expect(s2.folds[0]).toEqual({ n: 3, coverage: 0, meanWidth: 1.5 });
    // Clipping to the scale narrows the width: on −1…10 fold 1's intervals 0 ± 4 become −1…4.
    const s3 = summarizeLevel(h2, 0.5, { min: -1, max: 10, step: 0 });
    expect(s3.folds[1].meanWidth).toBe(5);
  });
  it('refuses a level outside 50–99 %', () => {
    const h = {
      k: 2,
      fold: new Int32Array(2),
      estimate: new Float64Array(2),
      observed: new Float64Array(2),
      sigma: new Float64Array(2),
    };
    expect(() => summarizeLevel(h, 0.4, { min: 0, max: 1, step: 0 })).toThrow(/between 0.5 and 0.99/);
    expect(() => summarizeLevel(h, 0.995, { min: 0, max: 1, step: 0 })).toThrow(/between 0.5 and 0.99/);
  });
});

describe('non-negative least squares', () => {
  it('sets a coefficient whose unconstrained value is negative to 0 and refits the rest', () => {
    // Hand-worked: y = 4 3 2 1 on (1, b) with b = 1 2 3 4: least squares gives y = 5 − b;
    // with β ≥ 0 the slope is 0 and the intercept is mean(y) = 2.5 (KKT: ∂/∂β_b = 5 > 0).
    const x = Float64Array.from([1, 1, 1, 2, 1, 3, 1, 4]);
    const beta = nonNegativeLeastSquares(x, Float64Array.from([4, 3, 2, 1]), 2);
    expect(beta[0]).toBeCloseTo(2.5, 9);
    expect(beta[1]).toBe(0);
    // A positive exact fit is recovered: y = 1 + 2b.
    const exact = nonNegativeLeastSquares(x, Float64Array.from([3, 5, 7, 9]), 2);
    expect(exact[0]).toBeCloseTo(1, 9);
    expect(exact[1]).toBeCloseTo(2, 9);
  });
});
