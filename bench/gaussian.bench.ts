/**
 * Speed of the Gaussian (EM) model: a 2,800 × 25 matrix from a correlated normal with
 * 20 % of cells missing completely at random, 50 EM iterations.
 *
 * Compared, in the same run, with a plain per-row reference kept below: every row
 * factors its own Σ_oo (no grouping, no precision route) with nested number[][] arrays,
 * the way a straightforward per-row loop would. Both must reach the same μ and Σ.
 *
 * Run alone: npx tsx bench/gaussian.bench.ts
 */

import { fitGaussian } from '../src-shared/engine/gaussian/fitGaussian';
import { defaultGaussianSettings } from '../src-shared/engine/gaussian/settings';
import { emGaussian } from '../src-shared/engine/gaussian/emGaussian';
import { createRng } from '../src-shared/engine/random';
import type { RatingMatrix } from '../src-shared/matrix/ratingMatrix';

const N = 2800;
const P = 25;
const ITERATIONS = 50;
const MISSING = 0.2;

function makeData(seed: number): Float64Array {
  // three latent factors plus noise → a correlated 25-variable normal
  const rng = createRng(seed);
  const load = new Float64Array(P * 3);
  for (let c = 0; c < load.length; c++) load[c] = 0.3 + 0.5 * rng.next();
  const out = new Float64Array(N * P);
  for (let i = 0; i < N; i++) {
    const f0 = rng.normal();
    const f1 = rng.normal();
    const f2 = rng.normal();
    for (let j = 0; j < P; j++) {
      const x =
        3 +
        load[j * 3] * f0 +
        load[j * 3 + 1] * f1 * (j % 2 ? 1 : -1) +
        load[j * 3 + 2] * f2 * ((j % 3) - 1) +
        0.5 * rng.normal();
      out[i * P + j] = rng.next() < MISSING ? NaN : x;
    }
  }
  return out;
}

/** Plain per-row EM reference (same start, same M-step, no shrinkage). */
function referenceEm(
  data: Float64Array,
  n: number,
  p: number,
  iterations: number,
): { mu: number[]; sigma: number[][] } {
  const mu: number[] = [];
  const sigma: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let j = 0; j < p; j++) {
    const xs: number[] = [];
    for (let i = 0; i < n; i++) if (!Number.isNaN(data[i * p + j])) xs.push(data[i * p + j]);
    const m = xs.reduce((a, b) => a + b, 0) / xs.length;
    mu.push(m);
    sigma[j][j] = xs.reduce((a, b) => a + (b - m) ** 2, 0) / xs.length;
  }
  for (let it = 0; it < iterations; it++) {
    const sum = new Array<number>(p).fill(0);
    const cross: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
    for (let i = 0; i < n; i++) {
      const row = Array.from(data.subarray(i * p, i * p + p));
      const o: number[] = [];
      const mis: number[] = [];
      row.forEach((x, j) => (Number.isNaN(x) ? mis : o).push(j));
      // Cholesky of this row's Σ_oo
      const L = o.map(() => new Array<number>(o.length).fill(0));
      for (let a = 0; a < o.length; a++) {
        for (let b = 0; b <= a; b++) {
          let s = sigma[o[a]][o[b]];
          for (let t = 0; t < b; t++) s -= L[a][t] * L[b][t];
          L[a][b] = a === b ? Math.sqrt(s) : s / L[b][b];
        }
      }
      const solve = (rhs: number[]): number[] => {
        const y = rhs.slice();
        for (let a = 0; a < y.length; a++) {
          for (let t = 0; t < a; t++) y[a] -= L[a][t] * y[t];
          y[a] /= L[a][a];
        }
        for (let a = y.length - 1; a >= 0; a--) {
          for (let t = a + 1; t < y.length; t++) y[a] -= L[t][a] * y[t];
          y[a] /= L[a][a];
        }
        return y;
      };
      const w = solve(o.map((j) => row[j] - mu[j]));
      const xhat = row.slice();
      for (const j of mis) xhat[j] = mu[j] + o.reduce((s, k, a) => s + sigma[j][k] * w[a], 0);
      const B = mis.map((j) => solve(o.map((k) => sigma[k][j]))); // Σ_oo⁻¹ Σ_oj
      for (let j = 0; j < p; j++) {
        sum[j] += xhat[j];
        for (let k = 0; k < p; k++) cross[j][k] += xhat[j] * xhat[k];
      }
      // conditional covariance C_jk = Σ_jk − Σ_jo Σ_oo⁻¹ Σ_ok
      mis.forEach((j) =>
        mis.forEach((k, c) => {
          cross[j][k] += sigma[j][k] - o.reduce((s, t, b) => s + sigma[j][t] * B[c][b], 0);
        }),
      );
    }
    for (let j = 0; j < p; j++) mu[j] = sum[j] / n;
    for (let j = 0; j < p; j++) for (let k = 0; k < p; k++) sigma[j][k] = cross[j][k] / n - mu[j] * mu[k];
  }
  return { mu, sigma };
}

function main(): void {
  const data = makeData(20240601);
  const matrix: RatingMatrix = {
    rowLabels: Array.from({ length: N }, (_, i) => `r${i + 1}`),
    colLabels: Array.from({ length: P }, (_, j) => `c${j + 1}`),
    values: data,
    scale: { min: -100, max: 100, step: 0 },
  };
  // tolerance −1: never "converged", so exactly 50 iterations run
  const settings = { ...defaultGaussianSettings(), shrinkage: 0, maxIterations: ITERATIONS, tolerance: -1 };
  fitGaussian(matrix, { ...settings, maxIterations: 2 }); // warm-up (JIT)
  const t0 = performance.now();
  const fit = fitGaussian(matrix, settings);
  const ms = performance.now() - t0;

  const t1 = performance.now();
  const ref = referenceEm(data, N, P, ITERATIONS);
  const refMs = performance.now() - t1;

  const em = emGaussian(data, N, P, { shrinkage: 0, maxIterations: ITERATIONS, tolerance: -1 });
  let diff = 0;
  for (let j = 0; j < P; j++) {
    diff = Math.max(diff, Math.abs(em.mu[j] - ref.mu[j]));
    for (let k = 0; k < P; k++) diff = Math.max(diff, Math.abs(em.sigma[j * P + k] - ref.sigma[j][k]));
  }
  console.log(`gaussian EM ${N} × ${P}, ${Math.round(MISSING * 100)} % missing, ${fit.iterations} iterations`);
  console.log(`  engine:            ${ms.toFixed(0)} ms${ms < 1000 ? '' : '  (over the 1 s goal)'}`);
  console.log(`  per-row reference: ${refMs.toFixed(0)} ms`);
  console.log(`  ratio:             ${(refMs / ms).toFixed(1)}× faster`);
  console.log(`  max |Δ| of μ, Σ vs reference: ${diff.toExponential(2)}`);
  // the two implementations must agree; a disagreement fails the benchmark run
  if (!(diff < 1e-8)) process.exitCode = 1;
}

main();
