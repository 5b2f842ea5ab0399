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
 * For fold f the model is fitted (through fitModel) on the observed cells not in f, and
 * scored on the cells in f:
 *   RMSE_f = √(Σ_{c∈f} (ŷ_c − y_c)² / n_f),   MAE_f = Σ_{c∈f} |ŷ_c − y_c| / n_f.
 * Summary: mean over folds and sample standard deviation (divisor k − 1).
 * Asked for interval levels, the same fold fits also calibrate the intervals of
 * cellIntervals.ts and report, per fold, their coverage and mean width (each fold's
 * quantile from the other folds' held-out cells).
 */
import type { RatingMatrix } from '../matrix/ratingMatrix';
import type { FitProgress, FitSettings } from './types';
import { fitModel } from './fitModel';
import { createRng, shuffleInPlace } from './random';
import { calibrateIntervals, EnsembleSpread, HeldOutCollector } from './cellIntervals';
import { summarizeLevel, type LevelSummary } from './intervals';

export interface Folds {
  k: number;
  seed: number;
  /** Per dense cell: its fold (0..k−1), or −1 for a missing cell. */
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
}

export interface CrossValidateOptions {
  /** Called after each fold with (folds done, total); `fit` carries the inner fit's progress. */
  onProgress?: (p: { done: number; total: number; fit?: FitProgress }) => void;
  shouldStop?: () => boolean;
  /** Interval levels (0.5–0.99) to measure on the folds. */
  intervalLevels?: number[];
}

function spanCount(foldsSeen: Int32Array, k: number): number {
  let s = 0;
  for (let f = 0; f < k; f++) if (foldsSeen[f] > 0) s++;
  return s;
}

export function makeFolds(matrix: RatingMatrix, k: number, seed: number): Folds {
  if (!Number.isInteger(k) || k < 2) throw new Error(`folds must be a whole number ≥ 2 (got ${k})`);
  const rows = matrix.rowLabels.length;
  const cols = matrix.colLabels.length;
  const values = matrix.values;
  const foldOf = new Int32Array(values.length).fill(-1);
  let n = 0;
  for (let c = 0; c < values.length; c++) if (values[c] === values[c]) n++;
  if (n < k) throw new Error(`${k} folds need at least ${k} observed values (found ${n})`);
  const cells = new Int32Array(n);
  n = 0;
  for (let c = 0; c < values.length; c++) if (values[c] === values[c]) cells[n++] = c;
  shuffleInPlace(cells, createRng(seed));
  for (let t = 0; t < n; t++) foldOf[cells[t]] = t % k;

  // Per-row and per-column counts of cells in each fold.
  const rowFold = new Int32Array(rows * k);
  const colFold = new Int32Array(cols * k);
  for (let t = 0; t < n; t++) {
    const c = cells[t];
    const f = foldOf[c];
    rowFold[((c / cols) | 0) * k + f]++;
    colFold[(c % cols) * k + f]++;
  }
  const move = (c: number, to: number): void => {
    const f = foldOf[c];
    const i = (c / cols) | 0;
    const j = c % cols;
    rowFold[i * k + f]--;
    colFold[j * k + f]--;
    rowFold[i * k + to]++;
    colFold[j * k + to]++;
    foldOf[c] = to;
  };
  const spans = (arr: Int32Array, e: number): number => spanCount(arr.subarray(e * k, e * k + k), k);
  for (let pass = 0; pass < 20; pass++) {
    let changed = false;
    for (let i = 0; i < rows; i++) {
      const base = i * cols;
      let count = 0;
      for (let f = 0; f < k; f++) count += rowFold[i * k + f];
      if (count < 2 || spans(rowFold, i) >= 2) continue;
      // All of row i's cells are in one fold: move one whose column survives the move.
      let chosen = -1;
      for (let j = 0; j < cols && chosen < 0; j++) {
        const c = base + j;
        if (foldOf[c] < 0) continue;
        const f = foldOf[c];
        const to = (f + 1) % k;
        const colTotal = colFold.subarray(j * k, j * k + k).reduce((a, b) => a + b, 0);
        // After the move the column must still span two folds (or had a single cell anyway).
        const afterSpan = spans(colFold, j) - (colFold[j * k + f] === 1 ? 1 : 0) + (colFold[j * k + to] === 0 ? 1 : 0);
        if (colTotal < 2 || afterSpan >= 2) chosen = c;
      }
      if (chosen < 0) for (let j = 0; j < cols && chosen < 0; j++) if (foldOf[base + j] >= 0) chosen = base + j;
      move(chosen, (foldOf[chosen] + 1) % k);
      changed = true;
    }
    for (let j = 0; j < cols; j++) {
      let count = 0;
      for (let f = 0; f < k; f++) count += colFold[j * k + f];
      if (count < 2 || spans(colFold, j) >= 2) continue;
      let chosen = -1;
      for (let i = 0; i < rows && chosen < 0; i++) {
        const c = i * cols + j;
        if (foldOf[c] < 0) continue;
        const f = foldOf[c];
        const to = (f + 1) % k;
        const rowTotal = rowFold.subarray(i * k, i * k + k).reduce((a, b) => a + b, 0);
        const afterSpan = spans(rowFold, i) - (rowFold[i * k + f] === 1 ? 1 : 0) + (rowFold[i * k + to] === 0 ? 1 : 0);
        if (rowTotal < 2 || afterSpan >= 2) chosen = c;
      }
      if (chosen < 0) for (let i = 0; i < rows && chosen < 0; i++) if (foldOf[i * cols + j] >= 0) chosen = i * cols + j;
      move(chosen, (foldOf[chosen] + 1) % k);
      changed = true;
    }
    if (!changed) break;
  }
  const sizes = new Array<number>(k).fill(0);
  for (let c = 0; c < foldOf.length; c++) if (foldOf[c] >= 0) sizes[foldOf[c]]++;
  return { k, seed, foldOf, sizes };
}

/** The matrix with fold f's cells hidden (set to NaN). */
export function trainingMatrix(matrix: RatingMatrix, folds: Folds, f: number): RatingMatrix {
  const values = new Float64Array(matrix.values);
  const foldOf = folds.foldOf;
  for (let c = 0; c < values.length; c++) if (foldOf[c] === f) values[c] = NaN;
  return { rowLabels: matrix.rowLabels, colLabels: matrix.colLabels, values, scale: matrix.scale };
}

export function meanSd(xs: number[]): { mean: number; sd: number } {
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

export function crossValidate(
  matrix: RatingMatrix,
  settings: FitSettings,
  folds: Folds,
  opts: CrossValidateOptions = {},
): CrossValidationResult {
  const scores: FoldScore[] = [];
  const values = matrix.values;
  const levels = opts.intervalLevels ?? [];
  const heldOut = levels.length ? new HeldOutCollector(values, folds.foldOf, folds.k) : undefined;
  const ensemble = levels.length && settings.model === 'lowrank' ? new EnsembleSpread(values.length) : undefined;
  for (let f = 0; f < folds.k; f++) {
    const train = trainingMatrix(matrix, folds, f);
    const fit = fitModel(train, settings, {
      shouldStop: opts.shouldStop,
      onProgress: opts.onProgress ? (p) => opts.onProgress!({ done: f, total: folds.k, fit: p }) : undefined,
    });
    let se = 0;
    let ae = 0;
    let n = 0;
    const pred = fit.predictions;
    heldOut?.add(f, pred, fit.spread);
    ensemble?.add(pred);
    for (let c = 0; c < values.length; c++) {
      if (folds.foldOf[c] !== f) continue;
      const e = pred[c] - values[c];
      se += e * e;
      ae += Math.abs(e);
      n++;
    }
    scores.push({ rmse: n > 0 ? Math.sqrt(se / n) : NaN, mae: n > 0 ? ae / n : NaN, n });
    opts.onProgress?.({ done: f + 1, total: folds.k });
  }
  const r = meanSd(scores.map((s) => s.rmse));
  const a = meanSd(scores.map((s) => s.mae));
  const out: CrossValidationResult = { folds: scores, meanRmse: r.mean, sdRmse: r.sd, meanMae: a.mean, sdMae: a.sd };
  if (heldOut && heldOut.complete) {
    const rows = matrix.rowLabels.length;
    const cols = matrix.colLabels.length;
    const cal = calibrateIntervals(heldOut, { rows, cols, values, family: settings.model, ensembleSpread: ensemble?.spread() });
    out.intervals = levels.map((level) => ({
      level,
      normalized: summarizeLevel(cal.heldOut, level, matrix.scale, true),
      constantWidth: summarizeLevel(cal.heldOut, level, matrix.scale, false),
    }));
  }
  return out;
}
