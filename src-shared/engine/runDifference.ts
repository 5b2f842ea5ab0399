/**
 * Difference between two runs on the filled cells: d_ij = p^B_ij − p^A_ij for
 * every cell blank in the data (observed cells are not estimates and get NaN).
 * "Moved" counts the filled cells with |d_ij| greater than one scale step (or
 * than `threshold` when the scale is continuous).
 */
export interface RunDifference {
  diff: Float64Array;
  filled: number;
  moved: number;
  threshold: number;
  maxAbs: number;
  meanAbs: number;
}

export function runDifference(
  values: Float64Array,
  a: Float64Array,
  b: Float64Array,
  step: number,
  continuousThreshold = 0.5,
): RunDifference {
  if (a.length !== values.length || b.length !== values.length) throw new Error('runs and matrix differ in size');
  const threshold = step > 0 ? step : continuousThreshold;
  const diff = new Float64Array(values.length);
  let filled = 0;
  let moved = 0;
  let maxAbs = 0;
  let sumAbs = 0;
  for (let c = 0; c < values.length; c++) {
    if (values[c] === values[c]) {
      diff[c] = NaN;
      continue;
    }
    const d = b[c] - a[c];
    diff[c] = d;
    filled++;
    const ad = Math.abs(d);
    sumAbs += ad;
    if (ad > maxAbs) maxAbs = ad;
    if (ad > threshold + 1e-12) moved++;
  }
  return { diff, filled, moved, threshold, maxAbs, meanAbs: filled ? sumAbs / filled : 0 };
}
