import { describe, expect, it } from 'vitest';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import type { Centering } from '../../../src-shared/engine/types';
import { createRng } from '../../../src-shared/engine/random';
import { matrixOf } from './helpers';

/**
 * An exactly rank-k matrix, 30 % of its cells hidden. Under centering `both` the matrix is
 * a_i + c_j + Σ_{t<k−2} u_it v_jt: still exactly rank k (a·1ᵀ + 1·cᵀ has rank 2), and whatever
 * two-way baseline is fitted, the residual y − b keeps rank ≤ k, so a rank-k fit with λ = 0
 * can drive the loss to rounding level.
 */
function exactCase(rows: number, cols: number, k: number, centering: Centering, seed: number) {
  const rng = createRng(seed);
  const inner = centering === 'both' ? k - 2 : k;
  const u = new Float64Array(rows * inner).map(() => rng.normal());
  const v = new Float64Array(cols * inner).map(() => rng.normal());
  const a = new Float64Array(rows).map(() => (centering === 'both' ? rng.normal() : 0));
  const c = new Float64Array(cols).map(() => (centering === 'both' ? rng.normal() : 0));
  const truth = new Float64Array(rows * cols);
  const mask = new Uint8Array(rows * cols);
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) {
      let s = a[i] + c[j];
      for (let t = 0; t < inner; t++) s += u[i * inner + t] * v[j * inner + t];
      truth[i * cols + j] = s;
      mask[i * cols + j] = rng.next() < 0.7 ? 1 : 0;
    }
  return {
    matrix: matrixOf(
      rows,
      cols,
      truth.map((x, q) => (mask[q] ? x : NaN)),
    ),
    truth,
    mask,
  };
}

describe('convergence floor on exact low-rank matrices', () => {
  // Source: a rank-k matrix of generic factors sampled at 70 % is determined by its observed
  // cells (r(m+n−r) ≪ observed count; Candès & Recht 2009), so ALS at λ = 0 drives the loss
  // toward 0 and stalls at rounding level; rounding noise there must read as converged.
  for (const centering of ['none', 'both'] as const) {
    for (const k of [2, 3, 4, 5]) {
      it(`rank ${k}, λ 0, centering ${centering}: converged, not diverging, hidden cells recovered`, () => {
        const { matrix, truth, mask } = exactCase(60, 40, k, centering, 100 + k);
        const fit = fitModel(matrix, {
          ...defaultLowRankSettings(),
          rank: k,
          lambda: 0,
          centering,
          clipToScale: false,
          maxIterations: 1000,
          tolerance: 1e-14,
          seed: k,
        });
        expect(fit.converged).toBe(true);
        expect(fit.iterations).toBeLessThan(1000);
        let worst = 0;
        for (let q = 0; q < mask.length; q++)
          if (!mask[q]) worst = Math.max(worst, Math.abs(fit.predictions[q] - truth[q]));
        // Entries are O(1): an exact recovery leaves only rounding-sized errors on hidden cells.
        expect(worst).toBeLessThan(1e-6);
      });
    }
  }
});
