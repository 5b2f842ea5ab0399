/**
 * The adaptive default: settings for a first Fill chosen by a quick cross-validation.
 *
 * Stage 1 (`baselineCandidates`): the baseline alone (rank 0) under each of the four centerings.
 * Stage 2 (`factorCandidates`): under the centering whose baseline scored best, up to three
 * well-spread ranks of the default ladder (its smallest rank ≥ 2, one near the middle, its
 * largest; tuningGrid.ts) × three well-spread λ values of the default grid, σ₁/2, σ₁/8, σ₁/32
 * (tuningGrid.ts) — at most 13 settings in all.
 * Every candidate is scored on the same 3 folds (crossValidation.ts) with a looser stopping
 * rule (≤ 40 sweeps, tolerance 1e-4): the scores only have to rank the candidates.
 * The choice (`chooseAuto`) is the candidate with the lowest mean fold RMSE. Rank 0 is a
 * candidate, so the choice is never worse in this cross-validation than the baselines alone.
 * The chosen settings keep the caller's iteration limit and tolerance for the real fit.
 */
import type { RatingMatrix } from '../matrix/ratingMatrix';
import type { Centering, LowRankSettings } from './types';
import { defaultLowRankSettings } from './defaults';
import { tune, type TuneProgress, type TuneRow } from './tuning';
import { defaultLambdas, defaultRanks, roundLambda, summarizeForGrid, topLambda } from './tuningGrid';

export const AUTO_FOLDS = 3;
const CENTERINGS: Centering[] = ['none', 'row', 'column', 'both'];

export interface AutoChoice {
  settings: LowRankSettings;
  /** One line: what was chosen and why. */
  reason: string;
  folds: number;
  candidates: number;
  /** Mean fold RMSE of the choice and of the best rank-0 candidate (NaN when not scored). */
  rmse: number;
  baselineRmse: number;
  table: TuneRow[];
}

/** Up to three well-spread ranks > 0 from the ladder: the smallest ≥ 2, the middle one, the largest. */
export function spreadRanks(ladder: number[]): number[] {
  const pos = ladder.filter((r) => r > 0);
  if (pos.length <= 3) return pos;
  const lowest = pos.find((r) => r >= 2) ?? pos[0];
  const top = pos[pos.length - 1];
  const inner = pos.filter((r) => r > lowest && r < top);
  const middle = inner.length > 0 ? inner[Math.floor((inner.length - 1) / 2)] : undefined;
  return [lowest, ...(middle !== undefined ? [middle] : []), top];
}

function quick(base: Partial<LowRankSettings>): LowRankSettings {
  return {
    ...defaultLowRankSettings(),
    ...base,
    model: 'lowrank',
    maxIterations: Math.min(40, base.maxIterations ?? 40),
    tolerance: Math.max(1e-4, base.tolerance ?? 1e-4),
  };
}

export function baselineCandidates(
  matrix: RatingMatrix,
  base: Partial<LowRankSettings> = {},
  summary = summarizeForGrid(matrix),
): LowRankSettings[] {
  const b = quick(base);
  const l0 = roundLambda(topLambda(summary)) || b.lambda;
  return CENTERINGS.map((centering) => ({ ...b, rank: 0, lambda: l0, centering }));
}

export function factorCandidates(
  matrix: RatingMatrix,
  centering: Centering,
  base: Partial<LowRankSettings> = {},
  summary = summarizeForGrid(matrix),
): LowRankSettings[] {
  const b = quick(base);
  const grid = defaultLambdas(summary);
  const lambdas = [...new Set([grid[grid.length - 1], grid[Math.floor((grid.length - 1) / 2)], grid[0]])];
  const out: LowRankSettings[] = [];
  for (const rank of spreadRanks(defaultRanks(summary)))
    for (const lambda of lambdas) out.push({ ...b, rank, lambda, centering });
  return out;
}

/** The best-scoring rank-0 row's centering (`both` when none could be scored). */
export function bestBaselineCentering(table: TuneRow[]): Centering {
  let best: TuneRow | undefined;
  for (const r of table)
    if (
      r.settings.model === 'lowrank' &&
      r.settings.rank === 0 &&
      Number.isFinite(r.meanRmse) &&
      (!best || r.meanRmse < best.meanRmse)
    )
      best = r;
  return best && best.settings.model === 'lowrank' ? best.settings.centering : 'both';
}

function fmt(x: number): string {
  return Number.isFinite(x) ? x.toFixed(3) : 'n/a';
}

/** Short label: "rank 5, λ 15, both" (rank 0: "rank 0 (baselines alone), both"). */
function autoLabel(s: LowRankSettings): string {
  return s.rank === 0 ? `rank 0 (baselines alone), ${s.centering}` : `rank ${s.rank}, λ ${s.lambda}, ${s.centering}`;
}

/**
 * The lowest-error candidate of a scored table, with its one-line reason. `real` carries the
 * iteration limit and tolerance of the fit that follows (the table's were loosened).
 */
export function chooseAuto(
  table: TuneRow[],
  folds: number,
  real: Pick<LowRankSettings, 'maxIterations' | 'tolerance'>,
): AutoChoice {
  let best = -1;
  let baseline = NaN;
  for (let t = 0; t < table.length; t++) {
    const r = table[t];
    if (r.settings.model !== 'lowrank' || !Number.isFinite(r.meanRmse)) continue;
    if (best < 0 || r.meanRmse < table[best].meanRmse) best = t;
    if (r.settings.rank === 0 && !(r.meanRmse >= baseline)) baseline = r.meanRmse;
  }
  if (best < 0) throw new Error('no candidate setting could be fitted');
  const chosen = table[best].settings as LowRankSettings;
  const settings: LowRankSettings = { ...chosen, maxIterations: real.maxIterations, tolerance: real.tolerance };
  const rmse = table[best].meanRmse;
  const gain = baseline - rmse;
  const why =
    chosen.rank === 0
      ? `lowest ${folds}-fold error of ${table.length} settings; no setting with hidden traits did better`
      : `lowest ${folds}-fold error of ${table.length} settings; ${fmt(gain)} better than baselines alone`;
  return {
    settings,
    reason: `${autoLabel(settings)}: ${why}`,
    folds,
    candidates: table.length,
    rmse,
    baselineRmse: baseline,
    table,
  };
}

/** Score the candidates and choose (for the command line and tests; the page runs the same candidates in its worker). */
export function autoSettings(
  matrix: RatingMatrix,
  base: Partial<LowRankSettings> = {},
  onProgress?: (p: TuneProgress) => void,
  shouldStop?: () => boolean,
): AutoChoice {
  const d = { ...defaultLowRankSettings(), ...base };
  let observed = 0;
  for (let c = 0; c < matrix.values.length; c++) if (matrix.values[c] === matrix.values[c]) observed++;
  if (observed < 2 * AUTO_FOLDS) {
    return {
      settings: d,
      reason: `${autoLabel(d)}: the defaults (${observed} ratings are too few to cross-validate)`,
      folds: AUTO_FOLDS,
      candidates: 0,
      rmse: NaN,
      baselineRmse: NaN,
      table: [],
    };
  }
  const summary = summarizeForGrid(matrix);
  const first = baselineCandidates(matrix, base, summary);
  const stage1 = tune(matrix, { settings: first }, AUTO_FOLDS, d.seed, onProgress, shouldStop);
  const second = factorCandidates(matrix, bestBaselineCentering(stage1.table), base, summary);
  const total = (first.length + second.length) * AUTO_FOLDS;
  const offset = first.length * AUTO_FOLDS;
  const stage2 =
    second.length > 0
      ? tune(
          matrix,
          { settings: second },
          AUTO_FOLDS,
          d.seed,
          onProgress ? (p) => onProgress({ done: offset + p.done, total }) : undefined,
          shouldStop,
        ).table
      : [];
  return chooseAuto([...stage1.table, ...stage2], AUTO_FOLDS, d);
}
