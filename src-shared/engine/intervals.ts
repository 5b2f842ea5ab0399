/**
 * Calibrated intervals for filled cells: normalized conformal prediction on
 * cross-validation residuals. Pure math over plain typed arrays.
 *
 * Inputs, for the n observed cells (any fixed order):
 *   r_c = y_c − ŷ_{−f(c)}(c)   held-out residual: ŷ_{−f} is the model fitted without fold f(c)
 *   x_c                         a feature vector describing how hard cell c is (see cellIntervals.ts)
 * and for every cell to be given an interval, its estimate ŷ and its features x.
 *
 * Difficulty scale σ̂ (the "normalizer"): either given directly (the Gaussian family's
 * conditional standard deviation) or fitted as a model of the absolute error,
 *   σ̂(x) = max(x · β, floor),  β = argmin_{β ≥ 0} Σ_c (|r_c| − x_c · β)²   (non-negative least squares),
 *   floor = 0.05 · mean_c |r_c|  (keeps a score finite when the model predicts ~0).
 *
 * Score of a held-out cell:  s_c = |r_c| / σ̂(x_c).
 *
 * Conformal quantile at level 1 − α over n scores (finite-sample correction):
 *   k = ⌈(n + 1)(1 − α)⌉;  q = the k-th smallest score, or +∞ when k > n.
 * Interval of a cell:  [ŷ − q σ̂, ŷ + q σ̂], clipped to the rating scale [min, max].
 * Bounds are inclusive: a rating equal to a bound lies inside. On a discrete scale the
 * ratings inside are the steps from the first step ≥ lower to the last step ≤ upper.
 *
 * Guarantee (split conformal; Vovk, Gammerman & Shafer 2005; Lei, G'Sell, Rinaldo,
 * Tibshirani & Wasserman 2018): if the calibration scores and a new cell's score are
 * exchangeable, P(y ∈ interval) ≥ 1 − α, on average over cells (not for each cell).
 * Here the scores come from the k fold models while the shown estimate comes from the
 * model fitted on all cells (a cross-conformal / CV-style use of the residuals; Barber,
 * Candès, Ramdas & Tibshirani 2021 bound its coverage by 1 − 2α in the worst case and
 * find it near 1 − α in practice). The full model has seen more data than a fold model,
 * so its errors are, if anything, a little smaller: the coverage leans conservative.
 *
 * Held-out check (what the sidecar records): for each fold f, q_{−f} is the conformal
 * quantile of the scores outside f; coverage_f = share of fold f's cells with s_c ≤ q_{−f};
 * width_f = mean clipped width of their intervals around ŷ_{−f}. The constant-width
 * comparison is the same procedure with σ̂ ≡ 1.
 */
import type { RatingScale } from '../matrix/ratingMatrix';

export const INTERVAL_METHOD = 'cross-validated normalized conformal';
export const DEFAULT_INTERVAL_LEVEL = 0.8;
const MIN_INTERVAL_LEVEL = 0.5;
const MAX_INTERVAL_LEVEL = 0.99;

function checkLevel(level: number): void {
  if (!(level >= MIN_INTERVAL_LEVEL && level <= MAX_INTERVAL_LEVEL)) {
    throw new Error(`interval level must lie between ${MIN_INTERVAL_LEVEL} and ${MAX_INTERVAL_LEVEL} (got ${level})`);
  }
}

/** Rank k = ⌈(n + 1)·level⌉ of the conformal quantile (1-based); k > n means +∞. */
export function conformalRank(n: number, level: number): number {
  // A hair below the product keeps exact products (e.g. 10 · 0.8) from rounding up.
  return Math.ceil((n + 1) * level - 1e-9);
}

/** The k-th smallest of `sorted` (ascending), k = conformalRank(n, level); +∞ when k > n. */
function conformalQuantileSorted(sorted: ArrayLike<number>, level: number): number {
  const n = sorted.length;
  const k = conformalRank(n, level);
  if (k > n) return Infinity;
  return sorted[Math.max(k, 1) - 1];
}

export function conformalQuantile(scores: ArrayLike<number>, level: number): number {
  return conformalQuantileSorted(Float64Array.from(scores).sort(), level);
}

/**
 * Non-negative least squares min_{β ≥ 0} ‖y − Xβ‖² for a small number of features p
 * (X row-major n × p), by cyclic coordinate descent on the normal equations
 * G = XᵀX, h = Xᵀy (G is p × p, so each sweep costs p²).
 */
export function nonNegativeLeastSquares(x: Float64Array, y: Float64Array, p: number, sweeps = 2000): Float64Array {
  const n = y.length;
  const g = new Float64Array(p * p);
  const h = new Float64Array(p);
  for (let c = 0; c < n; c++) {
    const o = c * p;
    const yc = y[c];
    for (let a = 0; a < p; a++) {
      const xa = x[o + a];
      h[a] += xa * yc;
      for (let b = a; b < p; b++) g[a * p + b] += xa * x[o + b];
    }
  }
  for (let a = 0; a < p; a++) for (let b = 0; b < a; b++) g[a * p + b] = g[b * p + a];
  const beta = new Float64Array(p);
  for (let s = 0; s < sweeps; s++) {
    let moved = 0;
    for (let a = 0; a < p; a++) {
      const gaa = g[a * p + a];
      if (!(gaa > 0)) continue;
      let grad = -h[a];
      for (let b = 0; b < p; b++) grad += g[a * p + b] * beta[b];
      const next = Math.max(0, beta[a] - grad / gaa);
      moved = Math.max(moved, Math.abs(next - beta[a]) * Math.sqrt(gaa));
      beta[a] = next;
    }
    if (moved < 1e-12 * (1 + Math.sqrt(Math.abs(h[0])))) break;
  }
  return beta;
}

export interface ErrorScaleModel {
  /** Coefficients β ≥ 0 of σ̂ = max(x·β, floor). */
  coefficients: Float64Array;
  floor: number;
}

/** Fit σ̂(x) = max(x·β, floor) to the absolute held-out residuals (features row-major n × p). */
export function fitErrorScale(features: Float64Array, absResidual: Float64Array, p: number): ErrorScaleModel {
  const n = absResidual.length;
  let mean = 0;
  for (let c = 0; c < n; c++) mean += absResidual[c];
  mean = n > 0 ? mean / n : 1;
  const coefficients = nonNegativeLeastSquares(features, absResidual, p);
  return { coefficients, floor: Math.max(0.05 * mean, 1e-9) };
}

export function applyErrorScale(
  model: ErrorScaleModel,
  features: Float64Array,
  p: number,
  out?: Float64Array,
): Float64Array {
  const n = features.length / p;
  const s = out ?? new Float64Array(n);
  const beta = model.coefficients;
  for (let c = 0; c < n; c++) {
    let v = 0;
    for (let a = 0; a < p; a++) v += features[c * p + a] * beta[a];
    s[c] = v > model.floor ? v : model.floor;
  }
  return s;
}

/** One interval, clipped to the scale. */
export function intervalBound(estimate: number, sigma: number, q: number, scale: RatingScale, side: -1 | 1): number {
  const b = estimate + side * q * sigma;
  if (side < 0) return b < scale.min || b !== b ? scale.min : b;
  return b > scale.max || b !== b ? scale.max : b;
}

/** Lower and upper bounds for every cell (NaN where the estimate or σ̂ is not finite). */
export function intervalBounds(
  estimates: ArrayLike<number>,
  sigma: ArrayLike<number>,
  q: number,
  scale: RatingScale,
): { lower: Float64Array; upper: Float64Array } {
  const n = estimates.length;
  const lower = new Float64Array(n);
  const upper = new Float64Array(n);
  for (let c = 0; c < n; c++) {
    const e = estimates[c];
    const s = sigma[c];
    if (!Number.isFinite(e) || !Number.isFinite(s)) {
      lower[c] = NaN;
      upper[c] = NaN;
      continue;
    }
    lower[c] = intervalBound(e, s, q, scale, -1);
    upper[c] = intervalBound(e, s, q, scale, 1);
  }
  return { lower, upper };
}

/** The held-out cells the calibration rests on (length n each, same order). */
export interface HeldOutScores {
  /** Number of folds; fold ids run 0 … k − 1. */
  k: number;
  fold: Int32Array;
  /** Out-of-fold estimate ŷ_{−f(c)}(c). */
  estimate: Float64Array;
  /** Observed rating y_c. */
  observed: Float64Array;
  /** Difficulty scale σ̂(x_c). */
  sigma: Float64Array;
}

interface FoldCoverage {
  n: number;
  /** Share of the fold's cells inside their interval (quantile from the other folds). */
  coverage: number;
  /** Mean width (upper − lower, after clipping) of those intervals. */
  meanWidth: number;
}

export interface LevelSummary {
  level: number;
  /** Quantile of the normalized scores over all held-out cells: the one the intervals use. */
  q: number;
  /** Per fold, calibrated on the other folds. */
  folds: FoldCoverage[];
  /** Pooled over folds (weighted by cells). */
  coverage: number;
  meanWidth: number;
}

function foldSummary(h: HeldOutScores, level: number, scale: RatingScale, normalized: boolean): FoldCoverage[] {
  const n = h.fold.length;
  const score = new Float64Array(n);
  for (let c = 0; c < n; c++) score[c] = Math.abs(h.observed[c] - h.estimate[c]) / (normalized ? h.sigma[c] : 1);
  const out: FoldCoverage[] = [];
  for (let f = 0; f < h.k; f++) {
    let m = 0;
    for (let c = 0; c < n; c++) if (h.fold[c] !== f) m++;
    const others = new Float64Array(m);
    m = 0;
    for (let c = 0; c < n; c++) if (h.fold[c] !== f) others[m++] = score[c];
    others.sort();
    const q = conformalQuantileSorted(others, level);
    let inside = 0;
    let width = 0;
    let nf = 0;
    for (let c = 0; c < n; c++) {
      if (h.fold[c] !== f) continue;
      nf++;
      const s = normalized ? h.sigma[c] : 1;
      const lo = intervalBound(h.estimate[c], s, q, scale, -1);
      const hi = intervalBound(h.estimate[c], s, q, scale, 1);
      const y = h.observed[c];
      if (y >= lo && y <= hi) inside++;
      width += hi - lo;
    }
    out.push({ n: nf, coverage: nf > 0 ? inside / nf : NaN, meanWidth: nf > 0 ? width / nf : NaN });
  }
  return out;
}

function pooled(folds: FoldCoverage[]): { coverage: number; meanWidth: number } {
  let n = 0;
  let cov = 0;
  let w = 0;
  for (const f of folds) {
    if (f.n === 0) continue;
    n += f.n;
    cov += f.coverage * f.n;
    w += f.meanWidth * f.n;
  }
  return { coverage: n > 0 ? cov / n : NaN, meanWidth: n > 0 ? w / n : NaN };
}

/** The quantile the intervals use, and the held-out coverage and width at `level`. */
export function summarizeLevel(h: HeldOutScores, level: number, scale: RatingScale, normalized = true): LevelSummary {
  checkLevel(level);
  const n = h.fold.length;
  const all = new Float64Array(n);
  for (let c = 0; c < n; c++) all[c] = Math.abs(h.observed[c] - h.estimate[c]) / (normalized ? h.sigma[c] : 1);
  all.sort();
  const folds = foldSummary(h, level, scale, normalized);
  return { level, q: conformalQuantileSorted(all, level), folds, ...pooled(folds) };
}

/** The ratings a closed interval [lower, upper] holds on a scale with step > 0: first and last. */
export function ratingsInside(
  lower: number,
  upper: number,
  scale: RatingScale,
): { first: number; last: number } | undefined {
  if (!(scale.step > 0)) return undefined;
  const eps = 1e-9;
  const first = scale.min + Math.ceil((lower - scale.min) / scale.step - eps) * scale.step;
  const last = scale.min + Math.floor((upper - scale.min) / scale.step + eps) * scale.step;
  if (last < first - eps * scale.step) return undefined;
  return { first: Number(first.toPrecision(12)), last: Number(last.toPrecision(12)) };
}
