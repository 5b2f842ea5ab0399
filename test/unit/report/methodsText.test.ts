import { describe, expect, it } from 'vitest';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { defaultGaussianSettings } from '../../../src-shared/engine/gaussian/settings';
import type { TunePayload } from '../../../src-shared/api';
import type { FitSettings, LowRankSettings } from '../../../src-shared/engine/types';
import { methodsText, smallNumber, REFERENCES } from '../../../src-shared/report/methodsText';
import type { ReportInput } from '../../../src-shared/report/reportInput';
import { articleFor } from '../../../src-shared/report/html';

const matrix = {
  rowLabels: ['a', 'b', 'c'],
  colLabels: ['x', 'y'],
  values: Float64Array.from([1, NaN, 3, 4, NaN, 2]),
  scale: { min: 1, max: 5, step: 1 },
};

function input(settings: FitSettings, extra: Partial<ReportInput> = {}): ReportInput {
  return {
    title: 't',
    app: { name: 'Rankfill', version: '9.9.9' },
    createdAt: '2026-01-01T00:00:00.000Z',
    matrix,
    inputSha256: 'ab',
    run: {
      label: 'Run 1',
      settings,
      iterations: 12,
      converged: true,
      finalObjective: 3,
      objectiveTrace: [5, 3],
      refitsAfterEdits: 0,
    },
    evaluation: null,
    centering: null,
    tuning: null,
    exports: [],
    ...extra,
  };
}

const row = (settings: FitSettings, rmse: number) => ({
  settings,
  folds: [],
  meanRmse: rmse,
  sdRmse: 0.1,
  meanMae: rmse * 0.8,
  sdMae: 0.05,
});

describe('methods paragraph', () => {
  it('states the low-rank settings, the scale and the observed share in words', () => {
    const s: LowRankSettings = { ...defaultLowRankSettings(), rank: 3, lambda: 2.5, centering: 'row', seed: 7 };
    const t = methodsText(input(s));
    expect(t.paragraph).toContain(
      '3 rows by 2 columns on a scale of 1 to 5 in steps of 1; 4 of 6 cells (66.7 %) were observed.',
    );
    expect(t.paragraph).toContain('rank-3 factorization of the ratings after removing each row’s mean (λ = 2.5)');
    expect(t.paragraph).toContain('alternating least squares (ALS; Hastie, Mazumder, Lee & Zadeh, 2015)');
    expect(t.paragraph).toContain('settled after 12 sweeps (relative change below 1e-6)');
    expect(t.paragraph).toContain('clipped to the rating scale');
    expect(t.paragraph).toContain('Computed with Rankfill 9.9.9 (seed 7).');
    expect(t.paragraph).toContain('was not cross-validated');
    expect(t.references).toEqual([REFERENCES.als]);
  });

  it('names EM (Dempster, Laird & Rubin 1977) for the Gaussian model, with its shrinkage', () => {
    const t = methodsText(input({ ...defaultGaussianSettings(), shrinkage: 0.1, transpose: true }));
    expect(t.paragraph).toContain('each column is one draw over the rows');
    expect(t.paragraph).toContain('EM algorithm (Dempster, Laird & Rubin, 1977)');
    expect(t.paragraph).toContain('shrunk by a factor 0.1 toward its diagonal');
    expect(t.paragraph).not.toContain('ALS');
    expect(t.references).toEqual([REFERENCES.em]);
  });

  it('reports the cross-validated errors beside the baselines and cites §7.10', () => {
    const s = defaultLowRankSettings();
    const evaluation: TunePayload = {
      k: 5,
      seed: 1,
      table: [row(s, 0.91234), row({ ...s, rank: 0 }, 1.2)],
      bestIndex: 0,
      oneStandardErrorIndex: 0,
      threshold: 1,
    };
    const t = methodsText(input(s, { evaluation }));
    expect(t.paragraph).toContain(
      '5-fold cross-validation over the observed cells (seed 1; Hastie, Tibshirani & Friedman, 2009, §7.10)',
    );
    expect(t.paragraph).toContain('(RMSE) of 0.912 (standard deviation 0.100 across folds)');
    expect(t.paragraph).toContain('against an RMSE of 1.200 for the row and column baselines alone on the same folds');
    expect(t.references).toEqual([REFERENCES.als, REFERENCES.cv]);
  });

  it('says the setting was chosen by the one-standard-error rule when the run is the tuning’s choice', () => {
    const s = { ...defaultLowRankSettings(), rank: 1 };
    const tuning: TunePayload = {
      k: 4,
      seed: 3,
      table: [row({ ...s, rank: 0 }, 1.3), row(s, 1.01), row({ ...s, rank: 2 }, 1.0)],
      bestIndex: 2,
      oneStandardErrorIndex: 1,
      threshold: 1.04,
    };
    const chosen = methodsText(input(s, { tuning })).paragraph;
    expect(chosen).toContain(
      'chosen by 4-fold cross-validation (seed 3, the same folds for every setting) from ranks 0, 1, 2 × λ 1',
    );
    expect(chosen).toContain('one-standard-error rule (Hastie, Tibshirani & Friedman, 2009, §7.10)');
    const best = methodsText(input({ ...s, rank: 2 }, { tuning })).paragraph;
    expect(best).toContain('as the one with the lowest mean RMSE');
    const other = methodsText(input({ ...s, rank: 5 }, { tuning })).paragraph;
    expect(other).toContain('this run does not use either');
  });

  it('adds the interval method and its source when the run carries intervals', () => {
    const t = methodsText(
      input(defaultLowRankSettings(), {
        intervals: {
          method: 'split-conformal interval',
          sources: ['A. Author (2005). A book.'],
          citation: 'Author, 2005',
          level: 0.9,
          coverage: 0.893,
          meanWidth: 2.345,
        },
      }),
    );
    expect(t.paragraph).toContain(
      'Each filled value was given a 90 % split-conformal interval (Author, 2005); on held-out ratings 89.3 % fell inside their interval, with a mean width of 2.35 rating units.',
    );
    expect(t.references).toContain('A. Author (2005). A book.');
  });

  it('says "an 80 %" but "a 90 %" (English usage, from memory)', () => {
    expect(['80 %', '8', '11', '18 %', '90 %', '1 %', '110', '180', '800', '8000'].map(articleFor)).toEqual([
      'an',
      'an',
      'an',
      'an',
      'a',
      'a',
      'a',
      'a',
      'an',
      'an',
    ]);
  });

  it('writes tolerances as 1e-6, not 0.000001', () => {
    expect(smallNumber(1e-6)).toBe('1e-6');
    expect(smallNumber(2.5e-4)).toBe('2.5e-4');
    expect(smallNumber(0.01)).toBe('0.01');
  });
});
