/**
 * One fold of a cross-validation for a list of settings: the unit of work that evaluate,
 * tune and their worker pool hand out (each task is self-contained and deterministic, so
 * results do not depend on how many tasks run at once or in which order they finish).
 *
 * Training set: the compact sparse storage of the entries not in fold f (sparseSubset).
 * Test set: fold f's cells, in row order; only they are predicted, and scored as
 *   RMSE_f = √(Σ (ŷ_c − y_c)² / n_f),   MAE_f = Σ |ŷ_c − y_c| / n_f.
 *
 * Reuse inside a task:
 *   - one baseline per (centering, offset λ): the baseline does not depend on rank or λ, so
 *     this is exact (the same numbers as fitting it again);
 *   - with `reuse` (tuning): one spectral start per (centering, offset λ, seed) at the largest
 *     rank K of the list, its k strongest directions (largest ‖u_c‖·‖v_c‖) for a rank k < K;
 *     and along λ, for the same rank and other settings, λ descending, each fit starts from
 *     the factors of the previous (larger) λ. These change the starting point only, so a
 *     converged fit lands within the fit's tolerance of a cold one (the stated tolerance and
 *     its movie-set figure are in test/unit/engine/reuse.test.ts and DEVELOPERS.md).
 * A setting whose fit fails gets its error; cancellation (FitCancelledError) is thrown.
 */
import { sparseSubset, type SparseMatrix } from '../matrix/sparseRatings';
import type { FitProgress, FitSettings, LowRankSettings } from './types';
import type { Folds, FoldScore } from './crossValidation';
import { fitBaseline, type Baseline } from './baseline';
import { fitModelSparse, predictAt, type SparseModel } from './fitModel';
import { spectralStart, type Factors } from './spectral';
import { FitCancelledError } from './errors';

/** A setting's result on the fold: its score, and when asked its held-out predictions and its model. */
export type FoldOutcome = { score: FoldScore; heldOut?: Float64Array; model?: SparseModel } | { error: Error };

export interface FoldTaskOptions {
  shouldStop?: () => boolean;
  /** Keep each setting's held-out predictions (fold f's cells in row order). */
  keepHeldOut?: boolean;
  /** Keep each setting's fitted model in its outcome (for intervals computed afterwards). */
  keepModels?: boolean;
  /** Share spectral starts across ranks and warm-start along λ (see the header). */
  reuse?: boolean;
  onFitProgress?: (p: FitProgress) => void;
  /** Called with each fitted model (e.g. to collect its estimate of every cell for intervals). */
  onFitted?: (model: SparseModel, settingIndex: number) => void;
  /** Called after each setting of the list is done. */
  onSettingDone?: () => void;
}

/** The k strongest of the K columns of a start (U rows × K, V cols × K), in their original order. */
function truncateFactors(start: Factors, rows: number, cols: number, K: number, k: number): Factors {
  if (k === K) return start;
  const strength: number[] = [];
  for (let c = 0; c < K; c++) {
    let nu = 0;
    let nv = 0;
    for (let i = 0; i < rows; i++) nu += start.rowFactors[i * K + c] ** 2;
    for (let j = 0; j < cols; j++) nv += start.colFactors[j * K + c] ** 2;
    strength.push(Math.sqrt(nu * nv));
  }
  const order = strength.map((s, c) => ({ s, c })).sort((a, b) => b.s - a.s || a.c - b.c);
  const keep = order
    .slice(0, k)
    .map((x) => x.c)
    .sort((a, b) => a - b);
  const rowFactors = new Float64Array(rows * k);
  const colFactors = new Float64Array(cols * k);
  for (let i = 0; i < rows; i++) for (let t = 0; t < k; t++) rowFactors[i * k + t] = start.rowFactors[i * K + keep[t]];
  for (let j = 0; j < cols; j++) for (let t = 0; t < k; t++) colFactors[j * k + t] = start.colFactors[j * K + keep[t]];
  return { rowFactors, colFactors };
}

function baselineKey(s: LowRankSettings): string {
  return `${s.centering}|${s.offsetLambda}`;
}

/** Settings that share a λ path: everything that shapes the fit except λ. */
function pathKey(s: LowRankSettings): string {
  return `${baselineKey(s)}|${s.seed}|${s.init}|${s.rank}|${s.scaleLambdaByCount}|${s.maxIterations}|${s.tolerance}`;
}

/** Order in which a task fits its settings: list order, or (reuse) grouped by λ path, λ descending. */
function fitOrder(list: FitSettings[], reuse: boolean): number[] {
  const order = list.map((_, t) => t);
  if (!reuse) return order;
  const key = (t: number): string => (list[t].model === 'lowrank' ? pathKey(list[t] as LowRankSettings) : `~${t}`);
  const first = new Map<string, number>();
  for (const t of order) if (!first.has(key(t))) first.set(key(t), t);
  const lambda = (t: number): number => (list[t].model === 'lowrank' ? (list[t] as LowRankSettings).lambda : 0);
  return order.sort((a, b) => first.get(key(a))! - first.get(key(b))! || lambda(b) - lambda(a) || a - b);
}

export function runFoldTask(
  m: SparseMatrix,
  folds: Folds,
  f: number,
  list: FitSettings[],
  opts: FoldTaskOptions = {},
): FoldOutcome[] {
  const data = m.data;
  const foldOf = folds.foldOf;
  const train: SparseMatrix = { ...m, data: sparseSubset(data, foldOf, f) };
  // Fold f's cells in row order.
  const nTest = folds.sizes[f];
  const testRow = new Int32Array(nTest);
  const testCol = new Int32Array(nTest);
  const testVal = new Float64Array(nTest);
  let t = 0;
  for (let i = 0; i < data.rows; i++) {
    for (let p = data.rowPtr[i]; p < data.rowPtr[i + 1]; p++) {
      if (foldOf[p] !== f) continue;
      testRow[t] = i;
      testCol[t] = data.rowCol[p];
      testVal[t++] = data.rowVal[p];
    }
  }
  const reuse = opts.reuse === true;
  const baselines = new Map<string, Baseline>();
  const starts = new Map<string, { K: number; start?: Factors }>();
  if (reuse) {
    for (const s of list) {
      if (s.model !== 'lowrank' || s.init !== 'spectral' || s.rank === 0) continue;
      const key = `${baselineKey(s)}|${s.seed}`;
      const cur = starts.get(key);
      if (!cur || s.rank > cur.K) starts.set(key, { K: s.rank });
    }
  }
  const lastOnPath = new Map<string, Factors>();
  const outcomes: FoldOutcome[] = new Array(list.length);
  const pred = new Float64Array(nTest);
  for (const s of fitOrder(list, reuse)) {
    const settings = list[s];
    try {
      let baseline: Baseline | undefined;
      let warmStart: Factors | undefined;
      if (settings.model === 'lowrank') {
        const bk = baselineKey(settings);
        baseline = baselines.get(bk);
        if (!baseline) {
          baseline = fitBaseline(train.data, settings.centering, settings.offsetLambda);
          baselines.set(bk, baseline);
        }
        if (reuse && settings.rank > 0) {
          warmStart = lastOnPath.get(pathKey(settings));
          const shared = settings.init === 'spectral' ? starts.get(`${bk}|${settings.seed}`) : undefined;
          if (!warmStart && shared) {
            if (!shared.start) {
              const res = residualsByRow(train.data, baseline);
              shared.start = spectralStart(train.data, res, shared.K, settings.seed, undefined, opts.shouldStop);
              if (!shared.start) throw new FitCancelledError();
            }
            warmStart = truncateFactors(shared.start, data.rows, data.cols, shared.K, settings.rank);
          }
        }
      }
      const fit = fitModelSparse(train, settings, {
        shouldStop: opts.shouldStop,
        onProgress: opts.onFitProgress,
        baseline,
        warmStart,
      });
      if (reuse && settings.model === 'lowrank' && settings.rank > 0) {
        lastOnPath.set(pathKey(settings), { rowFactors: fit.rowFactors, colFactors: fit.colFactors });
      }
      opts.onFitted?.(fit, s);
      predictAt(fit, m.scale, testRow, testCol, pred, nTest);
      let se = 0;
      let ae = 0;
      for (let c = 0; c < nTest; c++) {
        const e = pred[c] - testVal[c];
        se += e * e;
        ae += Math.abs(e);
      }
      const score = { rmse: nTest > 0 ? Math.sqrt(se / nTest) : NaN, mae: nTest > 0 ? ae / nTest : NaN, n: nTest };
      outcomes[s] = {
        score,
        ...(opts.keepHeldOut ? { heldOut: pred.slice() } : {}),
        ...(opts.keepModels ? { model: fit } : {}),
      };
    } catch (err) {
      if (err instanceof FitCancelledError) throw err;
      outcomes[s] = { error: err instanceof Error ? err : new Error(String(err)) };
    }
    opts.onSettingDone?.();
  }
  return outcomes;
}

/** y − b on the observed cells, in row order (what the spectral start factorizes). */
function residualsByRow(data: SparseMatrix['data'], b: Baseline): Float64Array {
  const res = new Float64Array(data.n);
  for (let i = 0; i < data.rows; i++) {
    const rb = b.rowBaseline[i];
    for (let p = data.rowPtr[i]; p < data.rowPtr[i + 1]; p++)
      res[p] = data.rowVal[p] - rb - b.colBaseline[data.rowCol[p]];
  }
  return res;
}
