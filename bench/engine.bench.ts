/**
 * Engine benchmark (run by `npm run bench`; not a test). Prints:
 *  1. ms per ALS iteration (rank 10) on generated matrices from 100 × 100 to 10,000 × 1,000
 *     with 1–10 % observed, normalized per 100,000 observed cells, with peak memory;
 *  2. the hand-written kernel against a plain reference ALS kept in bench/referenceAls.ts
 *     (one ml-matrix solve per row/column), same data, same update, same run;
 *  3. one k × k solve: ml-matrix (LU solve, and its Cholesky class) against the in-place
 *     Cholesky of src-shared/engine/cholesky.ts;
 *  4. a 5-fold tune of a 60 × 40 matrix over 6 ranks × 4 λ × 4 centerings;
 *  5. open data (movie-ratings-small, skipped when absent): 5-fold RMSE of the global mean,
 *     the two-way baseline, and a tuned factorization.
 * Targets: ≤ 20 ms per iteration per 100,000 observed cells at rank 10; tune < 3 s.
 */
import { CholeskyDecomposition, Matrix, solve } from 'ml-matrix';
import { fitModel } from '../src-shared/engine/fitModel';
import { defaultLowRankSettings } from '../src-shared/engine/defaults';
import { sparseFromDense } from '../src-shared/matrix/sparseRatings';
import { createWorkspace, ridgeHalfStep } from '../src-shared/engine/lowRank';
import { choleskyInPlace, choleskySolveInPlace } from '../src-shared/engine/cholesky';
import { createRng } from '../src-shared/engine/random';
import { spectralStart } from '../src-shared/engine/spectral';
import { crossValidate, makeFolds } from '../src-shared/engine/crossValidation';
import { expandLowRankGrid, tune } from '../src-shared/engine/tuning';
import type { RatingMatrix } from '../src-shared/matrix/ratingMatrix';
import { referenceSweep } from './referenceAls';
import { loadMovieRatings, movieRatingsAvailable, movieRatingsPath } from './datasets';

const gc = (globalThis as { gc?: () => void }).gc;
const MB = 1024 * 1024;

function generate(rows: number, cols: number, fraction: number, rank: number, seed: number): RatingMatrix {
  const rng = createRng(seed);
  const u = new Float64Array(rows * rank).map(() => rng.normal() / Math.sqrt(rank));
  const v = new Float64Array(cols * rank).map(() => rng.normal());
  const values = new Float64Array(rows * cols).fill(NaN);
  for (let c = 0; c < values.length; c++) {
    if (rng.next() >= fraction) continue;
    const i = (c / cols) | 0;
    const j = c % cols;
    let s = 3;
    for (let t = 0; t < rank; t++) s += u[i * rank + t] * v[j * rank + t];
    values[c] = s + 0.3 * rng.normal();
  }
  return {
    rowLabels: Array.from({ length: rows }, (_, i) => `r${i}`),
    colLabels: Array.from({ length: cols }, (_, j) => `c${j}`),
    values,
    scale: { min: -10, max: 16, step: 0 },
  };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

function fmt(x: number, d = 1): string {
  return x.toFixed(d);
}

// ---------------------------------------------------------------- 1. ms per iteration
console.log('1. ALS iteration time, rank 10, centering both, λ 1 (median over iterations 2..N)');
console.log("   wall = elapsed time; cpu = this process's CPU time (less sensitive to other load on the 2 cores)");
console.log(
  '   size            observed   obs. cells   wall ms/iter   cpu ms/iter   per 100k obs (wall / cpu)   peak RSS (MB)   linear working set (MB)',
);
const sizes: [number, number, number, number][] = [
  [100, 100, 0.1, 10],
  [1000, 500, 0.05, 10],
  [2000, 1000, 0.05, 8],
  [10000, 1000, 0.01, 8],
  [10000, 1000, 0.1, 6],
];
const perIterPer100k: number[] = [];
const perIterPer100kCpu: number[] = [];
for (const [rows, cols, fraction, iters] of sizes) {
  const m = generate(rows, cols, fraction, 10, rows + cols);
  gc?.();
  const stamps: number[] = [];
  const cpu: number[] = [];
  const fit = fitModel(
    m,
    { ...defaultLowRankSettings(), rank: 10, lambda: 1, tolerance: 0, maxIterations: iters },
    {
      onProgress: () => {
        stamps.push(performance.now());
        const c = process.cpuUsage();
        cpu.push((c.user + c.system) / 1000);
      },
    },
  );
  const perIter = median(stamps.slice(1).map((t, i) => t - stamps[i]));
  const perIterCpu = median(cpu.slice(1).map((t, i) => t - cpu[i]));
  const n = m.values.reduce((a, x) => (x === x ? a + 1 : a), 0);
  const per100k = (perIter * 100_000) / n;
  const per100kCpu = (perIterCpu * 100_000) / n;
  if (n >= 100_000) {
    perIterPer100k.push(per100k);
    perIterPer100kCpu.push(per100kCpu);
  }
  // Linear part: sparse index (4 Int32 + 2 Float64 per observed cell) + factors (rows+cols)·k·8 bytes.
  const linear = (n * (4 * 4 + 2 * 8) + (rows + cols) * 10 * 8) / MB;
  const peakRss = process.resourceUsage().maxRSS / 1024; // maxRSS is in kilobytes
  console.log(
    `   ${`${rows} × ${cols}`.padEnd(15)} ${`${fraction * 100} %`.padEnd(10)} ${String(n).padEnd(12)} ${fmt(perIter, 2).padEnd(14)} ${fmt(perIterCpu, 2).padEnd(13)} ${`${fmt(per100k, 2)} / ${fmt(per100kCpu, 2)}`.padEnd(27)} ${fmt(peakRss, 0).padEnd(15)} ${fmt(linear)}`,
  );
  if (fit.iterations !== iters) console.log(`   (stopped after ${fit.iterations} iterations)`);
}
console.log(`   peak RSS is the whole process's high-water mark so far (grows with the largest case); dense layers`);
console.log(`   (input values, predictions, baseline) add 24 bytes per cell (rows × cols) on top of the linear part.`);
console.log(
  `   target ≤ 20 ms per iteration per 100k observed cells (cases with ≥ 100k observed): worst ${fmt(Math.max(...perIterPer100k), 2)} ms wall, ${fmt(Math.max(...perIterPer100kCpu), 2)} ms cpu`,
);

// ---------------------------------------------------------------- 2. kernel vs reference
{
  const m = generate(2000, 1000, 0.05, 10, 7);
  const rows = 2000;
  const cols = 1000;
  const k = 10;
  const idx = sparseFromDense(m.values, rows, cols);
  const resRow = new Float64Array(idx.n);
  for (let p = 0; p < idx.n; p++) resRow[p] = idx.rowVal[p];
  const resCol = new Float64Array(idx.n);
  for (let q = 0; q < idx.n; q++) resCol[q] = idx.colVal[q];
  const start = spectralStart(idx, resRow, k, 1)!;
  const ws = createWorkspace(k);
  const timeOurs = (): number => {
    const u = new Float64Array(start.rowFactors);
    const v = new Float64Array(start.colFactors);
    const ts: number[] = [];
    for (let it = 0; it < 6; it++) {
      const t0 = performance.now();
      ridgeHalfStep(u, v, idx.rowPtr, idx.rowCol, resRow, 1, false, ws);
      ridgeHalfStep(v, u, idx.colPtr, idx.colRow, resCol, 1, false, ws);
      ts.push(performance.now() - t0);
    }
    return median(ts.slice(1));
  };
  const timeRef = (): number => {
    const u = new Float64Array(start.rowFactors);
    const v = new Float64Array(start.colFactors);
    const ts: number[] = [];
    for (let it = 0; it < 3; it++) {
      const t0 = performance.now();
      referenceSweep(idx, resRow, resCol, u, v, k, 1);
      ts.push(performance.now() - t0);
    }
    return median(ts.slice(1));
  };
  const ours = timeOurs();
  const ref = timeRef();
  console.log(`\n2. One ALS sweep, 2000 × 1000, ${idx.n} observed cells, rank 10`);
  console.log(
    `   hand-written typed-array kernel: ${fmt(ours, 2)} ms;  reference (ml-matrix solve per row/column): ${fmt(ref, 1)} ms;  ratio ${fmt(ref / ours)}×`,
  );
}

// ---------------------------------------------------------------- 3. one k × k solve
{
  const k = 10;
  const count = 200;
  const rng = createRng(3);
  const mats: Matrix[] = [];
  const flat: Float64Array[] = [];
  const rhs: number[][] = [];
  for (let t = 0; t < count; t++) {
    const b = new Matrix(k + 5, k);
    for (let i = 0; i < k + 5; i++) for (let j = 0; j < k; j++) b.set(i, j, rng.normal());
    const a = b.transpose().mmul(b).add(Matrix.eye(k));
    mats.push(a);
    flat.push(Float64Array.from(a.to1DArray()));
    rhs.push(Array.from({ length: k }, () => rng.normal()));
  }
  const reps = 100_000;
  const buf = new Float64Array(k * k);
  const x = new Float64Array(k);
  let sink = 0;
  const time = (f: (t: number) => void): number => {
    for (let t = 0; t < 5000; t++) f(t % count); // warm-up
    const t0 = performance.now();
    for (let t = 0; t < reps; t++) f(t % count);
    return ((performance.now() - t0) * 1000) / reps; // µs per solve
  };
  const ours = time((t) => {
    buf.set(flat[t]);
    choleskyInPlace(buf, k);
    for (let c = 0; c < k; c++) x[c] = rhs[t][c];
    choleskySolveInPlace(buf, k, x);
    sink += x[0];
  });
  const lu = time((t) => {
    sink += solve(mats[t], Matrix.columnVector(rhs[t])).get(0, 0);
  });
  const chol = time((t) => {
    sink += new CholeskyDecomposition(mats[t]).solve(Matrix.columnVector(rhs[t])).get(0, 0);
  });
  console.log(
    `\n3. One ${k} × ${k} SPD solve (µs): in-place Cholesky ${fmt(ours, 3)}; ml-matrix solve (LU) ${fmt(lu, 2)} (${fmt(lu / ours)}×); ml-matrix CholeskyDecomposition ${fmt(chol, 2)} (${fmt(chol / ours)}×)${sink === 42 ? ' ' : ''}`,
  );
}

// ---------------------------------------------------------------- 4. tune of a small matrix
{
  const rng = createRng(11);
  const rows = 60;
  const cols = 40;
  const a = Array.from({ length: rows }, () => rng.normal());
  const b = Array.from({ length: cols }, () => rng.normal());
  const values = new Float64Array(rows * cols).fill(NaN);
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++)
      if (rng.next() < 0.4)
        values[i * cols + j] = Math.min(
          5,
          Math.max(1, Math.round(3 + 0.5 * a[i] + 0.5 * b[j] + 0.6 * a[i] * b[j] + 0.5 * rng.normal())),
        );
  const m: RatingMatrix = {
    rowLabels: a.map((_, i) => `r${i}`),
    colLabels: b.map((_, j) => `c${j}`),
    values,
    scale: { min: 1, max: 5, step: 1 },
  };
  const list = expandLowRankGrid({
    ranks: [0, 1, 2, 3, 5, 8],
    lambdas: [0.1, 1, 10, 30],
    centerings: ['none', 'row', 'column', 'both'],
  });
  const t0 = performance.now();
  const r = tune(m, { settings: list }, 5, 1);
  const ms = performance.now() - t0;
  const best = r.best.settings;
  const one = r.oneStandardError.settings;
  console.log(
    `\n4. 5-fold tune, 60 × 40 (40 % observed, 1–5), ${list.length} settings = ${list.length * 5} fits: ${fmt(ms, 0)} ms (target < 3000 ms)`,
  );
  if (best.model === 'lowrank' && one.model === 'lowrank')
    console.log(
      `   best rank ${best.rank}, λ ${best.lambda}, ${best.centering} (RMSE ${r.best.meanRmse.toFixed(4)}); one-SE choice rank ${one.rank}, λ ${one.lambda}, ${one.centering} (RMSE ${r.oneStandardError.meanRmse.toFixed(4)})`,
    );
}

// ---------------------------------------------------------------- 5. open data
if (!movieRatingsAvailable()) {
  console.log(`\n5. open data skipped: ${movieRatingsPath} is absent`);
} else {
  // GroupLens movie-ratings-small (Harper & Konstan, 2015), read in place; rows = films, columns = people.
  const m = loadMovieRatings();
  const folds = makeFolds(m, 5, 1);
  const base = { ...defaultLowRankSettings(), rank: 0 };
  console.log(
    `\n5. movie-ratings-small: ${m.rowLabels.length} films × ${m.colLabels.length} people, ${folds.sizes.reduce((a, b) => a + b, 0)} ratings, 5 folds (seed 1), predictions clipped to [0.5, 5]`,
  );
  const show = (label: string, cv: { meanRmse: number; sdRmse: number; meanMae: number }) =>
    console.log(
      `   ${label.padEnd(52)} RMSE ${cv.meanRmse.toFixed(4)} ± ${cv.sdRmse.toFixed(4)}   MAE ${cv.meanMae.toFixed(4)}`,
    );
  // Global mean: two-way centering with offsets shrunk to ~0 by a huge γ.
  show('global mean', crossValidate(m, { ...base, centering: 'both', offsetLambda: 1e12 }, folds));
  show('row (film) means', crossValidate(m, { ...base, centering: 'row' }, folds));
  show('column (person) means', crossValidate(m, { ...base, centering: 'column' }, folds));
  show('two-way baseline (offset γ 5)', crossValidate(m, { ...base, centering: 'both' }, folds));
  {
    // The real data's shape (many films with a handful of ratings, people with hundreds): ms per sweep.
    const stamps: number[] = [];
    fitModel(
      m,
      { ...defaultLowRankSettings(), rank: 10, lambda: 10, tolerance: 0, maxIterations: 8 },
      { onProgress: () => stamps.push(performance.now()) },
    );
    const n = m.values.reduce((a, x) => (x === x ? a + 1 : a), 0);
    const perIter = median(stamps.slice(1).map((t, i) => t - stamps[i]));
    console.log(
      `   ALS iteration on all ${n} ratings, rank 10, λ 10: ${fmt(perIter, 2)} ms = ${fmt((perIter * 100_000) / n, 2)} ms per 100k (target ≤ 20)`,
    );
  }
  const t0 = performance.now();
  const grid = expandLowRankGrid({
    ranks: [2, 5, 10],
    lambdas: [5, 10, 20],
    centerings: ['both'],
    base: { maxIterations: 30, tolerance: 1e-4 },
  });
  const r = tune(m, { settings: grid }, 5, 1);
  const secs = (performance.now() - t0) / 1000;
  for (const row of r.table) {
    const s = row.settings;
    if (s.model === 'lowrank') show(`ALS rank ${s.rank}, λ ${s.lambda}, two-way centred`, row);
  }
  const b = r.best.settings;
  const o = r.oneStandardError.settings;
  if (b.model === 'lowrank' && o.model === 'lowrank')
    console.log(
      `   tuned (${grid.length} settings × 5 folds in ${fmt(secs)} s): best rank ${b.rank}, λ ${b.lambda} → RMSE ${r.best.meanRmse.toFixed(4)}; one-SE choice rank ${o.rank}, λ ${o.lambda} → ${r.oneStandardError.meanRmse.toFixed(4)}`,
    );
}
