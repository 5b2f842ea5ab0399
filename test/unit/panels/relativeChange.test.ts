import { describe, expect, it } from 'vitest';
import { relativeChanges } from '../../../src-renderer/charts/relativeChange';

describe('objective chart series', () => {
  it('is the relative change per iteration (definition, common practice, no source), blank where a log axis cannot draw it', () => {
    expect(relativeChanges([100, 50, 49.5, 49.5, NaN, 10])).toEqual([null, 0.5, 0.01, null, null, null]);
    // A log-likelihood (negative) works the same way.
    expect(relativeChanges([-200, -100])).toEqual([null, 0.5]);
  });
});
