/**
 * Baselines (the "centering" of the model), fitted on observed cells only.
 *
 *   none:   b_ij = 0
 *   row:    b_ij = r_i,  r_i = mean of row i's observed values (global mean μ for an empty row)
 *   column: b_ij = c_j,  c_j = mean of column j's observed values (μ for an empty column)
 *   both:   b_ij = μ + a_i + c_j, with the offsets minimizing
 *             ½ Σ_obs (y_ij − μ − a_i − c_j)² + γ/2 (Σ a_i² + Σ c_j²),   γ = offsetLambda,
 *           by alternating exact updates (block coordinate descent, each step lowers the loss):
 *             a_i ← Σ_{j∈obs(i)} (y_ij − μ − c_j) / (n_i + γ),
 *             c_j ← Σ_{i∈obs(j)} (y_ij − μ − a_i) / (m_j + γ),
 *           starting from c = 0 (or from a given warm start, e.g. the full data's offsets when
 *           fitting a fold), until the largest change of a sweep is below
 *           1e-10 · max(1, |μ|) or 200 sweeps. An empty row/column gets offset 0 (so the global mean).
 *
 * Every pass reads the observed cells only (compressed by row, then by column: sparseRatings.ts),
 * so a sweep costs O(observed), with each row's and each column's values contiguous.
 *
 * The result is expressed as b_ij = rowBaseline[i] + colBaseline[j] in every case
 * (row: colBaseline = 0; column: rowBaseline = 0; both: rowBaseline = μ + a_i, colBaseline = c_j).
 */
import type { Centering } from './types';
import type { SparseRatings } from '../matrix/sparseRatings';

export interface Baseline {
  rowBaseline: Float64Array;
  colBaseline: Float64Array;
  globalMean: number;
  /** Sweeps used by two-way centering (0 otherwise). */
  sweeps?: number;
}

export function fitBaseline(
  data: SparseRatings,
  centering: Centering,
  offsetLambda: number,
  warm?: Baseline,
): Baseline {
  const { rows, cols, rowPtr, rowCol, rowVal, colPtr, colRow, colVal } = data;
  const rowBaseline = new Float64Array(rows);
  const colBaseline = new Float64Array(cols);
  let total = 0;
  for (let p = 0; p < data.n; p++) total += rowVal[p];
  const mu = data.n > 0 ? total / data.n : 0;
  let sweeps = 0;

  if (centering === 'row') {
    for (let i = 0; i < rows; i++) {
      const a = rowPtr[i];
      const b = rowPtr[i + 1];
      if (b === a) {
        rowBaseline[i] = mu;
        continue;
      }
      let s = 0;
      for (let p = a; p < b; p++) s += rowVal[p];
      rowBaseline[i] = s / (b - a);
    }
  } else if (centering === 'column') {
    for (let j = 0; j < cols; j++) {
      const a = colPtr[j];
      const b = colPtr[j + 1];
      if (b === a) {
        colBaseline[j] = mu;
        continue;
      }
      let s = 0;
      for (let q = a; q < b; q++) s += colVal[q];
      colBaseline[j] = s / (b - a);
    }
  } else if (centering === 'both') {
    const gamma = offsetLambda;
    const rowOff = new Float64Array(rows);
    const colOff = colBaseline; // c_j, starts at 0 or at the warm start
    if (warm && warm.colBaseline.length === cols && warm.rowBaseline.length === rows) {
      colOff.set(warm.colBaseline);
      for (let i = 0; i < rows; i++) rowOff[i] = warm.rowBaseline[i] - warm.globalMean;
    }
    const stopAt = 1e-10 * Math.max(1, Math.abs(mu));
    for (let sweep = 0; sweep < 200; sweep++) {
      let change = 0;
      for (let i = 0; i < rows; i++) {
        const a = rowPtr[i];
        const b = rowPtr[i + 1];
        const den = b - a + gamma;
        if (!(den > 0)) continue;
        let s = 0;
        for (let p = a; p < b; p++) s += rowVal[p] - colOff[rowCol[p]];
        const v = (s - (b - a) * mu) / den;
        const d = Math.abs(v - rowOff[i]);
        if (d > change) change = d;
        rowOff[i] = v;
      }
      for (let j = 0; j < cols; j++) {
        const a = colPtr[j];
        const b = colPtr[j + 1];
        const den = b - a + gamma;
        if (!(den > 0)) continue;
        let s = 0;
        for (let q = a; q < b; q++) s += colVal[q] - rowOff[colRow[q]];
        const v = (s - (b - a) * mu) / den;
        const d = Math.abs(v - colOff[j]);
        if (d > change) change = d;
        colOff[j] = v;
      }
      sweeps = sweep + 1;
      if (change < stopAt) break;
    }
    for (let i = 0; i < rows; i++) rowBaseline[i] = mu + rowOff[i];
  }
  return { rowBaseline, colBaseline, globalMean: mu, sweeps };
}
