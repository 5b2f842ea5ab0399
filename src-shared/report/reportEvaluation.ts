/**
 * The cross-validation behind the report's "how well it fills" section: the run's own
 * settings and three baseline-only models (rank 0: nothing but baselines), all scored
 * on the same folds, so the reader sees what the model adds to the baselines.
 */
import type { TunePayload } from '../api';
import { DEFAULT_FOLDS, defaultLowRankSettings } from '../engine/defaults';
import type { Centering, FitSettings, LowRankSettings } from '../engine/types';

export const REPORT_FOLDS = DEFAULT_FOLDS;

/** The baselines alone, in the order they follow the run's own row. */
export const BASELINE_MODELS: readonly { centering: Centering; words: string }[] = [
  { centering: 'both', words: 'Row and column baselines alone' },
  { centering: 'row', words: 'Row means alone' },
  { centering: 'column', words: 'Column means alone' },
];

/** [the run's settings, then each baseline alone] — send as one settings grid on shared folds. */
export function reportEvaluationSettings(run: FitSettings): FitSettings[] {
  const base: LowRankSettings = {
    ...defaultLowRankSettings(),
    ...(run.model === 'lowrank' ? { offsetLambda: run.offsetLambda } : {}),
    rank: 0,
    maxIterations: run.maxIterations,
    seed: run.seed,
    clipToScale: run.clipToScale,
    snapToStep: run.snapToStep,
  };
  return [run, ...BASELINE_MODELS.map((b) => ({ ...base, centering: b.centering }))];
}

export interface EvaluationRow {
  words: string;
  isRun: boolean;
  meanRmse: number;
  sdRmse: number;
  meanMae: number;
  sdMae: number;
  foldRmse: number[];
  error?: string;
}

const num = (x: number | null | undefined): number => (x === null || x === undefined ? NaN : x);

/** The report's rows; the first is the run ("This model"). */
export function evaluationRows(e: TunePayload, runWords: string): EvaluationRow[] {
  return e.table.map((r, i) => ({
    words: i === 0 ? runWords : (BASELINE_MODELS[i - 1]?.words ?? `Baseline ${i}`),
    isRun: i === 0,
    meanRmse: num(r.meanRmse),
    sdRmse: num(r.sdRmse),
    meanMae: num(r.meanMae),
    sdMae: num(r.sdMae),
    foldRmse: r.folds.map((f) => num(f.rmse)),
    ...(r.error ? { error: r.error } : {}),
  }));
}
