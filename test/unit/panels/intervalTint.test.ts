import { describe, expect, it } from 'vitest';
import { estimateTint } from '../../../src-renderer/grid/overlayLayer';

describe('estimate tint', () => {
  it('follows the interval width from the narrowest (pale) to the widest (deep) blank cell', () => {
    // Common practice, no source: a sequential colour scale mapped linearly onto the data range.
    const layer = {
      predictions: new Float64Array(3),
      spread: Float64Array.from([9, 0, 0]),
      maxSpread: 9,
      width: Float64Array.from([2, 3, 4]),
      minWidth: 2,
      maxWidth: 4,
    };
    expect(estimateTint(layer, 0)).toBe('rgba(214, 138, 54, 0.060)');
    expect(estimateTint(layer, 1)).toBe('rgba(214, 138, 54, 0.240)');
    expect(estimateTint(layer, 2)).toBe('rgba(214, 138, 54, 0.420)');
    // Without intervals the spread decides, as before.
    const { width: _w, minWidth: _a, maxWidth: _b, ...spreadOnly } = layer;
    expect(estimateTint(spreadOnly, 0)).toBe('rgba(214, 138, 54, 0.420)');
  });
});
