/**
 * Turning a fitted model into per-cell output.
 *
 *   baseline_ij   = rowBaseline_i + colBaseline_j
 *   prediction_ij = baseline_ij + u_i · v_j, then, if asked,
 *     snapped:  min + round((x − min)/step)·step   (only when step > 0)
 *     clipped:  min(max(x, scale.min), scale.max)
 * The filled matrix keeps observed values and takes the prediction elsewhere.
 * A job on sparse storage predicts only the cells it needs (predictCells: the held-out
 * cells of a fold; predictRow: one row at a time into a reused buffer).
 */
import type { RatingScale } from '../matrix/ratingMatrix';
import type { SparseFit } from './types';

/** Whether the settings ask for clipping / snapping (the Gaussian family has the same two flags). */
function clipSnapFlags(fit: SparseFit): { clip: boolean; snap: boolean } {
  return { clip: fit.settings.clipToScale, snap: fit.settings.snapToStep };
}

/** p_c for the cells (rowIdx[t], colIdx[t]), t < count, into out[t]. */
export function predictCells(
  fit: SparseFit,
  scale: RatingScale,
  rowIdx: Int32Array,
  colIdx: Int32Array,
  out: Float64Array,
  count = rowIdx.length,
): Float64Array {
  const { rowBaseline, colBaseline, rowFactors: u, colFactors: v, rank: k } = fit;
  const { clip, snap } = clipSnapFlags(fit);
  for (let t = 0; t < count; t++) {
    const i = rowIdx[t];
    const j = colIdx[t];
    const ui = i * k;
    const vj = j * k;
    let dot = 0;
    for (let c = 0; c < k; c++) dot += u[ui + c] * v[vj + c];
    out[t] = clipSnap(rowBaseline[i] + colBaseline[j] + dot, scale, clip, snap);
  }
  return out;
}

/** Row i's predictions for every column into out (length cols). */
export function predictRow(fit: SparseFit, scale: RatingScale, i: number, out: Float64Array): void {
  const { rowBaseline, colBaseline, rowFactors: u, colFactors: v, rank: k, cols } = fit;
  const { clip, snap } = clipSnapFlags(fit);
  const rb = rowBaseline[i];
  const ui = i * k;
  for (let j = 0; j < cols; j++) {
    const vj = j * k;
    let dot = 0;
    for (let c = 0; c < k; c++) dot += u[ui + c] * v[vj + c];
    out[j] = clipSnap(rb + colBaseline[j] + dot, scale, clip, snap);
  }
}

export function clipSnap(x: number, scale: RatingScale, clip: boolean, snap: boolean): number {
  let y = x;
  if (snap && scale.step > 0 && Number.isFinite(scale.min))
    y = scale.min + Math.round((y - scale.min) / scale.step) * scale.step;
  if (clip) {
    if (y < scale.min) y = scale.min;
    if (y > scale.max) y = scale.max;
  }
  return y;
}

export function makePredictions(
  rows: number,
  cols: number,
  rowBaseline: Float64Array,
  colBaseline: Float64Array,
  u: Float64Array,
  v: Float64Array,
  k: number,
  scale: RatingScale,
  clip: boolean,
  snap: boolean,
): { predictions: Float64Array; baseline: Float64Array } {
  const predictions = new Float64Array(rows * cols);
  const baseline = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++) {
    const rb = rowBaseline[i];
    const ui = i * k;
    for (let j = 0; j < cols; j++) {
      const b = rb + colBaseline[j];
      const vj = j * k;
      let dot = 0;
      for (let c = 0; c < k; c++) dot += u[ui + c] * v[vj + c];
      baseline[i * cols + j] = b;
      predictions[i * cols + j] = clipSnap(b + dot, scale, clip, snap);
    }
  }
  return { predictions, baseline };
}
