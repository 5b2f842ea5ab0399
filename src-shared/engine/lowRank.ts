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
 * the k × k system is factored with an in-place Cholesky (cholesky.ts). An entity with
 * fewer neighbours than k (n < k) and λ w > 0 uses the equivalent dual form instead,
 *   u_i = Xᵀ (X Xᵀ + λ w_i I)⁻¹ y      (push-through identity: (XᵀX + λI)⁻¹Xᵀ = Xᵀ(XXᵀ + λI)⁻¹),
 * an n × n system: the same solution for a fraction of the work on sparse rows.
 * Then the same for every column with U fixed. Each half-step minimizes F exactly in its block, so F
 * never increases (up to rounding).
 * A row/column with no observed values has only the regularizer acting on it, so its
 * factor is the zero vector and its prediction is the baseline. When λ w = 0 and the
 * normal matrix is singular (fewer observations than k, or collinear factors), a tiny
 * ridge ε = 1e-10 · (trace/k + 1) is added and the solve retried (×100 up to 4 times).
 *
 * The loss part of F is collected during the column half-step at no extra pass: with
 * v_j solving (G + ρI) v = b (G = XᵀX, b = Xᵀr, ρ = λ w_j), Σ_t (r_t − x_t·v)² = r·r − v·b − ρ‖v‖²
 * (falling back to the direct sum when that difference is below 1e-9 · r·r, where it would
 * lose digits), and in the dual form the residual is ρ z, so the loss is ρ²‖z‖².
 * Stop after `maxIterations` full sweeps or when |F_prev − F| / max(F_prev, φ) <
 * `tolerance`, or at once when F ≤ φ: the absolute floor φ = 1e-20 · max(S, F₀), with
 * S = ½ Σ_obs r² the objective of the zero factors (the data's own scale). Below φ the fit
 * is exact to about 1e-10 of the residuals' size and what is left of F is rounding noise,
 * which may go up as well as down; it counts as converged, never as growth.
 * F is recorded after every sweep (F₀, the value at the start, is not).
 * Rank 0: no factors; predictions are the baseline; the trace holds ½ Σ r².
 * Failure: a non-finite F, or F growing above 1e6 · max(F₀, 1) or increasing (relative
 * > 1e-6 and by more than φ) for 5 sweeps in a row, ends the fit with FitFailedError.
 */
import type { FitProgress, FitResult, LowRankSettings, SparseFit } from './types';
import type { RatingMatrix } from '../matrix/ratingMatrix';
import { findNonFiniteEntry, sparseFromDense, type SparseRatings } from '../matrix/sparseRatings';
import { findNonFinite } from './observed';
import { fitBaseline, type Baseline } from './baseline';
import { choleskyInPlace, choleskySolveInPlace } from './cholesky';
import { randomStart, spectralStart } from './spectral';
import { makePredictions } from './predictions';
import { FitCancelledError, FitFailedError } from './errors';
import { nowMs } from './clock';

export interface FitOptions {
  onProgress?: (p: FitProgress) => void;
  shouldStop?: () => boolean;
  warmStart?: { rowFactors: Float64Array; colFactors: Float64Array };
  /** The baseline of this data and centering when already fitted (reused across settings). */
  baseline?: Baseline;
  /** Warm start for the two-way baseline's sweeps (e.g. the full data's offsets for a fold). */
  baselineStart?: Baseline;
}

/**
 * Reusable buffers for one half-step: the k × k normal matrix and the right side, plus a
 * column-major gather buffer xt (k × degree) of the neighbours' factors, so that every
 * entry of XᵀX and Xᵀy is a contiguous dot product with its sum kept in a register.
 */
export interface RidgeWorkspace {
  k: number;
  a: Float64Array;
  rhs: Float64Array;
  /** Dual-form right side / solution (length k; only n < k entries are used). */
  z: Float64Array;
  /** Copy of Xᵀr kept through the solve, for the loss identity. */
  b: Float64Array;
  /** Σ over the last half-step's entities of Σ_t (r_t − x_t·out_e)². */
  loss: number;
  xt: Float64Array;
  r: Float64Array;
}

export function createWorkspace(k: number, maxDegree = 64): RidgeWorkspace {
  const cap = Math.max(1, maxDegree);
  return {
    k,
    a: new Float64Array(k * k),
    rhs: new Float64Array(k),
    z: new Float64Array(k),
    b: new Float64Array(k),
    loss: 0,
    xt: new Float64Array(k * cap),
    r: new Float64Array(cap),
  };
}

/** Largest number of neighbours of any entity (row or column) described by ptr. */
function maxDegree(ptr: Int32Array): number {
  let m = 0;
  for (let e = 0; e + 1 < ptr.length; e++) m = Math.max(m, ptr[e + 1] - ptr[e]);
  return m;
}

/**
 * Row c of the lower triangle of XᵀX from the column-major gather xt (k × n):
 * a[c·k + d] = Σ_t xt[c·n + t]·xt[d·n + t] for d ≤ c. Four columns d are summed at once
 * (four independent accumulators share each load of xt[c·n + t]), which keeps the
 * floating-point adder busy instead of waiting on one dependency chain.
 */
function gramRow(xt: Float64Array, n: number, c: number, a: Float64Array, k: number): void {
  const cn = c * n;
  const rc = c * k;
  let d = 0;
  for (; d + 3 <= c; d += 4) {
    const d0 = d * n;
    const d1 = d0 + n;
    const d2 = d1 + n;
    const d3 = d2 + n;
    let s0 = 0;
    let s1 = 0;
    let s2 = 0;
    let s3 = 0;
    for (let t = 0; t < n; t++) {
      const x = xt[cn + t];
      s0 += x * xt[d0 + t];
      s1 += x * xt[d1 + t];
      s2 += x * xt[d2 + t];
      s3 += x * xt[d3 + t];
    }
    a[rc + d] = s0;
    a[rc + d + 1] = s1;
    a[rc + d + 2] = s2;
    a[rc + d + 3] = s3;
  }
  for (; d <= c; d++) {
    const dn = d * n;
    let s = 0;
    for (let t = 0; t < n; t++) s += xt[cn + t] * xt[dn + t];
    a[rc + d] = s;
  }
}

/**
 * Rows c and c+1 of the lower triangle of XᵀX at once (2 × 4 register block: eight
 * accumulators share six loads per step), then the leftover entries.
 */
function gramRowPair(xt: Float64Array, n: number, c: number, a: Float64Array, k: number): void {
  const an = c * n;
  const bn = an + n;
  const ra = c * k;
  const rb = ra + k;
  let d = 0;
  for (; d + 3 <= c; d += 4) {
    const d0 = d * n;
    const d1 = d0 + n;
    const d2 = d1 + n;
    const d3 = d2 + n;
    let a0 = 0;
    let a1 = 0;
    let a2 = 0;
    let a3 = 0;
    let b0 = 0;
    let b1 = 0;
    let b2 = 0;
    let b3 = 0;
    for (let t = 0; t < n; t++) {
      const x = xt[an + t];
      const y = xt[bn + t];
      const z0 = xt[d0 + t];
      const z1 = xt[d1 + t];
      const z2 = xt[d2 + t];
      const z3 = xt[d3 + t];
      a0 += x * z0;
      a1 += x * z1;
      a2 += x * z2;
      a3 += x * z3;
      b0 += y * z0;
      b1 += y * z1;
      b2 += y * z2;
      b3 += y * z3;
    }
    a[ra + d] = a0;
    a[ra + d + 1] = a1;
    a[ra + d + 2] = a2;
    a[ra + d + 3] = a3;
    a[rb + d] = b0;
    a[rb + d + 1] = b1;
    a[rb + d + 2] = b2;
    a[rb + d + 3] = b3;
  }
  for (; d <= c; d++) {
    const dn = d * n;
    let sa = 0;
    let sb = 0;
    for (let t = 0; t < n; t++) {
      const z = xt[dn + t];
      sa += xt[an + t] * z;
      sb += xt[bn + t] * z;
    }
    a[ra + d] = sa;
    a[rb + d] = sb;
  }
  let sbb = 0;
  for (let t = 0; t < n; t++) sbb += xt[bn + t] * xt[bn + t];
  a[rb + c + 1] = sbb;
}

/** Lower triangle of XᵀX (see gramRow / gramRowPair). */
function gram(xt: Float64Array, n: number, a: Float64Array, k: number): void {
  let c = 0;
  for (; c + 1 < k; c += 2) gramRowPair(xt, n, c, a, k);
  if (c < k) gramRow(xt, n, c, a, k);
}

/**
 * Dual form for an entity with n < k neighbours (see the header):
 *   G = X Xᵀ + reg I (n × n, G_pq = x_p · x_q),  G z = y,  out_e = Xᵀ z = Σ_p z_p x_p.
 * G is positive definite for reg > 0, so the Cholesky cannot fail.
 */
function dualSolve(
  other: Float64Array,
  nbr: Int32Array,
  res: Float64Array,
  start: number,
  n: number,
  reg: number,
  ws: RidgeWorkspace,
  out: Float64Array,
  oe: number,
): void {
  const k = ws.k;
  const g = ws.a;
  const z = ws.z;
  for (let p = 0; p < n; p++) {
    const xp = nbr[start + p] * k;
    const rp = p * n;
    for (let q = 0; q <= p; q++) {
      const xq = nbr[start + q] * k;
      let s = 0;
      for (let c = 0; c < k; c++) s += other[xp + c] * other[xq + c];
      g[rp + q] = s;
    }
    g[rp + p] += reg;
    z[p] = res[start + p];
  }
  choleskyInPlace(g, n);
  choleskySolveInPlace(g, n, z);
  let zz = 0;
  for (let p = 0; p < n; p++) zz += z[p] * z[p];
  ws.loss += reg * reg * zz;
  for (let c = 0; c < k; c++) out[oe + c] = 0;
  for (let p = 0; p < n; p++) {
    const xp = nbr[start + p] * k;
    const zp = z[p];
    for (let c = 0; c < k; c++) out[oe + c] += zp * other[xp + c];
  }
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
  const { a, rhs } = ws;
  const entities = ptr.length - 1;
  const need = maxDegree(ptr);
  if (ws.r.length < need) {
    ws.xt = new Float64Array(k * need);
    ws.r = new Float64Array(need);
  }
  const xt = ws.xt;
  const r = ws.r;
  ws.loss = 0;
  for (let e = 0; e < entities; e++) {
    if (shouldStop !== undefined && (e & 63) === 0 && shouldStop()) return false;
    const start = ptr[e];
    const n = ptr[e + 1] - start;
    const oe = e * k;
    if (n === 0) {
      for (let c = 0; c < k; c++) out[oe + c] = 0;
      continue;
    }
    const reg = scaleByCount ? lambda * n : lambda;
    if (n < k && reg > 0) {
      dualSolve(other, nbr, res, start, n, reg, ws, out, oe);
      continue;
    }
    // Gather X column-major: xt[c·n + t] = other[nbr[start + t]][c].
    let rr = 0;
    for (let t = 0; t < n; t++) {
      const xo = nbr[start + t] * k;
      const y = res[start + t];
      r[t] = y;
      rr += y * y;
      for (let c = 0; c < k; c++) xt[c * n + t] = other[xo + c];
    }
    let trace = 0;
    gram(xt, n, a, k);
    // Right side Xᵀy, four coordinates per pass over r.
    let c = 0;
    for (; c + 3 < k; c += 4) {
      const c0 = c * n;
      const c1 = c0 + n;
      const c2 = c1 + n;
      const c3 = c2 + n;
      let s0 = 0;
      let s1 = 0;
      let s2 = 0;
      let s3 = 0;
      for (let t = 0; t < n; t++) {
        const y = r[t];
        s0 += xt[c0 + t] * y;
        s1 += xt[c1 + t] * y;
        s2 += xt[c2 + t] * y;
        s3 += xt[c3 + t] * y;
      }
      rhs[c] = s0;
      rhs[c + 1] = s1;
      rhs[c + 2] = s2;
      rhs[c + 3] = s3;
    }
    for (; c < k; c++) {
      const cn = c * n;
      let sy = 0;
      for (let t = 0; t < n; t++) sy += xt[cn + t] * r[t];
      rhs[c] = sy;
    }
    for (let d = 0; d < k; d++) {
      a[d * k + d] += reg;
      trace += a[d * k + d];
    }
    let ok = choleskyInPlace(a, k);
    let regUsed = reg;
    // Singular normal matrix (λ w = 0 with too few or collinear neighbours): add a tiny ridge.
    for (let attempt = 0, eps = 1e-10 * (trace / k + 1); !ok && attempt < 4; attempt++, eps *= 100) {
      gram(xt, n, a, k);
      for (let c = 0; c < k; c++) a[c * k + c] += reg + eps;
      regUsed = reg + eps;
      ok = choleskyInPlace(a, k);
    }
    if (!ok) {
      for (let c = 0; c < k; c++) out[oe + c] = 0;
      ws.loss += rr;
      continue;
    }
    const b = ws.b;
    for (let c = 0; c < k; c++) b[c] = rhs[c];
    choleskySolveInPlace(a, k, rhs);
    let vb = 0;
    let vv = 0;
    for (let c = 0; c < k; c++) {
      const x = rhs[c];
      out[oe + c] = x;
      vb += x * b[c];
      vv += x * x;
    }
    let loss = rr - vb - regUsed * vv;
    if (!(loss > 1e-9 * rr)) {
      // Too close to r·r to trust the identity's digits: sum the residuals directly.
      loss = 0;
      for (let t = 0; t < n; t++) {
        let dot = 0;
        for (let c = 0; c < k; c++) dot += xt[c * n + t] * rhs[c];
        const e = r[t] - dot;
        loss += e * e;
      }
    }
    ws.loss += loss;
  }
  return true;
}

/** Σ_e w_e ‖f_e‖² over the rows of a factor matrix (w_e = 1, or the entity's count). */
function penalty(f: Float64Array, ptr: Int32Array, k: number, scaleByCount: boolean): number {
  let pen = 0;
  const entities = ptr.length - 1;
  for (let e = 0; e < entities; e++) {
    let s = 0;
    for (let c = 0; c < k; c++) s += f[e * k + c] * f[e * k + c];
    pen += (scaleByCount ? ptr[e + 1] - ptr[e] : 1) * s;
  }
  return pen;
}

/** F(U, V) as in the header. */
function lowRankObjective(
  idx: SparseRatings,
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

/** φ = 1e-20 · max(½ Σ r², F₀): below it F is rounding noise (see the header). */
function objectiveFloor(res: Float64Array, f0: number): number {
  let ss = 0;
  for (let p = 0; p < res.length; p++) ss += res[p] * res[p];
  return 1e-20 * Math.max(0.5 * ss, f0);
}

function validate(s: LowRankSettings): void {
  if (!Number.isInteger(s.rank) || s.rank < 0)
    throw new FitFailedError(`rank must be a whole number ≥ 0 (got ${s.rank})`);
  if (!(s.lambda >= 0) || !Number.isFinite(s.lambda))
    throw new FitFailedError(`lambda must be a finite number ≥ 0 (got ${s.lambda})`);
  if (!(s.offsetLambda >= 0) || !Number.isFinite(s.offsetLambda))
    throw new FitFailedError(`offset lambda must be a finite number ≥ 0 (got ${s.offsetLambda})`);
  if (!Number.isInteger(s.maxIterations) || s.maxIterations < 0)
    throw new FitFailedError(`iterations must be a whole number ≥ 0 (got ${s.maxIterations})`);
  if (!(s.tolerance >= 0)) throw new FitFailedError(`tolerance must be ≥ 0 (got ${s.tolerance})`);
}

/**
 * The low-rank fit on sparse storage: baselines, factors and trace, no per-cell layer
 * (predictions are made where they are needed: predictCells, makePredictions).
 */
export function fitLowRankSparse(data: SparseRatings, settings: LowRankSettings, opts: FitOptions = {}): SparseFit {
  const t0 = nowMs();
  validate(settings);
  const { rows, cols } = data;
  const bad = findNonFiniteEntry(data);
  if (bad) throw new FitFailedError(`non-finite value at row ${bad.row + 1}, column ${bad.col + 1}`);
  const idx = data;
  if (idx.n === 0) throw new FitFailedError('the matrix has no observed values');
  const k = settings.rank;
  const lambda = settings.lambda;
  const scaleByCount = settings.scaleLambdaByCount;

  const base = opts.baseline ?? fitBaseline(data, settings.centering, settings.offsetLambda, opts.baselineStart);
  const resRow = new Float64Array(idx.n);
  for (let i = 0; i < rows; i++) {
    const rb = base.rowBaseline[i];
    for (let p = idx.rowPtr[i]; p < idx.rowPtr[i + 1]; p++)
      resRow[p] = idx.rowVal[p] - rb - base.colBaseline[idx.rowCol[p]];
  }
  const resCol = new Float64Array(idx.n);
  for (let j = 0; j < cols; j++) {
    const cb = base.colBaseline[j];
    for (let q = idx.colPtr[j]; q < idx.colPtr[j + 1]; q++)
      resCol[q] = idx.colVal[q] - base.rowBaseline[idx.colRow[q]] - cb;
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
          : spectralStart(idx, resRow, k, settings.seed, undefined, opts.shouldStop);
      if (!start) throw new FitCancelledError();
      u = start.rowFactors;
      v = start.colFactors;
    }
    const work = createWorkspace(k, Math.max(maxDegree(idx.rowPtr), maxDegree(idx.colPtr)));
    const stop = opts.shouldStop;
    const f0 = lowRankObjective(idx, resRow, u, v, k, lambda, scaleByCount);
    if (!Number.isFinite(f0)) throw new FitFailedError('the starting objective is not finite');
    const floor = objectiveFloor(resRow, f0);
    let prev = f0;
    let rising = 0;
    for (let it = 1; it <= settings.maxIterations; it++) {
      if (stop && stop()) throw new FitCancelledError();
      if (!ridgeHalfStep(u, v, idx.rowPtr, idx.rowCol, resRow, lambda, scaleByCount, work, stop))
        throw new FitCancelledError();
      if (!ridgeHalfStep(v, u, idx.colPtr, idx.colRow, resCol, lambda, scaleByCount, work, stop))
        throw new FitCancelledError();
      // Loss collected by the column half-step (see the header) plus the penalty.
      const f =
        0.5 * work.loss +
        0.5 * lambda * (penalty(u, idx.rowPtr, k, scaleByCount) + penalty(v, idx.colPtr, k, scaleByCount));
      trace.push(f);
      iterations = it;
      if (!Number.isFinite(f)) throw new FitFailedError(`the fit produced a non-finite objective at iteration ${it}`);
      if (f > 1e6 * Math.max(f0, 1))
        throw new FitFailedError(`the objective is diverging (iteration ${it}: ${f.toPrecision(4)})`);
      if (f > prev * (1 + 1e-6) + floor) {
        rising++;
        if (rising >= 5)
          throw new FitFailedError(`the objective is diverging (rose for 5 iterations, now ${f.toPrecision(4)})`);
      } else rising = 0;
      opts.onProgress?.({ iteration: it, objective: f, elapsedMs: nowMs() - t0 });
      const rel = Math.abs(prev - f) / Math.max(Math.abs(prev), floor, 1e-300);
      prev = f;
      if (f <= floor || rel < settings.tolerance) {
        converged = true;
        break;
      }
    }
  }
  for (let t = 0; t < u.length; t++)
    if (!Number.isFinite(u[t]))
      throw new FitFailedError(`the fit produced a non-finite factor for row ${Math.floor(t / k) + 1}`);
  for (let t = 0; t < v.length; t++)
    if (!Number.isFinite(v[t]))
      throw new FitFailedError(`the fit produced a non-finite factor for column ${Math.floor(t / k) + 1}`);
  return {
    settings: { ...settings },
    rows,
    cols,
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

/** The low-rank fit of a dense matrix, with the per-cell layers the window draws. */
export function fitLowRank(matrix: RatingMatrix, settings: LowRankSettings, opts: FitOptions = {}): FitResult {
  const t0 = nowMs();
  validate(settings);
  const rows = matrix.rowLabels.length;
  const cols = matrix.colLabels.length;
  const values = matrix.values;
  if (values.length !== rows * cols)
    throw new FitFailedError(`matrix has ${values.length} values for ${rows} × ${cols} cells`);
  const bad = findNonFinite(values, cols);
  if (bad) throw new FitFailedError(`non-finite value at row ${bad.row + 1}, column ${bad.col + 1}`);
  const fit = fitLowRankSparse(sparseFromDense(values, rows, cols), settings, opts);
  const pred = makePredictions(
    rows,
    cols,
    fit.rowBaseline,
    fit.colBaseline,
    fit.rowFactors,
    fit.colFactors,
    fit.rank,
    matrix.scale,
    settings.clipToScale,
    settings.snapToStep,
  );
  for (let c = 0; c < pred.predictions.length; c++) {
    if (!Number.isFinite(pred.predictions[c])) {
      throw new FitFailedError(
        `the fit produced a non-finite prediction at row ${Math.floor(c / cols) + 1}, column ${(c % cols) + 1}`,
      );
    }
  }
  return { ...fit, predictions: pred.predictions, baseline: pred.baseline, elapsedMs: nowMs() - t0 };
}
