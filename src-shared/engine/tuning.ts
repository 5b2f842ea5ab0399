/**
 * Grid search with shared folds and the one-standard-error choice.
 *
 * Every setting in the grid is cross-validated on the same folds (makeFolds with one seed),
 * so differences between rows of the table come from the settings, not from the split.
 *   best  = the row with the smallest mean RMSE;
 *   SE    = sdRmse(best) / √k                (standard error of best's mean over k folds);
 *   oneSE = among rows of best's family with meanRmse ≤ meanRmse(best) + SE, the simplest:
 *           low-rank → the smallest rank, then (same rank) the largest λ (ties: smaller mean
 *           RMSE; the order is `simplerLowRank` in tuningGrid.ts); gaussian → the largest
 *           shrinkage, i.e. Σ closest to its diagonal (ties: smaller mean RMSE). The simplest
 *           model statistically indistinguishable from the best (Hastie, Tibshirani &
 *           Friedman, The Elements of Statistical Learning, §7.10). The family itself is the
 *           one with the lowest mean RMSE: cross-validation chooses between families.
 * A setting whose fit fails is kept in the table with its error and NaN metrics.
 * The work is one task per fold (foldTask.ts), each fitting every setting with reuse of
 * baselines, spectral starts and warm starts along λ; tasks may run in parallel (the hosts'
 * worker pool) and the table is assembled in fold order, so it does not depend on that.
 */
import type { RatingMatrix } from '../matrix/ratingMatrix';
import { toSparseMatrix, type SparseMatrix } from '../matrix/sparseRatings';
import type { Centering, FitSettings, GaussianSettings, LowRankSettings } from './types';
import { makeFolds, summarizeFolds, type FoldScore } from './crossValidation';
import { runFoldTask, type FoldOutcome } from './foldTask';
import { defaultLowRankSettings } from './defaults';
import { simplerLowRank } from './tuningGrid';

export interface LowRankGridSpec {
  ranks: number[];
  lambdas: number[];
  centerings: Centering[];
  /** Other settings shared by every grid point (defaults when absent). */
  base?: Partial<LowRankSettings>;
}

export type TuneGrid = { settings: FitSettings[] } | LowRankGridSpec;

export interface TuneRow {
  settings: FitSettings;
  meanRmse: number;
  sdRmse: number;
  meanMae: number;
  sdMae: number;
  folds: FoldScore[];
  error?: string;
}

export interface TuneResult {
  k: number;
  seed: number;
  table: TuneRow[];
  /** Index into table and the row itself. */
  bestIndex: number;
  best: TuneRow;
  /** meanRmse(best) + SE: the one-standard-error threshold. */
  threshold: number;
  oneStandardErrorIndex: number;
  oneStandardError: TuneRow;
}

export interface TuneProgress {
  done: number;
  total: number;
}

/** ranks × lambdas × centerings as a flat list of low-rank settings (rank varies slowest). */
export function expandLowRankGrid(spec: LowRankGridSpec): LowRankSettings[] {
  const out: LowRankSettings[] = [];
  const base = { ...defaultLowRankSettings(), ...(spec.base ?? {}) };
  for (const rank of spec.ranks)
    for (const lambda of spec.lambdas)
      for (const centering of spec.centerings) out.push({ ...base, model: 'lowrank', rank, lambda, centering });
  return out;
}

function gridSettings(grid: TuneGrid): FitSettings[] {
  return 'settings' in grid ? grid.settings : expandLowRankGrid(grid);
}

/** Pick best and one-standard-error rows from a finished table. */
export function chooseFromTable(table: TuneRow[], k: number): Omit<TuneResult, 'k' | 'seed' | 'table'> {
  let bestIndex = -1;
  for (let t = 0; t < table.length; t++) {
    const m = table[t].meanRmse;
    if (Number.isFinite(m) && (bestIndex < 0 || m < table[bestIndex].meanRmse)) bestIndex = t;
  }
  if (bestIndex < 0) throw new Error('every setting in the grid failed to fit');
  const best = table[bestIndex];
  const se = (Number.isFinite(best.sdRmse) ? best.sdRmse : 0) / Math.sqrt(k);
  const threshold = best.meanRmse + se;
  let pick = -1;
  for (let t = 0; t < table.length; t++) {
    const row = table[t];
    if (row.settings.model !== best.settings.model || !(row.meanRmse <= threshold)) continue;
    if (pick < 0) {
      pick = t;
      continue;
    }
    const cur = table[pick].settings;
    const tie = row.meanRmse < table[pick].meanRmse;
    if (row.settings.model === 'lowrank') {
      const c = cur as LowRankSettings;
      const same = row.settings.rank === c.rank && row.settings.lambda === c.lambda;
      if (simplerLowRank(row.settings, c) || (same && tie)) pick = t;
    } else {
      const shrinkage = (cur as GaussianSettings).shrinkage;
      if (row.settings.shrinkage > shrinkage || (row.settings.shrinkage === shrinkage && tie)) pick = t;
    }
  }
  if (pick < 0) pick = bestIndex;
  return { bestIndex, best, threshold, oneStandardErrorIndex: pick, oneStandardError: table[pick] };
}

/** The table from per-fold outcomes (outcomes[f][s]: fold f, setting s). */
export function tableFromOutcomes(list: FitSettings[], outcomes: FoldOutcome[][]): TuneRow[] {
  return list.map((settings, s) => {
    const scores: FoldScore[] = [];
    for (const perFold of outcomes) {
      const o = perFold[s];
      if ('error' in o) {
        return { settings, meanRmse: NaN, sdRmse: NaN, meanMae: NaN, sdMae: NaN, folds: [], error: o.error.message };
      }
      scores.push(o.score);
    }
    return { settings, ...summarizeFolds(scores) };
  });
}

export interface TuneOptions {
  /** Share starts across ranks and λ (default true); false fits every setting cold. */
  reuse?: boolean;
}

export function tune(
  matrix: RatingMatrix | SparseMatrix,
  grid: TuneGrid,
  k: number,
  seed: number,
  onProgress?: (p: TuneProgress) => void,
  shouldStop?: () => boolean,
  opts: TuneOptions = {},
): TuneResult {
  const list = gridSettings(grid);
  if (list.length === 0) throw new Error('the tuning grid is empty');
  const m = toSparseMatrix(matrix);
  const folds = makeFolds(m, k, seed);
  const total = list.length * k;
  let done = 0;
  const outcomes: FoldOutcome[][] = [];
  for (let f = 0; f < k; f++) {
    outcomes.push(
      runFoldTask(m, folds, f, list, {
        shouldStop,
        reuse: opts.reuse ?? true,
        onSettingDone: onProgress ? () => onProgress({ done: ++done, total }) : undefined,
      }),
    );
  }
  const table = tableFromOutcomes(list, outcomes);
  return { k, seed, table, ...chooseFromTable(table, k) };
}
