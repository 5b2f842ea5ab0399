import { describe, expect, it } from 'vitest';
import { runDifference } from '../../../src-shared/engine/runDifference';

describe('difference between two runs', () => {
  // Hand-computed expectations (common practice, no source).
  it('is B − A on blank cells only, counting moves beyond one step', () => {
    const values = Float64Array.from([1, NaN, NaN, 3, NaN]);
    const a = Float64Array.from([1.1, 2.0, 4.0, 3.2, 5.0]);
    const b = Float64Array.from([0.9, 2.4, 2.5, 3.0, 6.5]);
    const r = runDifference(values, a, b, 1);
    expect(Number.isNaN(r.diff[0])).toBe(true);
    expect(Number.isNaN(r.diff[3])).toBe(true);
    expect(r.diff[1]).toBeCloseTo(0.4, 12);
    expect(r.diff[2]).toBeCloseTo(-1.5, 12);
    expect(r.diff[4]).toBeCloseTo(1.5, 12);
    expect(r.filled).toBe(3);
    expect(r.moved).toBe(2);
    expect(r.maxAbs).toBeCloseTo(1.5, 12);
    expect(r.meanAbs).toBeCloseTo((0.4 + 1.5 + 1.5) / 3, 12);
  });

  it('a move of exactly one step does not count; continuous scales use the threshold', () => {
    const values = Float64Array.from([NaN, NaN]);
    const r = runDifference(values, Float64Array.from([1, 1]), Float64Array.from([1.5, 1.6]), 0.5);
    expect(r.moved).toBe(1);
    const c = runDifference(values, Float64Array.from([1, 1]), Float64Array.from([1.5, 1.6]), 0, 0.55);
    expect(c.moved).toBe(1);
    expect(() => runDifference(values, Float64Array.from([1]), Float64Array.from([1, 2]), 1)).toThrow('differ in size');
  });
});
