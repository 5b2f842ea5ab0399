/**
 * k-fold cross-validation over the observed cells.
 *
 * Folds: the observed cells are shuffled with the seed and dealt round-robin into k folds
 * (sizes differ by at most one). Then a repair pass makes every row and column with at
 * least two observed cells span at least two folds, so whichever fold is held out, the
 * row/column keeps a training value: a violating row moves one of its cells to the next
 * fold, choosing a cell whose column still spans two folds afterwards (and the same for
 * columns), repeated until nothing changes (at most 20 passes). A row or column with a
 * single observed cell cannot keep one when that cell is tested ("where possible").
 *
 * Everything runs on the sparse storage of the observed cells (sparseRatings.ts): a fold is
 * a label per observed entry, the training set of fold f is the compact storage of the
 * other entries (built by index, never a dense copy), and only fold f's cells are predicted.
 * For fold f the model is fitted (through fitModelSparse, see foldTask.ts) on the observed
 * cells not in f, and scored on the cells in f:
 *   RMSE_f = √(Σ_{c∈f} (ŷ_c − y_c)² / n_f),   MAE_f = Σ_{c∈f} |ŷ_c − y_c| / n_f.
 * Summary: mean over folds and sample standard deviation (divisor k − 1).
 * Asked for interval levels, the same fold fits also calibrate the intervals of
 * cellIntervals.ts and report, per fold, their coverage and mean width (each fold's
 * quantile from the other folds' held-out cells).
 */
import type { RatingMatrix } from '../matrix/ratingMatrix';
import { toSparseMatrix, type SparseMatrix } from '../matrix/sparseRatings';
import type { FitProgress, FitSettings } from './types';
import { createRng, shuffleInPlace } from './random';
import { calibrateIntervals, HeldOutCollector } from './cellIntervals';
import { LineSpreadSample } from './lineSpread';
import { summarizeLevel, type LevelSummary } from './intervals';
import { runFoldTask, type FoldOutcome } from './foldTask';
import type { SparseModel } from './fitModel';

export interface Folds {
  k: number;
  seed: number;
  /** Per observed entry in row order (the order of SparseRatings.rowVal): its fold 0..k−1. */
  foldOf: Int32Array;
  /** Number of test cells in each fold. */
  sizes: number[];
}

export interface FoldScore {
  rmse: number;
  mae: number;
  n: number;
}

export interface CrossValidationResult {
  folds: FoldScore[];
  meanRmse: number;
  sdRmse: number;
  meanMae: number;
  sdMae: number;
  /** Per asked level: coverage and width of the intervals on each fold, and of constant-width ones. */
  intervals?: { level: number; normalized: LevelSummary; constantWidth: LevelSummary }[];
  /**
   * When asked for (keepHeldOut): per observed entry in row order, the prediction made for
   * it by the fit that did not see it (each cell is held out exactly once).
   */
  heldOut?: Float64Array;
}

export interface CrossValidateOptions {
  /** Called after each fold with (folds done, total); `fit` carries the inner fit's progress. */
  onProgress?: (p: { done: number; total: number; fit?: FitProgress }) => void;
  shouldStop?: () => boolean;
  /** Interval levels (0.5–0.99) to measure on the folds. */
  intervalLevels?: number[];
  keepHeldOut?: boolean;
}

function spanCount(foldsSeen: Int32Array, k: number): number {
  let s = 0;
  for (let f = 0; f < k; f++) if (foldsSeen[f] > 0) s++;
  return s;
}

export function makeFolds(matrix: RatingMatrix | SparseMatrix, k: number, seed: number): Folds {
  if (!Number.isInteger(k) || k < 2) throw new Error(`folds must be a whole number ≥ 2 (got ${k})`);
  const data = toSparseMatrix(matrix).data;
  const { rows, cols, n, rowPtr, rowCol, colPtr, colEntry } = data;
  if (n < k) throw new Error(`${k} folds need at least ${k} observed values (found ${n})`);
  const foldOf = new Int32Array(n);
  const entries = new Int32Array(n);
  for (let p = 0; p < n; p++) entries[p] = p;
  shuffleInPlace(entries, createRng(seed));
  for (let t = 0; t < n; t++) foldOf[entries[t]] = t % k;
  const rowOf = new Int32Array(n);
  for (let i = 0; i < rows; i++) rowOf.fill(i, rowPtr[i], rowPtr[i + 1]);

  // Per-row and per-column counts of cells in each fold.
  const rowFold = new Int32Array(rows * k);
  const colFold = new Int32Array(cols * k);
  for (let p = 0; p < n; p++) {
    const f = foldOf[p];
    rowFold[rowOf[p] * k + f]++;
    colFold[rowCol[p] * k + f]++;
  }
  const move = (p: number, to: number): void => {
    const f = foldOf[p];
    const i = rowOf[p];
    const j = rowCol[p];
    rowFold[i * k + f]--;
    colFold[j * k + f]--;
    rowFold[i * k + to]++;
    colFold[j * k + to]++;
    foldOf[p] = to;
  };
  const spans = (arr: Int32Array, e: number): number => spanCount(arr.subarray(e * k, e * k + k), k);
  const total = (arr: Int32Array, e: number): number => {
    let s = 0;
    for (let f = 0; f < k; f++) s += arr[e * k + f];
    return s;
  };
  for (let pass = 0; pass < 20; pass++) {
    let changed = false;
    for (let i = 0; i < rows; i++) {
      if (total(rowFold, i) < 2 || spans(rowFold, i) >= 2) continue;
      // All of row i's cells are in one fold: move one whose column survives the move.
      let chosen = -1;
      for (let p = rowPtr[i]; p < rowPtr[i + 1] && chosen < 0; p++) {
        const j = rowCol[p];
        const f = foldOf[p];
        const to = (f + 1) % k;
        // After the move the column must still span two folds (or had a single cell anyway).
        const afterSpan = spans(colFold, j) - (colFold[j * k + f] === 1 ? 1 : 0) + (colFold[j * k + to] === 0 ? 1 : 0);
        if (total(colFold, j) < 2 || afterSpan >= 2) chosen = p;
      }
      if (chosen < 0) chosen = rowPtr[i];
      move(chosen, (foldOf[chosen] + 1) % k);
      changed = true;
    }
    for (let j = 0; j < cols; j++) {
      if (total(colFold, j) < 2 || spans(colFold, j) >= 2) continue;
      let chosen = -1;
      for (let q = colPtr[j]; q < colPtr[j + 1] && chosen < 0; q++) {
        const p = colEntry[q];
        const i = rowOf[p];
        const f = foldOf[p];
        const to = (f + 1) % k;
        const afterSpan = spans(rowFold, i) - (rowFold[i * k + f] === 1 ? 1 : 0) + (rowFold[i * k + to] === 0 ? 1 : 0);
        if (total(rowFold, i) < 2 || afterSpan >= 2) chosen = p;
      }
      if (chosen < 0) chosen = colEntry[colPtr[j]];
      move(chosen, (foldOf[chosen] + 1) % k);
      changed = true;
    }
    if (!changed) break;
  }
  const sizes = new Array<number>(k).fill(0);
  for (let p = 0; p < n; p++) sizes[foldOf[p]]++;
  return { k, seed, foldOf, sizes };
}

/** Per dense cell (row-major): its fold, or −1 for a missing cell (for display and checks). */
export function cellFolds(matrix: RatingMatrix | SparseMatrix, folds: Folds): Int32Array {
  const data = toSparseMatrix(matrix).data;
  const out = new Int32Array(data.rows * data.cols).fill(-1);
  for (let i = 0; i < data.rows; i++) {
    for (let p = data.rowPtr[i]; p < data.rowPtr[i + 1]; p++) out[i * data.cols + data.rowCol[p]] = folds.foldOf[p];
  }
  return out;
}

function meanSd(xs: number[]): { mean: number; sd: number } {
  const n = xs.length;
  if (n === 0) return { mean: NaN, sd: NaN };
  let s = 0;
  for (const x of xs) s += x;
  const mean = s / n;
  if (n < 2) return { mean, sd: 0 };
  let ss = 0;
  for (const x of xs) ss += (x - mean) * (x - mean);
  return { mean, sd: Math.sqrt(ss / (n - 1)) };
}

/** Mean and standard deviation over the folds' scores. */
export function summarizeFolds(scores: FoldScore[]): CrossValidationResult {
  const r = meanSd(scores.map((s) => s.rmse));
  const a = meanSd(scores.map((s) => s.mae));
  return { folds: scores, meanRmse: r.mean, sdRmse: r.sd, meanMae: a.mean, sdMae: a.sd };
}

/** Held-out predictions of every fold put back in row order (see CrossValidationResult.heldOut). */
export function gatherHeldOut(folds: Folds, perFold: (Float64Array | undefined)[]): Float64Array {
  const out = new Float64Array(folds.foldOf.length).fill(NaN);
  const next = new Int32Array(folds.k);
  for (let p = 0; p < folds.foldOf.length; p++) {
    const f = folds.foldOf[p];
    const pred = perFold[f];
    if (pred) out[p] = pred[next[f]];
    next[f]++;
  }
  return out;
}

/** The fold outcome of one setting, or its error thrown. */
export function scoreOrThrow(o: FoldOutcome): FoldScore {
  if ('error' in o) throw o.error;
  return o.score;
}

/**
 * Interval coverage and width on the folds (cellIntervals.ts), from the k fold models: each
 * low-rank model predicts only its own held-out cells and the sampled blank cells of
 * lineSpread.ts (a Gaussian model's dense predictions are read at its held-out cells), then
 * the calibration runs as documented there.
 */
export function foldIntervals(
  matrix: RatingMatrix | SparseMatrix,
  folds: Folds,
  settings: FitSettings,
  models: SparseModel[],
  levels: number[],
): CrossValidationResult['intervals'] {
  const m = toSparseMatrix(matrix);
  const { rows, cols } = m.data;
  // Observed cells only: each fold model predicts its own held-out cells and a sample of
  // blank cells per line (lineSpread.ts); nothing here is rows × cols.
  const heldOut = HeldOutCollector.fromSparse(m.data, folds.foldOf, folds.k);
  const lines = settings.model === 'lowrank' ? new LineSpreadSample(m.data) : undefined;
  models.forEach((model, f) => {
    if ('predictions' in model) heldOut.add(f, model.predictions, model.spread);
    else {
      heldOut.addFit(f, model, m.scale);
      lines?.add(model, m.scale);
    }
  });
  if (!heldOut.complete) return undefined;
  const cal = calibrateIntervals(heldOut, { rows, cols, family: settings.model, lineSpread: lines?.result() });
  return levels.map((level) => ({
    level,
    normalized: summarizeLevel(cal.heldOut, level, m.scale, true),
    constantWidth: summarizeLevel(cal.heldOut, level, m.scale, false),
  }));
}

export function crossValidate(
  matrix: RatingMatrix | SparseMatrix,
  settings: FitSettings,
  folds: Folds,
  opts: CrossValidateOptions = {},
): CrossValidationResult {
  const m = toSparseMatrix(matrix);
  const scores: FoldScore[] = [];
  const held: (Float64Array | undefined)[] = [];
  const levels = opts.intervalLevels ?? [];
  const models: SparseModel[] = [];
  for (let f = 0; f < folds.k; f++) {
    const [outcome] = runFoldTask(m, folds, f, [settings], {
      shouldStop: opts.shouldStop,
      keepHeldOut: opts.keepHeldOut,
      onFitProgress: opts.onProgress ? (p) => opts.onProgress!({ done: f, total: folds.k, fit: p }) : undefined,
      onFitted: levels.length ? (model) => models.push(model) : undefined,
    });
    scores.push(scoreOrThrow(outcome));
    if ('heldOut' in outcome) held.push(outcome.heldOut);
    opts.onProgress?.({ done: f + 1, total: folds.k });
  }
  const result = summarizeFolds(scores);
  if (opts.keepHeldOut) result.heldOut = gatherHeldOut(folds, held);
  if (levels.length) {
    const intervals = foldIntervals(matrix, folds, settings, models, levels);
    if (intervals) result.intervals = intervals;
  }
  return result;
}
