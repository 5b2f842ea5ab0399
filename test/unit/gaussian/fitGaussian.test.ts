import { describe, expect, it } from 'vitest';
import { defaultGaussianSettings, emGaussian, fitGaussian, gaussianRefusal } from '../../../src-shared/engine/gaussian';
import type { GaussianSettings } from '../../../src-shared/engine/types';
import { FitCancelledError, FitFailedError } from '../../../src-shared/engine/errors';
import { ar1Covariance, drawNormal, hideAtRandom, toMatrix } from './helpers';

function settings(over: Partial<GaussianSettings> = {}): GaussianSettings {
  return { ...defaultGaussianSettings(), ...over };
}

function panel(n: number, p: number, seed: number, rate = 0.2) {
  const mu = Array.from({ length: p }, (_, j) => 3 + (j % 3) * 0.3);
  const full = drawNormal(n, mu, ar1Covariance(Array(p).fill(0.9), 0.75), seed);
  return { full, values: hideAtRandom(full, rate, seed + 1) };
}

describe('fitGaussian refusals', () => {
  it('refuses more than 300 variables and suggests the low-rank model', () => {
    // common practice, no source: the limit and the wording are this project's rule
    const m = toMatrix(new Float64Array(5 * 301).fill(3), 5, 301);
    expect(() => fitGaussian(m, settings())).toThrow(/at most 300 variables.*301 columns.*low-rank/);
    expect(() => fitGaussian(m, settings())).toThrow(FitFailedError);
    expect(() => fitGaussian(m, settings())).toThrow(/make the rows the variables: there are 5 of them/);
    const tall = toMatrix(new Float64Array(301 * 301).fill(3), 301, 301);
    expect(gaussianRefusal(tall)).not.toMatch(/make the rows/);
    expect(gaussianRefusal(m)).toMatch(/low-rank/);
    // transposed, the same matrix has 5 variables and is fine
    expect(gaussianRefusal(m, true)).toBeUndefined();
  });

  it('refuses a variable with fewer than 3 observed values, naming it', () => {
    const values = new Float64Array(10 * 3).fill(2);
    for (let i = 0; i < 10; i++) values[i * 3 + 1] = i % 3; // some spread
    for (let i = 2; i < 10; i++) values[i * 3 + 2] = NaN; // column 3: only 2 observed
    const m = toMatrix(values, 10, 3);
    expect(() => fitGaussian(m, settings())).toThrow(/at least 3 observed values.*column "c3" has only 2.*low-rank/);
  });

  it('refuses fewer than 3 rows', () => {
    const m = toMatrix(Float64Array.from([1, 2, 3, 4]), 2, 2);
    expect(() => fitGaussian(m, settings())).toThrow(/low-rank/);
  });

  it('refuses a fit whose iterations would be too slow, and an infinite value', () => {
    // common practice, no source: a refusal instead of a hang
    const { values } = panel(60, 6, 3, 0.4);
    expect(() =>
      emGaussian(values, 60, 6, { shrinkage: 0, maxIterations: 5, tolerance: 0, maxWorkPerIteration: 1000 }),
    ).toThrow(/operations per EM iteration.*low-rank/);
    const v = new Float64Array(values);
    v[7] = Infinity;
    expect(() => fitGaussian(toMatrix(v, 60, 6), settings())).toThrow(/row "r2", column "c2" is not a finite number/);
  });

  it('rejects a shrinkage outside [0, 1)', () => {
    const { values } = panel(30, 3, 1);
    expect(() => fitGaussian(toMatrix(values, 30, 3), settings({ shrinkage: 1 }))).toThrow(/shrinkage must be/);
  });
});

describe('fitGaussian output layer', () => {
  const n = 120;
  const p = 5;
  const { full, values } = panel(n, p, 21);
  const m = toMatrix(values, n, p, 1, 5, 0.5);

  it('is bit-for-bit deterministic', () => {
    // common practice, no source: a fit is a pure function of its input
    const a = fitGaussian(m, settings());
    const b = fitGaussian(m, settings());
    expect(Array.from(a.predictions)).toEqual(Array.from(b.predictions));
    expect(Array.from(a.spread!)).toEqual(Array.from(b.spread!));
    expect(a.objectiveTrace).toEqual(b.objectiveTrace);
  });

  it('keeps observed values, fills missing ones within the scale, reports spread and μ', () => {
    const r = fitGaussian(m, settings({ clipToScale: true, snapToStep: true }));
    expect(r.rank).toBe(0);
    expect(r.rowFactors.length).toBe(0);
    expect(r.rows).toBe(n);
    expect(r.cols).toBe(p);
    for (let c = 0; c < n * p; c++) {
      if (Number.isNaN(values[c])) {
        expect(r.predictions[c]).toBeGreaterThanOrEqual(1);
        expect(r.predictions[c]).toBeLessThanOrEqual(5);
        expect((r.predictions[c] * 2) % 1).toBe(0); // on the 0.5 step
        expect(r.spread![c]).toBeGreaterThan(0);
        // Source: conditional variance ≤ marginal variance (0.9² here), plus sampling slack
        expect(r.spread![c]).toBeLessThan(1.1);
      } else {
        expect(r.predictions[c]).toBe(values[c]);
        expect(r.spread![c]).toBe(0);
      }
      expect(r.baseline[c]).toBe(r.colBaseline[c % p]);
    }
    for (let i = 0; i < n; i++) expect(r.rowBaseline[i]).toBe(0);
  });

  it('fills held-out cells better than the column means on correlated data', () => {
    // Source: the conditional mean minimises expected squared error (regression on the
    // observed variables); with correlation 0.75 it must beat the marginal mean clearly.
    const r = fitGaussian(toMatrix(values, n, p), settings({ clipToScale: false }));
    let seModel = 0;
    let seMean = 0;
    for (let c = 0; c < n * p; c++) {
      if (!Number.isNaN(values[c])) continue;
      seModel += (r.predictions[c] - full[c]) ** 2;
      seMean += (r.colBaseline[c % p] - full[c]) ** 2;
    }
    expect(seModel).toBeLessThan(0.7 * seMean);
  });

  it('transposing the matrix and the option gives the same fit', () => {
    const r = fitGaussian(toMatrix(values, n, p), settings({ clipToScale: false }));
    const tv = new Float64Array(n * p);
    for (let i = 0; i < n; i++) for (let j = 0; j < p; j++) tv[j * n + i] = values[i * p + j];
    const t = fitGaussian(toMatrix(tv, p, n), settings({ clipToScale: false, transpose: true }));
    for (let i = 0; i < n; i++)
      for (let j = 0; j < p; j++) {
        expect(t.predictions[j * n + i]).toBe(r.predictions[i * p + j]);
        expect(t.spread![j * n + i]).toBe(r.spread![i * p + j]);
      }
    for (let j = 0; j < p; j++) expect(t.rowBaseline[j]).toBe(r.colBaseline[j]);
  });

  it('stops when asked (FitCancelledError) and reports progress each iteration', () => {
    let calls = 0;
    const seen: number[] = [];
    expect(() =>
      fitGaussian(toMatrix(values, n, p), settings({ tolerance: 0, maxIterations: 100 }), {
        shouldStop: () => ++calls > 3,
        onProgress: (pr) => seen.push(pr.iteration),
      }),
    ).toThrow(FitCancelledError);
    expect(seen).toEqual([1, 2, 3]);
    const r = fitGaussian(toMatrix(values, n, p), settings({ tolerance: 0, maxIterations: 4 }), {
      onProgress: (pr) => seen.push(pr.iteration),
    });
    expect(r.iterations).toBe(4);
    expect(r.converged).toBe(false);
    expect(r.objectiveTrace.length).toBe(4);
  });

  it('shrinkage pulls the fill toward the column means', () => {
    // Source: with Σ_jk → 0 off the diagonal the conditional mean tends to μ (no regression).
    const distance = (s: number) => {
      const r = fitGaussian(toMatrix(values, n, p), settings({ clipToScale: false, shrinkage: s }));
      let d = 0;
      for (let c = 0; c < n * p; c++)
        if (Number.isNaN(values[c])) d += Math.abs(r.predictions[c] - r.colBaseline[c % p]);
      return d;
    };
    expect(distance(0.9)).toBeLessThan(0.5 * distance(0));
  });
});
