/**
 * Evaluate and tune through the engine pool when there is one, in this thread otherwise;
 * both paths run the same fold tasks, so they give the same numbers.
 */
import type { SparseMatrix } from '../../src-shared/matrix/sparseRatings';
import {
  foldIntervals,
  gatherHeldOut,
  makeFolds,
  scoreOrThrow,
  summarizeFolds,
  type CrossValidationResult,
  type Folds,
} from '../../src-shared/engine/crossValidation';
import { compareSeedModels, type SeedStability } from '../../src-shared/engine/seedStability';
import type { SparseModel } from '../../src-shared/engine/fitModel';
import { chooseFromTable, tableFromOutcomes, type TuneResult } from '../../src-shared/engine/tuning';
import type { FitSettings } from '../../src-shared/engine/types';
import type { FoldOutcome } from '../../src-shared/engine/foldTask';
import { runFoldsInProcess, type EnginePool, type FoldJob } from './enginePool';

function run(pool: EnginePool | undefined, job: FoldJob): Promise<FoldOutcome[][]> {
  return pool ? pool.runFolds(job) : Promise.resolve(runFoldsInProcess(job));
}

export interface EvaluateOptions {
  keepHeldOut?: boolean;
  /** Interval levels to measure on the folds (fits in the pool, calibration here: foldIntervals). */
  intervalLevels?: number[];
}

/** crossValidate(matrix, settings, makeFolds(matrix, k, seed), opts) with the folds on the pool. */
export async function evaluateOnPool(
  pool: EnginePool | undefined,
  matrix: SparseMatrix,
  settings: FitSettings,
  k: number,
  seed: number,
  opts: EvaluateOptions = {},
): Promise<CrossValidationResult> {
  const folds = makeFolds(matrix, k, seed);
  const levels = opts.intervalLevels ?? [];
  const outcomes = await run(pool, {
    matrix,
    folds,
    settings: [settings],
    reuse: false,
    keepHeldOut: opts.keepHeldOut,
    keepModels: levels.length > 0,
  });
  const first = outcomes.map((perFold) => perFold[0]);
  const result = summarizeFolds(first.map(scoreOrThrow));
  if (opts.keepHeldOut)
    result.heldOut = gatherHeldOut(
      folds,
      first.map((o) => ('heldOut' in o ? o.heldOut : undefined)),
    );
  if (levels.length) {
    const models = first
      .map((o) => ('model' in o ? o.model : undefined))
      .filter((x): x is SparseModel => x !== undefined);
    const intervals = foldIntervals(matrix, folds, settings, models, levels);
    if (intervals) result.intervals = intervals;
  }
  return result;
}

export async function tuneOnPool(
  pool: EnginePool | undefined,
  matrix: SparseMatrix,
  list: FitSettings[],
  k: number,
  seed: number,
  reuse = true,
): Promise<TuneResult> {
  if (list.length === 0) throw new Error('the tuning grid is empty');
  const folds = makeFolds(matrix, k, seed);
  const outcomes = await run(pool, { matrix, folds, settings: list, reuse });
  const table = tableFromOutcomes(list, outcomes);
  return { k, seed, table, ...chooseFromTable(table, k) };
}

/**
 * Seed stability's two fits on all the data (seeds s and s + 1), as two pool jobs of one
 * task each, so they run beside each other and beside any job started with them. A fold
 * set where no cell is held out (k = 1, every entry in no fold) makes the fold task fit the
 * whole matrix: the same fit as fitModelSparse(matrix, settings).
 */
export async function seedStabilityOnPool(
  pool: EnginePool | undefined,
  matrix: SparseMatrix,
  settings: FitSettings,
): Promise<SeedStability> {
  const s = settings.seed;
  const whole: Folds = { k: 1, seed: s, foldOf: new Int32Array(matrix.data.n).fill(-1), sizes: [0] };
  const fitOne = async (seed: number): Promise<SparseModel> => {
    const [[o]] = await run(pool, {
      matrix,
      folds: whole,
      settings: [{ ...settings, seed }],
      reuse: false,
      keepModels: true,
    });
    if ('error' in o) throw o.error;
    if (!o.model) throw new Error('the pool returned no model for the seed-stability fit');
    return o.model;
  };
  const [a, b] = await Promise.all([fitOne(s), fitOne(s + 1)]);
  return compareSeedModels(matrix.data, matrix.scale, a, b, [s, s + 1]);
}
