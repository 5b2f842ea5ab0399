/**
 * The default tuning grid, derived from the data (a pure function of a few summaries).
 *
 * Summaries of the matrix: m rows, n columns, N observed cells, and σ, the root mean square
 * of the residuals y − b after the two-way baseline (`both`, offsets shrunk by γ = 5) — an
 * upper bound on the noise level, since it still holds the interaction signal.
 *
 * λ: the ridge objective ½ Σ_obs (r − u·v)² + λ/2 (‖U‖² + ‖V‖²) has, at a large enough rank,
 * the same minimum as the nuclear-norm problem ½ Σ_obs (r − z)² + λ ‖Z‖_* (Mazumder, Hastie &
 * Tibshirani 2010; ‖Z‖_* = min over Z = UVᵀ of ½(‖U‖² + ‖V‖²)). Its solution is Z = 0 — the
 * baseline alone — as soon as λ ≥ σ₁, the largest singular value of the zero-filled residual
 * matrix P_Ω(R) (the same paper starts its λ path there). So the useful range lies below σ₁,
 * and the coarse grid is
 *   λ = σ₁/2 · 2^−t,  t = 0 … 4        (five values, neighbours exactly ×2 apart, σ₁/32 … σ₁/2),
 * rounded to two significant digits. `refineLambdas` then adds the geometric midpoints between
 * the best λ and its grid neighbours (×√2 apart), or one more ×2 step when the best lies on
 * the grid's edge. σ₁ comes from power iteration on P_Ω(R) (`topSingularValue`).
 * A second reference, used when σ₁ is unknown: noise alone, zero-filled on N of m·n cells with
 * variance σ², has largest singular value about σ (√(N/m) + √(N/n)) (the edge of the
 * Marchenko–Pastur law), giving λ₀ = σ (√(N/m) + √(N/n)) with σ the residual RMS (an upper
 * bound on the noise level); the grid is then centred on λ₀ (λ₀ · 2^t, t = −2 … 2).
 *
 * Ranks: 0 (the baseline alone, so tuning is never worse in cross-validation than the
 * baseline) and the ladder 1, 2, 3, 5, 8, 12, 16, 20, up to the largest rank the data
 * supports: at most the mean number of observed cells per row-or-column 2N/(m + n) (so the
 * average row and column has at least as many ratings as factor coordinates), at most half the
 * smaller dimension, at most 20.
 *
 * Complexity order for the one-standard-error rule: a smaller rank is simpler; at equal rank,
 * a larger λ (stronger shrinkage) is simpler (`simplerLowRank`).
 */
import type { Centering, LowRankSettings } from './types';
import type { RatingMatrix } from '../matrix/ratingMatrix';
import { toSparseMatrix, type SparseMatrix } from '../matrix/sparseRatings';
import { fitBaseline } from './baseline';

export interface GridDataSummary {
  rows: number;
  cols: number;
  observed: number;
  /** RMS of the residuals after the two-way baseline (rating units). */
  residualRms: number;
  /** Largest singular value of the zero-filled residual matrix (0 when unknown). */
  topSingular?: number;
}

/**
 * σ₁ of the zero-filled residual matrix R by power iteration on RᵀR (seeded start; 60 steps
 * or until σ₁ changes by < 1e-6 of itself): x ← Rᵀ(R x) / ‖·‖, σ₁ = ‖R x‖.
 */
function topSingularValue(
  rows: number,
  cols: number,
  rowPtr: Int32Array,
  rowCol: Int32Array,
  res: Float64Array,
): number {
  const x = new Float64Array(cols);
  for (let j = 0; j < cols; j++) x[j] = 1 + ((j * 7919) % 13) / 13;
  const y = new Float64Array(rows);
  let sigma = 0;
  for (let it = 0; it < 60; it++) {
    let nx = 0;
    for (let j = 0; j < cols; j++) nx += x[j] * x[j];
    nx = Math.sqrt(nx);
    if (!(nx > 0)) return 0;
    for (let j = 0; j < cols; j++) x[j] /= nx;
    let ny = 0;
    for (let i = 0; i < rows; i++) {
      let s = 0;
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) s += res[p] * x[rowCol[p]];
      y[i] = s;
      ny += s * s;
    }
    const next = Math.sqrt(ny);
    x.fill(0);
    for (let i = 0; i < rows; i++) for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) x[rowCol[p]] += res[p] * y[i];
    if (Math.abs(next - sigma) < 1e-6 * next) return next;
    sigma = next;
  }
  return sigma;
}

const RANK_LADDER: readonly number[] = [1, 2, 3, 5, 8, 12, 16, 20];

export function summarizeForGrid(matrix: RatingMatrix | SparseMatrix): GridDataSummary {
  const idx = toSparseMatrix(matrix).data;
  const { rows, cols } = idx;
  if (idx.n === 0) return { rows, cols, observed: 0, residualRms: 0 };
  const base = fitBaseline(idx, 'both', 5);
  let ss = 0;
  const res = new Float64Array(idx.n);
  for (let i = 0; i < rows; i++) {
    for (let p = idx.rowPtr[i]; p < idx.rowPtr[i + 1]; p++) {
      const r = idx.rowVal[p] - base.rowBaseline[i] - base.colBaseline[idx.rowCol[p]];
      res[p] = r;
      ss += r * r;
    }
  }
  return {
    rows,
    cols,
    observed: idx.n,
    residualRms: Math.sqrt(ss / idx.n),
    topSingular: topSingularValue(rows, cols, idx.rowPtr, idx.rowCol, res),
  };
}

/** Two significant digits (λ values a person can read and type back). */
export function roundLambda(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return 0;
  return Number(x.toPrecision(2));
}

/** λ₀ = σ (√(N/m) + √(N/n)), see the header; 0 when there is nothing to fit. */
export function centreLambda(s: GridDataSummary): number {
  if (s.observed === 0 || s.rows === 0 || s.cols === 0) return 0;
  return s.residualRms * (Math.sqrt(s.observed / s.rows) + Math.sqrt(s.observed / s.cols));
}

/** The largest rank the data supports (see the header); 0 when none. */
export function maxSupportedRank(s: GridDataSummary): number {
  const perEntity = s.rows + s.cols > 0 ? (2 * s.observed) / (s.rows + s.cols) : 0;
  return Math.max(0, Math.min(20, Math.floor(Math.min(s.rows, s.cols) / 2), Math.floor(perEntity)));
}

export function defaultRanks(s: GridDataSummary): number[] {
  const top = maxSupportedRank(s);
  return [0, ...RANK_LADDER.filter((r) => r <= top)];
}

/** The top of the grid: σ₁/2 (or 4λ₀ when σ₁ is unknown); 0 when there is nothing to fit. */
export function topLambda(s: GridDataSummary): number {
  if (s.topSingular !== undefined && s.topSingular > 0) return s.topSingular / 2;
  return 4 * centreLambda(s);
}

/** topLambda · 2^−t, t = 0 … steps − 1, rounded and deduplicated, ascending ([1] when there is nothing to fit). */
export function defaultLambdas(s: GridDataSummary, steps = 5): number[] {
  const top = topLambda(s);
  if (!(top > 0)) return [1];
  const out: number[] = [];
  for (let t = 0; t < steps; t++) out.push(roundLambda(top * 2 ** -t));
  return [...new Set(out)].filter((x) => x > 0).sort((a, b) => a - b);
}

/**
 * Extra λ values around `best` within the ascending list `tried`: the geometric midpoints
 * with its neighbours, or, at an edge, one more ×2 step outward (and the midpoint inward).
 * Values already tried are left out.
 */
export function refineLambdas(best: number, tried: number[]): number[] {
  const sorted = [...new Set(tried)].sort((a, b) => a - b);
  const at = sorted.indexOf(best);
  if (at < 0 || !(best > 0)) return [];
  const out: number[] = [];
  const lo = at > 0 ? sorted[at - 1] : 0;
  const hi = at + 1 < sorted.length ? sorted[at + 1] : Infinity;
  out.push(lo > 0 ? roundLambda(Math.sqrt(lo * best)) : roundLambda(best / 2));
  out.push(Number.isFinite(hi) ? roundLambda(Math.sqrt(best * hi)) : roundLambda(best * 2));
  return [...new Set(out)].filter((x) => x > 0 && !sorted.includes(x));
}

/** True when setting a is simpler than b: smaller rank, then (same rank) larger λ. */
export function simplerLowRank(
  a: Pick<LowRankSettings, 'rank' | 'lambda'>,
  b: Pick<LowRankSettings, 'rank' | 'lambda'>,
): boolean {
  return a.rank < b.rank || (a.rank === b.rank && a.lambda > b.lambda);
}

export interface DefaultGrid {
  ranks: number[];
  lambdas: number[];
  centerings: Centering[];
  summary: GridDataSummary;
  /** The grid's top λ (σ₁/2). */
  topLambda: number;
  maxRank: number;
}

/** The coarse default grid for a matrix (refinement comes after its first pass). */
export function defaultGrid(matrix: RatingMatrix | SparseMatrix, centerings: Centering[] = ['both']): DefaultGrid {
  const summary = summarizeForGrid(matrix);
  return {
    ranks: defaultRanks(summary),
    lambdas: defaultLambdas(summary),
    centerings,
    summary,
    topLambda: topLambda(summary),
    maxRank: maxSupportedRank(summary),
  };
}
