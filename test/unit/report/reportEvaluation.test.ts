import { describe, expect, it } from 'vitest';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { defaultGaussianSettings } from '../../../src-shared/engine/gaussian/settings';
import { cellFolds, makeFolds } from '../../../src-shared/engine/crossValidation';
import { tune } from '../../../src-shared/engine/tuning';
import { createRng } from '../../../src-shared/engine/random';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';
import { reportEvaluationSettings } from '../../../src-shared/report/reportEvaluation';

describe('report evaluation: the run beside the baselines alone', () => {
  it('lists the run first, then row+column, row-mean and column-mean baselines at rank 0 with the run’s seed', () => {
    const run = {
      ...defaultLowRankSettings(),
      rank: 4,
      lambda: 3,
      centering: 'row' as const,
      seed: 9,
      offsetLambda: 2,
    };
    const list = reportEvaluationSettings(run);
    expect(list[0]).toBe(run);
    expect(
      list.slice(1).map((s) => (s.model === 'lowrank' ? [s.rank, s.centering, s.seed, s.offsetLambda] : null)),
    ).toEqual([
      [0, 'both', 9, 2],
      [0, 'row', 9, 2],
      [0, 'column', 9, 2],
    ]);
    const g = reportEvaluationSettings({ ...defaultGaussianSettings(), seed: 4 });
    expect(g.slice(1).every((s) => s.model === 'lowrank' && s.rank === 0 && s.seed === 4)).toBe(true);
  });

  it('scores "row means alone" as the RMSE of predicting each hidden rating by its row’s training mean (definition of RMSE, common practice, no source)', () => {
    const rng = createRng(5);
    const rows = 10;
    const cols = 7;
    const values = new Float64Array(rows * cols);
    for (let c = 0; c < values.length; c++) values[c] = rng.next() < 0.25 ? NaN : 1 + Math.round(6 * rng.next());
    const m: RatingMatrix = {
      rowLabels: Array.from({ length: rows }, (_, i) => `r${i}`),
      colLabels: Array.from({ length: cols }, (_, j) => `c${j}`),
      values,
      scale: { min: 1, max: 7, step: 1 },
    };
    const settings = reportEvaluationSettings(defaultLowRankSettings());
    const result = tune(m, { settings }, 5, 1);
    const foldOf = cellFolds(m, makeFolds(m, 5, 1));
    const expected: number[] = [];
    for (let f = 0; f < 5; f++) {
      let se = 0;
      let n = 0;
      for (let i = 0; i < rows; i++) {
        let sum = 0;
        let cnt = 0;
        for (let j = 0; j < cols; j++) {
          const c = i * cols + j;
          if (values[c] === values[c] && foldOf[c] !== f) {
            sum += values[c];
            cnt++;
          }
        }
        for (let j = 0; j < cols; j++) {
          const c = i * cols + j;
          if (foldOf[c] !== f) continue;
          const pred = sum / cnt; // every row keeps a training value (fold repair)
          se += (pred - values[c]) ** 2;
          n++;
        }
      }
      expected.push(Math.sqrt(se / n));
    }
    const rowMeans = result.table[2];
    expect(rowMeans.folds.map((x) => x.rmse)).toEqual(expected.map((x) => expect.closeTo(x, 10)));
  });
});
