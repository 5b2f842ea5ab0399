/**
 * Conditional distribution of a row's missing variables given its observed ones,
 * for x ~ N(μ, Σ) split into observed (o) and missing (m) parts:
 *
 *   E[x_m | x_o]   = μ_m + Σ_mo Σ_oo⁻¹ (x_o − μ_o)
 *   Cov[x_m | x_o] = Σ_mm − Σ_mo Σ_oo⁻¹ Σ_om            (the Schur complement)
 *   log p(x_o)     = −½ [ |o| log 2π + log|Σ_oo| + (x_o − μ_o)ᵀ Σ_oo⁻¹ (x_o − μ_o) ]
 *
 * Two equivalent routes, chosen per missingness pattern by the smaller block:
 *
 *  covariance route (few observed): Σ_oo = L Lᵀ, W = L⁻¹ Σ_om, y = L⁻¹ (x_o − μ_o);
 *     E[x_m | x_o] = μ_m + Wᵀ y,  Cov = Σ_mm − Wᵀ W,  quadratic form = yᵀ y,
 *     log|Σ_oo| = 2 Σ log L_ii.
 *
 *  precision route (few missing), with K = Σ⁻¹ (computed once per iteration):
 *     Cov[x_m | x_o] = K_mm⁻¹,  E[x_m | x_o] = μ_m − K_mm⁻¹ K_mo (x_o − μ_o),
 *     Σ_oo⁻¹ = K_oo − K_om K_mm⁻¹ K_mo  ⇒  quadratic form = dᵀ K_oo d − vᵀ K_mm⁻¹ v  with v = K_mo d,
 *     log|Σ_oo| = log|Σ| + log|K_mm|   (since |Σ| = |Σ_oo| · |K_mm⁻¹|).
 *
 * Either way one factorization (of Σ_oo or of K_mm) serves every row sharing the
 * pattern. Buffers belong to a ConditionalWorkspace; nothing is allocated per row.
 */

import { choleskyInPlace } from '../cholesky';
import { FitFailedError } from '../errors';
import { choleskyInverse, choleskyLogDet, forwardSubstituteInPlace } from './triangular';

const LOG_2PI = Math.log(2 * Math.PI);

/** μ and Σ with the per-iteration derived quantities every pattern needs. */
export interface GaussianParams {
  p: number;
  mu: Float64Array;
  /** Row-major p × p covariance actually used (after any stabilizing ridge). */
  sigma: Float64Array;
  /** Row-major p × p precision K = Σ⁻¹. */
  precision: Float64Array;
  logDetSigma: number;
  /** Ridge that had to be added to the diagonal of Σ to factor it (0 normally). */
  ridge: number;
}

/**
 * Factor Σ (adding the smallest ridge from 1e-12, 1e-11, … × mean variance that
 * makes it positive definite) and derive K and log|Σ|.
 */
export function prepareParams(p: number, mu: Float64Array, sigma: Float64Array): GaussianParams {
  const fac = new Float64Array(p * p);
  const col = new Float64Array(p);
  let meanVar = 0;
  for (let j = 0; j < p; j++) meanVar += sigma[j * p + j];
  meanVar = p > 0 ? meanVar / p : 0;
  if (!(meanVar > 0)) meanVar = 1;
  const used = new Float64Array(sigma);
  let ridge = 0;
  for (let attempt = 0; ; attempt++) {
    fac.set(used);
    if (choleskyInPlace(fac, p)) break;
    if (attempt > 14) throw new FitFailedError('The covariance estimate could not be made positive definite.');
    const next = meanVar * 10 ** (attempt - 12);
    for (let j = 0; j < p; j++) used[j * p + j] += next - ridge;
    ridge = next;
  }
  const precision = new Float64Array(p * p);
  choleskyInverse(fac, p, precision, col);
  return { p, mu, sigma: used, precision, logDetSigma: choleskyLogDet(fac, p), ridge };
}

export type ConditionalRoute = 'covariance' | 'precision';

/** Scratch buffers for one pattern at a time; create once per fit. */
export class ConditionalWorkspace {
  readonly p: number;
  route: ConditionalRoute = 'covariance';
  observed: Int32Array = new Int32Array(0);
  missing: Int32Array = new Int32Array(0);
  /** log|Σ_oo| for the current pattern. */
  logDetObserved = 0;
  /** Cov[x_m | x_o], row-major |m| × |m| in the order of `missing`. */
  readonly condCov: Float64Array;
  /** E[x_m | x_o] of the last row, in the order of `missing`. */
  readonly condMean: Float64Array;
  private readonly fac: Float64Array;
  private readonly cross: Float64Array;
  private readonly d: Float64Array;
  private readonly v: Float64Array;
  private readonly col: Float64Array;

  constructor(p: number) {
    this.p = p;
    this.condCov = new Float64Array(p * p);
    this.condMean = new Float64Array(p);
    this.fac = new Float64Array(p * p);
    this.cross = new Float64Array(p * p);
    this.d = new Float64Array(p);
    this.v = new Float64Array(p);
    this.col = new Float64Array(p);
  }

  /**
   * Factor the pattern's block and compute its conditional covariance.
   * `route` forces a route (tests); by default the smaller block is factored.
   */
  prepare(params: GaussianParams, observed: Int32Array, missing: Int32Array, route?: ConditionalRoute): void {
    const p = this.p;
    const o = observed.length;
    const m = missing.length;
    this.observed = observed;
    this.missing = missing;
    this.route = route ?? (m <= o ? 'precision' : 'covariance');
    const { sigma, precision } = params;
    const fac = this.fac;
    const cross = this.cross;
    const cc = this.condCov;
    if (o === 0) {
      // nothing observed: the conditional is the marginal
      for (let a = 0; a < m; a++) for (let b = 0; b < m; b++) cc[a * m + b] = sigma[missing[a] * p + missing[b]];
      this.logDetObserved = 0;
      return;
    }
    if (m === 0) {
      this.logDetObserved = this.route === 'precision' ? params.logDetSigma : this.factorObserved(sigma);
      return;
    }
    if (this.route === 'covariance') {
      this.logDetObserved = this.factorObserved(sigma);
      // W = L⁻¹ Σ_om, stored column-per-missing: cross[b * o + a] = W_ab
      for (let b = 0; b < m; b++) {
        const mb = missing[b];
        const off = b * o;
        for (let a = 0; a < o; a++) cross[off + a] = sigma[observed[a] * p + mb];
        forwardSubstituteInPlace(fac, o, cross, off);
      }
      // Cov = Σ_mm − Wᵀ W
      for (let a = 0; a < m; a++) {
        const oa = a * o;
        for (let b = a; b < m; b++) {
          const ob = b * o;
          let s = 0;
          for (let t = 0; t < o; t++) s += cross[oa + t] * cross[ob + t];
          const val = sigma[missing[a] * p + missing[b]] - s;
          cc[a * m + b] = val;
          cc[b * m + a] = val;
        }
      }
    } else {
      for (let a = 0; a < m; a++) {
        const ra = missing[a] * p;
        for (let b = 0; b < m; b++) fac[a * m + b] = precision[ra + missing[b]];
      }
      if (!choleskyInPlace(fac, m))
        throw new FitFailedError('The precision block of a missingness pattern is not positive definite.');
      this.logDetObserved = params.logDetSigma + choleskyLogDet(fac, m);
      choleskyInverse(fac, m, cc, this.col);
      // K_mo gathered row-major m × o
      for (let a = 0; a < m; a++) {
        const ra = missing[a] * p;
        const off = a * o;
        for (let t = 0; t < o; t++) cross[off + t] = precision[ra + observed[t]];
      }
    }
  }

  /** Factor Σ_oo into `fac` (o × o); returns log|Σ_oo|. */
  private factorObserved(sigma: Float64Array): number {
    const p = this.p;
    const observed = this.observed;
    const o = observed.length;
    const fac = this.fac;
    for (let a = 0; a < o; a++) {
      const ra = observed[a] * p;
      for (let b = 0; b <= a; b++) fac[a * o + b] = sigma[ra + observed[b]];
    }
    if (!choleskyInPlace(fac, o))
      throw new FitFailedError('The observed block of a missingness pattern is not positive definite.');
    return choleskyLogDet(fac, o);
  }

  /**
   * For the row x[offset .. offset+p) of the current pattern: write E[x_m | x_o]
   * into `condMean` and return the row's observed-data log-density log p(x_o).
   */
  row(params: GaussianParams, x: Float64Array, offset: number): number {
    const p = this.p;
    const mu = params.mu;
    const observed = this.observed;
    const missing = this.missing;
    const o = observed.length;
    const m = missing.length;
    const cm = this.condMean;
    if (o === 0) {
      for (let a = 0; a < m; a++) cm[a] = mu[missing[a]];
      return 0;
    }
    const d = this.d;
    for (let t = 0; t < o; t++) d[t] = x[offset + observed[t]] - mu[observed[t]];
    let quad = 0;
    if (this.route === 'covariance') {
      forwardSubstituteInPlace(this.fac, o, d, 0);
      for (let t = 0; t < o; t++) quad += d[t] * d[t];
      const w = this.cross;
      for (let a = 0; a < m; a++) {
        const off = a * o;
        let s = 0;
        for (let t = 0; t < o; t++) s += w[off + t] * d[t];
        cm[a] = mu[missing[a]] + s;
      }
    } else {
      const k = params.precision;
      // dᵀ K_oo d (symmetric: diagonal once, off-diagonal twice)
      for (let a = 0; a < o; a++) {
        const ra = observed[a] * p;
        const da = d[a];
        let s = 0;
        for (let b = 0; b < a; b++) s += k[ra + observed[b]] * d[b];
        quad += da * (2 * s + k[ra + observed[a]] * da);
      }
      if (m > 0) {
        const v = this.v;
        const kmo = this.cross;
        for (let a = 0; a < m; a++) {
          const off = a * o;
          let s = 0;
          for (let t = 0; t < o; t++) s += kmo[off + t] * d[t];
          v[a] = s;
        }
        const cc = this.condCov;
        let vu = 0;
        for (let a = 0; a < m; a++) {
          const off = a * m;
          let u = 0;
          for (let b = 0; b < m; b++) u += cc[off + b] * v[b];
          cm[a] = mu[missing[a]] - u;
          vu += v[a] * u;
        }
        quad -= vu;
      }
    }
    return -0.5 * (o * LOG_2PI + this.logDetObserved + quad);
  }
}
