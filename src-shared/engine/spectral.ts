/**
 * Starting factors for the alternating fit.
 *
 * Spectral start (default). Let R be the residual matrix y − b on observed cells and 0
 * elsewhere, and p = (observed cells)/(rows·cols). Then A = R / p is an unbiased estimate
 * of the full residual matrix, and its top-k singular subspace is the start from which
 * alternating minimization provably recovers a low-rank matrix (Jain, Netrapalli &
 * Sanghavi, 2013). The subspace is found by seeded block power (subspace) iteration,
 * which only needs sparse products A·X and Aᵀ·Y:
 *   Y ← A X;  Y ← orth(Y);  X ← Aᵀ Y;  X ← orth(X)      (repeated `powerIterations` times)
 * With Q = orth(A X) (rows × k) and W = Aᵀ Q (cols × k), the rank-k estimate is Q Wᵀ.
 * Balancing it: eigen-decompose WᵀW = E diag(s²) Eᵀ (k × k, via ml-matrix), then
 *   U₀ = Q E diag(√s),   V₀ = W E diag(1/√s),   so U₀ V₀ᵀ = Q Wᵀ.
 * Returns undefined when `shouldStop` asks to stop (polled once per power iteration).
 * Directions with s ≈ 0 (e.g. k larger than the data's rank) get small seeded random
 * columns so the fit can still use them.
 *
 * Random start (option): entries N(0, σ²) with σ = (mean |residual| / √k)^{1/2}, so that
 * u·v starts on the scale of the residuals.
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import type { SparseRatings } from '../matrix/sparseRatings';
import { createRng, type Rng } from './random';

/** Modified Gram–Schmidt on the k columns of a row-major n × k matrix, in place. */
function orthonormalizeColumns(x: Float64Array, n: number, k: number, rng: Rng): void {
  for (let c = 0; c < k; c++) {
    for (let attempt = 0; attempt < 3; attempt++) {
      for (let prev = 0; prev < c; prev++) {
        let dot = 0;
        for (let i = 0; i < n; i++) dot += x[i * k + c] * x[i * k + prev];
        for (let i = 0; i < n; i++) x[i * k + c] -= dot * x[i * k + prev];
      }
      let norm = 0;
      for (let i = 0; i < n; i++) norm += x[i * k + c] * x[i * k + c];
      norm = Math.sqrt(norm);
      if (norm > 1e-12) {
        for (let i = 0; i < n; i++) x[i * k + c] /= norm;
        break;
      }
      // Degenerate direction: replace by a random vector and orthogonalize again.
      for (let i = 0; i < n; i++) x[i * k + c] = rng.normal();
      if (attempt === 2 || c >= n) {
        for (let i = 0; i < n; i++) x[i * k + c] = 0;
      }
    }
  }
}

/** out (rows × k) = A X, A = residuals/p in row-compressed form, X cols × k. */
function multiplyA(
  idx: SparseRatings,
  resRow: Float64Array,
  invP: number,
  x: Float64Array,
  k: number,
  out: Float64Array,
): void {
  out.fill(0);
  const { rows, rowPtr, rowCol } = idx;
  for (let i = 0; i < rows; i++) {
    const oi = i * k;
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      const r = resRow[p] * invP;
      const xj = rowCol[p] * k;
      for (let c = 0; c < k; c++) out[oi + c] += r * x[xj + c];
    }
  }
}

/** out (cols × k) = Aᵀ Y, using the row-compressed form. */
function multiplyAt(
  idx: SparseRatings,
  resRow: Float64Array,
  invP: number,
  y: Float64Array,
  k: number,
  out: Float64Array,
): void {
  out.fill(0);
  const { rows, rowPtr, rowCol } = idx;
  for (let i = 0; i < rows; i++) {
    const yi = i * k;
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      const r = resRow[p] * invP;
      const oj = rowCol[p] * k;
      for (let c = 0; c < k; c++) out[oj + c] += r * y[yi + c];
    }
  }
}

export interface Factors {
  rowFactors: Float64Array;
  colFactors: Float64Array;
}

export function spectralStart(
  idx: SparseRatings,
  resRow: Float64Array,
  k: number,
  seed: number,
  powerIterations = 12,
  shouldStop?: () => boolean,
): Factors | undefined {
  const { rows, cols, n } = idx;
  const rng = createRng(seed);
  const invP = n > 0 ? (rows * cols) / n : 1;
  const x = new Float64Array(cols * k);
  for (let t = 0; t < x.length; t++) x[t] = rng.normal();
  orthonormalizeColumns(x, cols, k, rng);
  const q = new Float64Array(rows * k);
  for (let it = 0; it < powerIterations; it++) {
    if (shouldStop && shouldStop()) return undefined;
    multiplyA(idx, resRow, invP, x, k, q);
    orthonormalizeColumns(q, rows, k, rng);
    multiplyAt(idx, resRow, invP, q, k, x);
    if (it < powerIterations - 1) orthonormalizeColumns(x, cols, k, rng);
  }
  // x now holds W = Aᵀ Q (cols × k).
  const w = x;
  const gram = new Matrix(k, k);
  for (let a = 0; a < k; a++) {
    for (let b = a; b < k; b++) {
      let s = 0;
      for (let j = 0; j < cols; j++) s += w[j * k + a] * w[j * k + b];
      gram.set(a, b, s);
      gram.set(b, a, s);
    }
  }
  const evd = new EigenvalueDecomposition(gram, { assumeSymmetric: true });
  const e = evd.eigenvectorMatrix;
  const ev = evd.realEigenvalues;
  const rowFactors = new Float64Array(rows * k);
  const colFactors = new Float64Array(cols * k);
  let maxS = 0;
  for (let c = 0; c < k; c++) maxS = Math.max(maxS, Math.sqrt(Math.max(ev[c], 0)));
  for (let c = 0; c < k; c++) {
    const s = Math.sqrt(Math.max(ev[c], 0));
    if (s > 1e-9 * Math.max(maxS, 1e-300) && s > 0) {
      const su = Math.sqrt(s);
      for (let i = 0; i < rows; i++) {
        let acc = 0;
        for (let m = 0; m < k; m++) acc += q[i * k + m] * e.get(m, c);
        rowFactors[i * k + c] = acc * su;
      }
      for (let j = 0; j < cols; j++) {
        let acc = 0;
        for (let m = 0; m < k; m++) acc += w[j * k + m] * e.get(m, c);
        colFactors[j * k + c] = acc / su;
      }
    } else {
      const tiny = 1e-3 * Math.sqrt(Math.max(maxS, 1e-6) / Math.max(rows, cols));
      for (let i = 0; i < rows; i++) rowFactors[i * k + c] = tiny * rng.normal();
      for (let j = 0; j < cols; j++) colFactors[j * k + c] = tiny * rng.normal();
    }
  }
  return { rowFactors, colFactors };
}

export function randomStart(idx: SparseRatings, resRow: Float64Array, k: number, seed: number): Factors {
  const rng = createRng(seed);
  let meanAbs = 0;
  for (let p = 0; p < idx.n; p++) meanAbs += Math.abs(resRow[p]);
  meanAbs = idx.n > 0 ? meanAbs / idx.n : 1;
  const sigma = Math.sqrt(Math.max(meanAbs, 1e-3) / Math.sqrt(Math.max(k, 1)));
  const rowFactors = new Float64Array(idx.rows * k);
  const colFactors = new Float64Array(idx.cols * k);
  for (let t = 0; t < rowFactors.length; t++) rowFactors[t] = sigma * rng.normal();
  for (let t = 0; t < colFactors.length; t++) colFactors[t] = sigma * rng.normal();
  return { rowFactors, colFactors };
}
