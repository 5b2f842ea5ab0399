/**
 * Regularized low-rank fit by alternating least squares (ALS).
 *
 * Model: p_ij = b_ij + u_i · v_j, with b from baseline.ts, U rows × k and V cols × k.
 * Residuals on observed cells: r_ij = y_ij − b_ij. Objective
 *   F(U, V) = ½ Σ_obs (r_ij − u_i·v_j)² + λ/2 (Σ_i w_i ‖u_i‖² + Σ_j w_j ‖v_j‖²),
 * where w = 1, or w_i = n_i (row i's observed count) and w_j = m_j when
 * `scaleLambdaByCount` is set.
 *
 * Half-step for rows (V fixed): each u_i solves its own ridge problem exactly,
 *   (Σ_{j∈obs(i)} v_j v_jᵀ + λ w_i I) u_i = Σ_{j∈obs(i)} r_ij v_j,
 * i.e. u_i = (XᵀX + λ w_i I)⁻¹ Xᵀ y with X the rows v_j of the observed columns;
 * the k × k system is factored with an in-place Cholesky (cholesky.ts). Then the same
 * for every column with U fixed. Each half-step minimizes F exactly in its block, so F
 * never increases (up to rounding).
 * A row/column with no observed values has only the regularizer acting on it, so its
 * factor is the zero vector and its prediction is the baseline. When λ w = 0 and the
 * normal matrix is singular (fewer observations than k, or collinear factors), a tiny
 * ridge ε = 1e-10 · (trace/k + 1) is added and the solve retried (×100 up to 4 times).
 *
 * Stop after `maxIterations` full sweeps or when |F_prev − F| / max(F_prev, 1e-300) <
 * `tolerance`. F is recorded after every sweep (F₀, the value at the start, is not).
 * Rank 0: no factors; predictions are the baseline; the trace holds ½ Σ r².
 * Failure: a non-finite F, or F growing above 1e6 · max(F₀, 1) or increasing (relative
 * > 1e-6) for 5 sweeps in a row, ends the fit with FitFailedError.
 */
import type { FitProgress, FitResult, LowRankSettings } from './types';
import type { RatingMatrix } from '../matrix/ratingMatrix';
import { buildObservedIndex, findNonFinite, type ObservedIndex } from './observed';
import { fitBaseline } from './baseline';
import { choleskyInPlace, choleskySolveInPlace } from './cholesky';
import { randomStart, spectralStart } from './spectral';
import { makePredictions } from './predictions';
import { FitCancelledError, FitFailedError } from './errors';
import { nowMs } from './clock';

export interface FitOptions {
  onProgress?: (p: FitProgress) => void;
  shouldStop?: () => boolean;
  warmStart?: { rowFactors: Float64Array; colFactors: Float64Array };
}

/** Reusable buffers for one half-step (k × k normal matrix, its copy and the right side). */
export interface RidgeWorkspace {
  k: number;
  a: Float64Array;
  a0: Float64Array;
  rhs: Float64Array;
}

export function createWorkspace(k: number): RidgeWorkspace {
  return { k, a: new Float64Array(k * k), a0: new Float64Array(k * k), rhs: new Float64Array(k) };
}

/**
 * One ALS half-step: for every entity e (a row, or a column), solve
 *   (Σ_{t∈[ptr[e], ptr[e+1])} x_t x_tᵀ + λ w_e I) out_e = Σ_t res[t] x_t,   x_t = other[nbr[t]].
 * `out` is entities × k, `other` is neighbours × k (row-major). Returns false if stopped.
 */
export function ridgeHalfStep(
  out: Float64Array,
  other: Float64Array,
  ptr: Int32Array,
  nbr: Int32Array,
  res: Float64Array,
  lambda: number,
  scaleByCount: boolean,
  ws: RidgeWorkspace,
  shouldStop?: () => boolean,
): boolean {
  const k = ws.k;
  const { a, a0, rhs } = ws;
  const entities = ptr.length - 1;
  for (let e = 0; e < entities; e++) {
    if (shouldStop !== undefined && (e & 63) === 0 && shouldStop()) return false;
    const start = ptr[e];
    const end = ptr[e + 1];
    const oe = e * k;
    if (end === start) {
      for (let c = 0; c < k; c++) out[oe + c] = 0;
      continue;
    }
    a.fill(0);
    rhs.fill(0);
    for (let t = start; t < end; t++) {
      const xo = nbr[t] * k;
      const r = res[t];
      for (let c = 0; c < k; c++) {
        const xc = other[xo + c];
        rhs[c] += r * xc;
        const rc = c * k;
        for (let d = 0; d <= c; d++) a[rc + d] += xc * other[xo + d];
      }
    }
    const reg = scaleByCount ? lambda * (end - start) : lambda;
    let trace = 0;
    for (let c = 0; c < k; c++) {
      a[c * k + c] += reg;
      trace += a[c * k + c];
    }
    let ok = choleskyInPlace(a, k);
    if (!ok) {
      // Rebuild from scratch with a tiny ridge and retry.
      let eps = 1e-10 * (trace / k + 1);
      for (let attempt = 0; attempt < 4 && !ok; attempt++, eps *= 100) {
        a0.fill(0);
        for (let t = start; t < end; t++) {
          const xo = nbr[t] * k;
          for (let c = 0; c < k; c++) {
            const xc = other[xo + c];
            const rc = c * k;
            for (let d = 0; d <= c; d++) a0[rc + d] += xc * other[xo + d];
          }
        }
        for (let c = 0; c < k; c++) a0[c * k + c] += reg + eps;
        a.set(a0);
        ok = choleskyInPlace(a, k);
      }
      if (!ok) {
        for (let c = 0; c < k; c++) out[oe + c] = 0;
        continue;
      }
    }
    choleskySolveInPlace(a, k, rhs);
    for (let c = 0; c < k; c++) out[oe + c] = rhs[c];
  }
  return true;
}

/** F(U, V) as in the header. */
export function lowRankObjective(
  idx: ObservedIndex,
  resRow: Float64Array,
  u: Float64Array,
  v: Float64Array,
  k: number,
  lambda: number,
  scaleByCount: boolean,
): number {
  const { rows, cols, rowPtr, rowCol, colPtr } = idx;
  let loss = 0;
  let pen = 0;
  for (let i = 0; i < rows; i++) {
    const ui = i * k;
    let nu = 0;
    for (let c = 0; c < k; c++) nu += u[ui + c] * u[ui + c];
    pen += (scaleByCount ? rowPtr[i + 1] - rowPtr[i] : 1) * nu;
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      const vj = rowCol[p] * k;
      let dot = 0;
      for (let c = 0; c < k; c++) dot += u[ui + c] * v[vj + c];
      const e = resRow[p] - dot;
      loss += e * e;
    }
  }
  for (let j = 0; j < cols; j++) {
    const vj = j * k;
    let nv = 0;
    for (let c = 0; c < k; c++) nv += v[vj + c] * v[vj + c];
    pen += (scaleByCount ? colPtr[j + 1] - colPtr[j] : 1) * nv;
  }
  return 0.5 * loss + 0.5 * lambda * pen;
}

function validate(s: LowRankSettings): void {
  if (!Number.isInteger(s.rank) || s.rank < 0) throw new FitFailedError(`rank must be a whole number ≥ 0 (got ${s.rank})`);
  if (!(s.lambda >= 0) || !Number.isFinite(s.lambda)) throw new FitFailedError(`lambda must be a finite number ≥ 0 (got ${s.lambda})`);
  if (!(s.offsetLambda >= 0) || !Number.isFinite(s.offsetLambda)) throw new FitFailedError(`offset lambda must be a finite number ≥ 0 (got ${s.offsetLambda})`);
  if (!Number.isInteger(s.maxIterations) || s.maxIterations < 0) throw new FitFailedError(`iterations must be a whole number ≥ 0 (got ${s.maxIterations})`);
  if (!(s.tolerance >= 0)) throw new FitFailedError(`tolerance must be ≥ 0 (got ${s.tolerance})`);
}

export function fitLowRank(matrix: RatingMatrix, settings: LowRankSettings, opts: FitOptions = {}): FitResult {
  const t0 = nowMs();
  validate(settings);
  const rows = matrix.rowLabels.length;
  const cols = matrix.colLabels.length;
  const values = matrix.values;
  if (values.length !== rows * cols) throw new FitFailedError(`matrix has ${values.length} values for ${rows} × ${cols} cells`);
  const bad = findNonFinite(values, cols);
  if (bad) throw new FitFailedError(`non-finite value at row ${bad.row + 1}, column ${bad.col + 1}`);
  const idx = buildObservedIndex(values, rows, cols);
  if (idx.n === 0) throw new FitFailedError('the matrix has no observed values');
  const k = settings.rank;
  const lambda = settings.lambda;
  const scaleByCount = settings.scaleLambdaByCount;

  const base = fitBaseline(values, idx, settings.centering, settings.offsetLambda);
  const resRow = new Float64Array(idx.n);
  for (let p = 0; p < idx.n; p++) {
    const cell = idx.rowCell[p];
    const i = (cell / cols) | 0;
    resRow[p] = values[cell] - base.rowBaseline[i] - base.colBaseline[idx.rowCol[p]];
  }
  const resCol = new Float64Array(idx.n);
  for (let q = 0; q < idx.n; q++) {
    const cell = idx.colCell[q];
    const j = cell % cols;
    resCol[q] = values[cell] - base.rowBaseline[idx.colRow[q]] - base.colBaseline[j];
  }

  const trace: number[] = [];
  let iterations = 0;
  let converged = false;
  let u: Float64Array;
  let v: Float64Array;
  if (k === 0) {
    u = new Float64Array(0);
    v = new Float64Array(0);
    trace.push(lowRankObjective(idx, resRow, u, v, 0, lambda, scaleByCount));
    converged = true;
  } else {
    const ws = opts.warmStart;
    if (ws && ws.rowFactors.length === rows * k && ws.colFactors.length === cols * k) {
      u = new Float64Array(ws.rowFactors);
      v = new Float64Array(ws.colFactors);
    } else {
      const start =
        settings.init === 'random'
          ? randomStart(idx, resRow, k, settings.seed)
          : spectralStart(idx, resRow, k, settings.seed);
      u = start.rowFactors;
      v = start.colFactors;
    }
    const work = createWorkspace(k);
    const stop = opts.shouldStop;
    const f0 = lowRankObjective(idx, resRow, u, v, k, lambda, scaleByCount);
    if (!Number.isFinite(f0)) throw new FitFailedError('the starting objective is not finite');
    let prev = f0;
    let rising = 0;
    for (let it = 1; it <= settings.maxIterations; it++) {
      if (stop && stop()) throw new FitCancelledError();
      if (!ridgeHalfStep(u, v, idx.rowPtr, idx.rowCol, resRow, lambda, scaleByCount, work, stop)) throw new FitCancelledError();
      if (!ridgeHalfStep(v, u, idx.colPtr, idx.colRow, resCol, lambda, scaleByCount, work, stop)) throw new FitCancelledError();
      const f = lowRankObjective(idx, resRow, u, v, k, lambda, scaleByCount);
      trace.push(f);
      iterations = it;
      if (!Number.isFinite(f)) throw new FitFailedError(`the fit produced a non-finite objective at iteration ${it}`);
      if (f > 1e6 * Math.max(f0, 1)) throw new FitFailedError(`the objective is diverging (iteration ${it}: ${f.toPrecision(4)})`);
      if (f > prev * (1 + 1e-6)) {
        rising++;
        if (rising >= 5) throw new FitFailedError(`the objective is diverging (rose for 5 iterations, now ${f.toPrecision(4)})`);
      } else rising = 0;
      opts.onProgress?.({ iteration: it, objective: f, elapsedMs: nowMs() - t0 });
      const rel = Math.abs(prev - f) / Math.max(Math.abs(prev), 1e-300);
      prev = f;
      if (rel < settings.tolerance) {
        converged = true;
        break;
      }
    }
  }
  const pred = makePredictions(rows, cols, base.rowBaseline, base.colBaseline, u, v, k, matrix.scale, settings.clipToScale, settings.snapToStep);
  for (let c = 0; c < pred.predictions.length; c++) {
    if (!Number.isFinite(pred.predictions[c])) {
      throw new FitFailedError(`the fit produced a non-finite prediction at row ${Math.floor(c / cols) + 1}, column ${(c % cols) + 1}`);
    }
  }
  return {
    settings: { ...settings },
    rows,
    cols,
    predictions: pred.predictions,
    baseline: pred.baseline,
    rowBaseline: base.rowBaseline,
    colBaseline: base.colBaseline,
    globalMean: base.globalMean,
    rowFactors: u,
    colFactors: v,
    rank: k,
    objectiveTrace: trace,
    iterations,
    converged,
    elapsedMs: nowMs() - t0,
  };
}
