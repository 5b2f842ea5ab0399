/** Test helpers: synthetic matrices built from a seeded generator. */
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';
import { createRng } from '../../../src-shared/engine/random';

function labels(prefix: string, n: number): string[] {
  return Array.from({ length: n }, (_, i) => `${prefix}${i + 1}`);
}

export function matrixOf(
  rows: number,
  cols: number,
  values: Float64Array,
  scale = { min: -1e9, max: 1e9, step: 0 },
): RatingMatrix {
  return { rowLabels: labels('r', rows), colLabels: labels('c', cols), values, scale };
}

/** truth = U Vᵀ (+ N(0, σ²) noise), entries of U, V standard normal; `observed` fraction kept. */
export function lowRankCase(rows: number, cols: number, rank: number, sigma: number, observed: number, seed: number) {
  const rng = createRng(seed);
  const u = new Float64Array(rows * rank).map(() => rng.normal());
  const v = new Float64Array(cols * rank).map(() => rng.normal());
  const noisy = new Float64Array(rows * cols);
  const clean = new Float64Array(rows * cols);
  const mask = new Uint8Array(rows * cols);
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) {
      let s = 0;
      for (let c = 0; c < rank; c++) s += u[i * rank + c] * v[j * rank + c];
      clean[i * cols + j] = s;
      noisy[i * cols + j] = s + sigma * rng.normal();
      mask[i * cols + j] = rng.next() < observed ? 1 : 0;
    }
  const values = noisy.map((x, c) => (mask[c] ? x : NaN));
  return { matrix: matrixOf(rows, cols, values), noisy, clean, mask };
}
