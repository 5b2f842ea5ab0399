import { describe, expect, it } from 'vitest';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { fitModel } from '../../../src-shared/engine/fitModel';
import type { FitResult } from '../../../src-shared/engine/types';
import { lowRankCase } from './helpers';

/** F(U, V) = ½ Σ_obs (y − b − u·v)² + λ/2 (Σ w_i‖u_i‖² + Σ w_j‖v_j‖²), straight from its definition. */
function objectiveFromDefinition(values: Float64Array, r: FitResult, lambda: number, byCount: boolean): number {
  const { rows, cols, rank: k } = r;
  let loss = 0;
  const nRow = new Array(rows).fill(0);
  const nCol = new Array(cols).fill(0);
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) {
      const y = values[i * cols + j];
      if (Number.isNaN(y)) continue;
      nRow[i]++;
      nCol[j]++;
      let dot = 0;
      for (let c = 0; c < k; c++) dot += r.rowFactors[i * k + c] * r.colFactors[j * k + c];
      const e = y - r.rowBaseline[i] - r.colBaseline[j] - dot;
      loss += e * e;
    }
  let pen = 0;
  for (let i = 0; i < rows; i++)
    for (let c = 0; c < k; c++) pen += (byCount ? nRow[i] : 1) * r.rowFactors[i * k + c] ** 2;
  for (let j = 0; j < cols; j++)
    for (let c = 0; c < k; c++) pen += (byCount ? nCol[j] : 1) * r.colFactors[j * k + c] ** 2;
  return 0.5 * loss + 0.5 * lambda * pen;
}

describe('the recorded objective', () => {
  // The trace is collected inside the half-steps by an algebraic identity; here it is checked
  // against the objective's definition (stated in lowRank.ts), computed independently.
  const cases = [
    {
      name: 'sparse rows (fewer observations than the rank: dual form)',
      rows: 40,
      cols: 30,
      rank: 6,
      observed: 0.12,
      lambda: 2,
      byCount: false,
    },
    { name: 'λ scaled by counts', rows: 30, cols: 25, rank: 3, observed: 0.5, lambda: 0.3, byCount: true },
    {
      name: 'a complete matrix with λ = 0 (tiny loss: the direct-sum fallback)',
      rows: 12,
      cols: 10,
      rank: 2,
      observed: 1,
      lambda: 0,
      byCount: false,
    },
  ];
  for (const c of cases) {
    it(c.name, () => {
      const { matrix } = lowRankCase(c.rows, c.cols, c.rank, c.observed === 1 ? 0 : 0.2, c.observed, 5);
      for (const iterations of [1, 3, 25]) {
        const settings = {
          ...defaultLowRankSettings(),
          rank: c.rank,
          lambda: c.lambda,
          scaleLambdaByCount: c.byCount,
          centering: 'both' as const,
          maxIterations: iterations,
          tolerance: 0,
          clipToScale: false,
        };
        const r = fitModel(matrix, settings);
        const recorded = r.objectiveTrace[r.objectiveTrace.length - 1];
        const direct = objectiveFromDefinition(matrix.values, r, c.lambda, c.byCount);
        expect(Math.abs(recorded - direct)).toBeLessThanOrEqual(1e-9 * Math.max(direct, 1e-12) + 1e-18);
      }
    });
  }
});
