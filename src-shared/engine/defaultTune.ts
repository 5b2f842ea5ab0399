/**
 * Tuning with the data-derived default grid (tuningGrid.ts) and one refinement pass.
 *
 * Pass 0 (only when no centerings are given): rank 0 under each of the four centerings; the
 * factor settings then use the centering whose baseline alone scores best (a cheap first
 * stage: the baselines take seconds even on large sets).
 * Pass 1 (coarse): rank 0 once per centering (λ does not act at rank 0), and every rank > 0
 * of the grid × every coarse λ (neighbours ×2 apart) × every centering.
 * Pass 2 (refine): at the best pass-1 setting's rank and centering, the λ values that
 * `refineLambdas` adds between the best λ and its neighbours (×√2 apart), or one ×2 step
 * beyond the grid's edge when the best λ lies on it. Nothing is added when rank 0 wins.
 * Both passes use the same folds (makeFolds with one seed), so the merged table compares
 * like with like; best and the one-standard-error choice are taken from the merged table
 * (chooseFromTable: smaller rank is simpler, then larger λ).
 */
import type { RatingMatrix } from '../matrix/ratingMatrix';
import type { SparseMatrix } from '../matrix/sparseRatings';
import type { Centering, FitSettings, LowRankSettings } from './types';
import { defaultLowRankSettings } from './defaults';
import { chooseFromTable, tune, type TuneProgress, type TuneResult, type TuneRow } from './tuning';
import { defaultGrid, refineLambdas, roundLambda, type DefaultGrid } from './tuningGrid';

export interface DefaultTuneOptions {
  folds: number;
  seed: number;
  centerings?: Centering[];
  /** Ranks / λ values to use instead of the data-derived ones. */
  ranks?: number[];
  lambdas?: number[];
  base?: Partial<LowRankSettings>;
  /** Add the refinement pass (default true). */
  refine?: boolean;
  /** More settings to score on the same folds in pass 1 (e.g. other families). */
  extra?: FitSettings[];
  onProgress?: (p: TuneProgress) => void;
  shouldStop?: () => boolean;
}

export interface DefaultTuneResult extends TuneResult {
  grid: DefaultGrid;
  /** λ values added by the refinement pass (empty when none). */
  refinedLambdas: number[];
}

/** The pass-1 settings: rank 0 once per centering, then ranks > 0 × λ × centerings. */
function coarseSettings(
  ranks: number[],
  lambdas: number[],
  centerings: Centering[],
  base: LowRankSettings,
  rankZeroLambda: number,
): LowRankSettings[] {
  const out: LowRankSettings[] = [];
  const seen = new Set<string>();
  for (const rank of [...new Set(ranks)].sort((a, b) => a - b))
    for (const lambda of rank === 0 ? [rankZeroLambda] : lambdas)
      for (const centering of centerings) {
        const key = `${rank}/${lambda}/${centering}`;
        if (seen.has(key)) continue;
        seen.add(key);
        out.push({ ...base, model: 'lowrank', rank, lambda, centering });
      }
  return out;
}

const ALL_CENTERINGS: Centering[] = ['none', 'row', 'column', 'both'];

/** Scores a list of settings on the folds of (k, seed); e.g. the main side's engine pool. */
export type GridRunner = (
  list: FitSettings[],
  k: number,
  seed: number,
  onProgress?: (p: TuneProgress) => void,
) => Promise<TuneResult>;

export async function tuneDefault(
  matrix: RatingMatrix | SparseMatrix,
  o: DefaultTuneOptions,
  runGrid?: GridRunner,
): Promise<DefaultTuneResult> {
  const run: GridRunner =
    runGrid ??
    ((list, k, seed, onProgress) =>
      Promise.resolve(tune(matrix, { settings: list }, k, seed, onProgress, o.shouldStop)));
  const grid = defaultGrid(matrix, o.centerings ?? ['both']);
  if (o.ranks) grid.ranks = [...o.ranks];
  if (o.lambdas) grid.lambdas = [...o.lambdas].sort((a, b) => a - b);
  const base: LowRankSettings = { ...defaultLowRankSettings(), ...(o.base ?? {}), model: 'lowrank' };
  const rankZeroLambda = roundLambda(grid.topLambda) || base.lambda;
  const table: TuneRow[] = [];
  const stage0 =
    o.centerings === undefined
      ? ALL_CENTERINGS.map((centering): LowRankSettings => ({ ...base, rank: 0, lambda: rankZeroLambda, centering }))
      : [];
  const guess =
    stage0.length +
    coarseSettings(grid.ranks, grid.lambdas, grid.centerings, base, rankZeroLambda).length +
    (o.extra?.length ?? 0) +
    (o.refine === false ? 0 : 2);
  const total = guess * o.folds;
  let offset = 0;
  const progress = o.onProgress ? (p: TuneProgress) => o.onProgress!({ done: offset + p.done, total }) : undefined;
  if (stage0.length > 0) {
    const pass0 = await run(stage0, o.folds, o.seed, progress);
    table.push(...pass0.table);
    offset += stage0.length * o.folds;
    grid.centerings = [(pass0.best.settings as LowRankSettings).centering];
  }
  const first: FitSettings[] = [
    ...coarseSettings(
      grid.ranks.filter((r) => stage0.length === 0 || r > 0),
      grid.lambdas,
      grid.centerings,
      base,
      rankZeroLambda,
    ),
    ...(o.extra ?? []),
  ];
  const pass1 = await run(first, o.folds, o.seed, progress);
  table.push(...pass1.table);
  offset += first.length * o.folds;
  let refinedLambdas: number[] = [];
  const best = chooseFromTable(table, o.folds).best.settings;
  if (o.refine !== false && best.model === 'lowrank' && best.rank > 0) {
    refinedLambdas = refineLambdas(best.lambda, grid.lambdas);
    if (refinedLambdas.length > 0) {
      const more: FitSettings[] = refinedLambdas.map((lambda) => ({ ...best, lambda }));
      const pass2 = await run(more, o.folds, o.seed, progress);
      table.push(...pass2.table);
      offset += more.length * o.folds;
    }
  }
  o.onProgress?.({ done: offset, total: offset });
  return { k: o.folds, seed: o.seed, table, ...chooseFromTable(table, o.folds), grid, refinedLambdas };
}
