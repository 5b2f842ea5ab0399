/**
 * Maximum-likelihood fit of x ~ N(μ, Σ) to incomplete rows by the EM algorithm
 * (Dempster, Laird & Rubin 1977; Little & Rubin, Statistical Analysis with
 * Missing Data, ch. 11). Data: n rows × p variables, row-major, NaN = missing.
 *
 *   start      μ⁰_j = mean of the observed values of variable j,
 *              Σ⁰   = diag(their variances, divisor n_j)              (available cases)
 *   E-step     for each row i with observed o and missing m (see conditional.ts):
 *                x̂_i,o = x_i,o,   x̂_i,m = μ_m + Σ_mo Σ_oo⁻¹ (x_i,o − μ_o),
 *                C_i    = Σ_mm − Σ_mo Σ_oo⁻¹ Σ_om on the (m, m) block, 0 elsewhere
 *   M-step     μ' = (1/n) Σ_i x̂_i
 *              S  = (1/n) Σ_i [ (x̂_i − μ')(x̂_i − μ')ᵀ + C_i ]
 *              Σ'_jj = max(S_jj, floor),  Σ'_jk = (1 − s) S_jk  (j ≠ k)
 *              — shrinkage s ∈ [0, 1) pulls Σ toward its diagonal; floor = 1e-9 × mean Σ⁰_jj
 *   log-lik    ℓ(μ, Σ) = Σ_i log N(x_i,o; μ_o, Σ_oo)   (observed-data log-likelihood)
 *   stop       |ℓ_t − ℓ_{t−1}| ≤ tolerance × max(1, |ℓ_{t−1}|), or t = maxIterations.
 *
 * One iteration = one E-step then one M-step; ℓ_t is the log-likelihood of the
 * parameters after iteration t (evaluated by the next E-step, which doubles as the
 * prediction pass). With s = 0 EM never decreases ℓ. Sums are accumulated around
 * the previous mean to limit cancellation. Rows sharing a missingness pattern
 * share one factorization per iteration. Deterministic: no random numbers.
 */

import { FitFailedError } from '../errors';
import { ConditionalWorkspace, prepareParams, type GaussianParams } from './conditional';
import { groupByPattern, type MissingnessPattern } from './patterns';
import { GAUSSIAN_MAX_WORK_PER_ITERATION, emWorkPerIteration, emWorkloadRefusal } from './limits';

export interface EmGaussianOptions {
  /** Shrink Σ toward its diagonal by this factor, in [0, 1). */
  shrinkage: number;
  maxIterations: number;
  tolerance: number;
  /** Called after every iteration with ℓ of the new parameters. */
  onIteration?: (iteration: number, logLikelihood: number) => void;
  /** Checked before every iteration (and every 64 patterns); true ends the fit early (not converged). */
  shouldStop?: () => boolean;
  /** Refuse (FitFailedError) when one iteration would exceed this many multiply–adds (limits.ts). */
  maxWorkPerIteration?: number;
}

export interface EmGaussianResult {
  n: number;
  p: number;
  /** Final mean, length p. */
  mu: Float64Array;
  /** Final covariance, row-major p × p. */
  sigma: Float64Array;
  /** ℓ of the starting values. */
  initialLogLikelihood: number;
  /** ℓ after each completed iteration. */
  logLikelihoodTrace: number[];
  iterations: number;
  converged: boolean;
  /** True when shouldStop ended the fit (then `filled` may be partly updated). */
  stopped: boolean;
  /** Row-major n × p: observed values, conditional expectations in missing cells (final μ, Σ). */
  filled: Float64Array;
  /** Row-major n × p: conditional variances in missing cells, 0 in observed cells. */
  conditionalVariance: Float64Array;
}

/** Available-case means and variances (divisor n_j); Σ⁰ is their diagonal. */
function availableCaseStart(data: Float64Array, n: number, p: number): { mu: Float64Array; sigma: Float64Array } {
  const mu = new Float64Array(p);
  const sigma = new Float64Array(p * p);
  for (let j = 0; j < p; j++) {
    let c = 0;
    let s = 0;
    for (let i = 0; i < n; i++) {
      const x = data[i * p + j];
      if (x === x) {
        c++;
        s += x;
      }
    }
    const mean = c > 0 ? s / c : 0;
    let ss = 0;
    for (let i = 0; i < n; i++) {
      const x = data[i * p + j];
      if (x === x) ss += (x - mean) * (x - mean);
    }
    mu[j] = mean;
    sigma[j * p + j] = c > 0 ? ss / c : 0;
  }
  return { mu, sigma };
}

/**
 * One E-step at `params`: fill `filled` / `condVar`, return ℓ(params) (undefined when
 * shouldStop interrupted it).
 * When `acc` is given, accumulate Σ_i (x̂_i − c) into acc.sum and
 * Σ_i [(x̂_i − c)(x̂_i − c)ᵀ + C_i] into acc.cross (upper triangle), c = acc.center.
 */
function eStep(
  data: Float64Array,
  p: number,
  patterns: MissingnessPattern[],
  params: GaussianParams,
  ws: ConditionalWorkspace,
  filled: Float64Array,
  condVar: Float64Array,
  acc: { center: Float64Array; sum: Float64Array; cross: Float64Array; z: Float64Array } | undefined,
  shouldStop: (() => boolean) | undefined,
): number | undefined {
  let logLik = 0;
  for (let g = 0; g < patterns.length; g++) {
    // large fits stay cancellable inside an iteration
    if (shouldStop !== undefined && (g & 63) === 63 && shouldStop()) return undefined;
    const pat = patterns[g];
    const missing = pat.missing;
    const m = missing.length;
    ws.prepare(params, pat.observed, missing);
    const cc = ws.condCov;
    const cm = ws.condMean;
    const rows = pat.rows;
    for (let r = 0; r < rows.length; r++) {
      const base = rows[r] * p;
      logLik += ws.row(params, data, base);
      for (let a = 0; a < m; a++) {
        const j = base + missing[a];
        filled[j] = cm[a];
        condVar[j] = cc[a * m + a];
      }
      if (acc !== undefined) {
        const { center, sum, cross, z } = acc;
        for (let j = 0; j < p; j++) {
          const v = filled[base + j] - center[j];
          z[j] = v;
          sum[j] += v;
        }
        for (let j = 0; j < p; j++) {
          const zj = z[j];
          const rj = j * p;
          for (let k = j; k < p; k++) cross[rj + k] += zj * z[k];
        }
      }
    }
    if (acc !== undefined && m > 0) {
      // every row of the pattern adds the same C
      const cross = acc.cross;
      const count = rows.length;
      for (let a = 0; a < m; a++) {
        const ja = missing[a];
        for (let b = a; b < m; b++) cross[ja * p + missing[b]] += count * cc[a * m + b];
      }
    }
  }
  return logLik;
}

export function emGaussian(data: Float64Array, n: number, p: number, opts: EmGaussianOptions): EmGaussianResult {
  const shrinkage = opts.shrinkage;
  if (!(shrinkage >= 0 && shrinkage < 1))
    throw new FitFailedError(`Shrinkage must be at least 0 and below 1 (got ${shrinkage}).`);
  const maxIterations = Math.max(0, Math.floor(opts.maxIterations));
  const patterns = groupByPattern(data, n, p);
  const tooSlow = emWorkloadRefusal(
    emWorkPerIteration(patterns, p),
    opts.maxWorkPerIteration ?? GAUSSIAN_MAX_WORK_PER_ITERATION,
  );
  if (tooSlow !== undefined) throw new FitFailedError(tooSlow);
  const start = availableCaseStart(data, n, p);
  let mu = start.mu;
  let sigma = start.sigma;
  let meanVar = 0;
  for (let j = 0; j < p; j++) meanVar += sigma[j * p + j];
  meanVar /= Math.max(1, p);
  const floor = 1e-9 * (meanVar > 0 ? meanVar : 1);
  for (let j = 0; j < p; j++) if (!(sigma[j * p + j] >= floor)) sigma[j * p + j] = floor;

  const filled = new Float64Array(data);
  const condVar = new Float64Array(n * p);
  const ws = new ConditionalWorkspace(p);
  const acc = {
    center: new Float64Array(p),
    sum: new Float64Array(p),
    cross: new Float64Array(p * p),
    z: new Float64Array(p),
  };
  const trace: number[] = [];
  let initialLogLikelihood = NaN;
  let prev = NaN;
  let iterations = 0;
  let converged = false;
  let stopped = false;

  for (;;) {
    const params = prepareParams(p, mu, sigma);
    const last = iterations >= maxIterations;
    const stopNow = !last && opts.shouldStop !== undefined && opts.shouldStop();
    // The E-step both scores the current parameters and fills the missing cells.
    acc.center.set(mu);
    acc.sum.fill(0);
    acc.cross.fill(0);
    const logLik = eStep(data, p, patterns, params, ws, filled, condVar, acc, opts.shouldStop);
    if (logLik === undefined) {
      stopped = true;
      break;
    }
    if (iterations === 0) initialLogLikelihood = logLik;
    else {
      trace.push(logLik);
      opts.onIteration?.(iterations, logLik);
      if (Math.abs(logLik - prev) <= opts.tolerance * Math.max(1, Math.abs(prev))) converged = true;
    }
    prev = logLik;
    sigma = params.sigma;
    if (last || converged) break;
    if (stopNow) {
      stopped = true;
      break;
    }
    // M-step
    const newMu = new Float64Array(p);
    const newSigma = new Float64Array(p * p);
    const { center, sum, cross } = acc;
    const inv = n > 0 ? 1 / n : 0;
    for (let j = 0; j < p; j++) newMu[j] = center[j] + sum[j] * inv;
    const keep = 1 - shrinkage;
    for (let j = 0; j < p; j++) {
      const dj = sum[j] * inv;
      for (let k = j; k < p; k++) {
        let s = cross[j * p + k] * inv - dj * sum[k] * inv;
        if (k === j) {
          if (!(s >= floor)) s = floor;
          newSigma[j * p + j] = s;
        } else {
          s *= keep;
          newSigma[j * p + k] = s;
          newSigma[k * p + j] = s;
        }
      }
    }
    mu = newMu;
    sigma = newSigma;
    iterations++;
  }

  return {
    n,
    p,
    mu,
    sigma,
    initialLogLikelihood,
    logLikelihoodTrace: trace,
    iterations,
    converged,
    stopped,
    filled,
    conditionalVariance: condVar,
  };
}
