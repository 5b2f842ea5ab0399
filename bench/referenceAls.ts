/**
 * Plain reference ALS for the benchmark only: the textbook loop, one ml-matrix solve per
 * row and per column, building X (observed neighbours' factors) as a fresh Matrix each
 * time. Same objective and update as src-shared/engine/lowRank.ts (centering none), so
 * the per-iteration time ratio measures the hand-written kernel, not a different method.
 */
import { Matrix, solve } from 'ml-matrix';
import type { SparseRatings } from '../src-shared/matrix/sparseRatings';

export function referenceHalfStep(
  out: Float64Array,
  other: Float64Array,
  ptr: Int32Array,
  nbr: Int32Array,
  res: Float64Array,
  k: number,
  lambda: number,
): void {
  const entities = ptr.length - 1;
  for (let e = 0; e < entities; e++) {
    const start = ptr[e];
    const end = ptr[e + 1];
    if (end === start) {
      for (let c = 0; c < k; c++) out[e * k + c] = 0;
      continue;
    }
    const x = new Matrix(end - start, k);
    const y = new Matrix(end - start, 1);
    for (let t = start; t < end; t++) {
      for (let c = 0; c < k; c++) x.set(t - start, c, other[nbr[t] * k + c]);
      y.set(t - start, 0, res[t]);
    }
    const xt = x.transpose();
    const a = xt.mmul(x).add(Matrix.eye(k).mul(lambda));
    const sol = solve(a, xt.mmul(y));
    for (let c = 0; c < k; c++) out[e * k + c] = sol.get(c, 0);
  }
}

/** One full reference sweep (rows then columns). */
export function referenceSweep(
  idx: SparseRatings,
  resRow: Float64Array,
  resCol: Float64Array,
  u: Float64Array,
  v: Float64Array,
  k: number,
  lambda: number,
): void {
  referenceHalfStep(u, v, idx.rowPtr, idx.rowCol, resRow, k, lambda);
  referenceHalfStep(v, u, idx.colPtr, idx.colRow, resCol, k, lambda);
}
