/**
 * From the k fold fits to the calibration of intervals.ts: collects each observed cell's
 * held-out estimate while the fold models are fitted (no extra fits), builds the
 * per-cell difficulty features, fits σ̂ and scores the held-out cells.
 *
 * Per observed cell c (row i, column j, fold f), from the fold models only:
 *   ŷ_{−f}(c)   the estimate of the model that did not see c;  r_c = y_c − ŷ_{−f}(c).
 * Difficulty scale σ̂:
 *   Gaussian family: the fold model's own conditional sd at c (the full model's at a filled cell).
 *   Low-rank family: σ̂ = max(x·β, floor) with β ≥ 0 fitted to |r_c| (intervals.ts) on
 *     x = (1, spread, rowRms, colRms, 1/√(1 + rowSupport), 1/√(1 + colSupport)) where
 *     spread    the fold models' disagreement around the cell: mean ensemble spread over the
 *               blank cells of its row plus that over the blank cells of its column, each
 *               estimated on up to 64 evenly spaced blank cells of the line (lineSpread.ts). (A cell's
 *               own spread cannot be measured alike for both kinds of cell: a blank cell is
 *               seen by none of the fold models, an observed one by all but one. Used as is,
 *               it over-covered hidden movie ratings by 2.5 points and widened the intervals.)
 *     rowRms    √((Σ r² over the row's held-out cells + m₀ ḡ) / (count + m₀)), m₀ = 3,
 *               ḡ = mean r² over all cells (shrinks short rows toward the whole); for an
 *               observed cell its own r_c is left out of the sum and the count;
 *     colRms    the same for the column;
 *     support   observed cells in the row (column) that a fold model saw: for an observed
 *               cell, those outside its fold; for a blank cell, (k − 1)/k of all of them, so
 *               σ̂ describes a fold model's difficulty there (the full model has seen more,
 *               which keeps the intervals on the safe side).
 * Cells are addressed by their dense row-major index; only the collection step touches
 * the layout of the matrix.
 */
import type { RatingScale } from '../matrix/ratingMatrix';
import type { SparseRatings } from '../matrix/sparseRatings';
import { predictCells } from './predictions';
import type { ModelFamily, SparseFit } from './types';
import {
  applyErrorScale,
  fitErrorScale,
  INTERVAL_METHOD,
  intervalBounds,
  summarizeLevel,
  type ErrorScaleModel,
  type HeldOutScores,
  type LevelSummary,
} from './intervals';

const ERROR_FEATURES = [
  'constant',
  'row + column spread',
  'row error',
  'column error',
  'row support⁻½',
  'column support⁻½',
] as const;
const P = ERROR_FEATURES.length;
const PRIOR_WEIGHT = 3;

/** Gathers the held-out estimates of the observed cells, one fold fit at a time. */
export class HeldOutCollector {
  readonly estimate: Float64Array;
  /** Gaussian family: the fold model's conditional sd at its held-out cells. */
  readonly ownSd: Float64Array;
  private models = 0;

  private constructor(
    readonly cells: Int32Array,
    readonly observed: Float64Array,
    readonly fold: Int32Array,
    readonly k: number,
    /** Columns of the matrix: cell c is row ⌊c / cols⌋, column c mod cols. */
    private readonly cols: number,
  ) {
    const n = cells.length;
    this.estimate = new Float64Array(n).fill(NaN);
    this.ownSd = new Float64Array(n).fill(NaN);
  }

  /** From a dense row-major array (NaN = missing) and each cell's fold (−1 for a missing one). */
  static fromDense(values: Float64Array, foldOf: Int32Array, k: number, cols: number): HeldOutCollector {
    let n = 0;
    for (let c = 0; c < foldOf.length; c++) if (foldOf[c] >= 0) n++;
    const cells = new Int32Array(n);
    const observed = new Float64Array(n);
    const fold = new Int32Array(n);
    n = 0;
    for (let c = 0; c < foldOf.length; c++) {
      if (foldOf[c] < 0) continue;
      cells[n] = c;
      observed[n] = values[c];
      fold[n++] = foldOf[c];
    }
    return new HeldOutCollector(cells, observed, fold, k, cols);
  }

  /** From sparse storage and the folds of its entries (row order): no dense pass. */
  static fromSparse(data: SparseRatings, foldOf: Int32Array, k: number): HeldOutCollector {
    const cells = new Int32Array(data.n);
    for (let i = 0; i < data.rows; i++)
      for (let p = data.rowPtr[i]; p < data.rowPtr[i + 1]; p++) cells[p] = i * data.cols + data.rowCol[p];
    return new HeldOutCollector(cells, Float64Array.from(data.rowVal), Int32Array.from(foldOf), k, data.cols);
  }

  /** Record fold f's low-rank model: its estimates at fold f's cells only. */
  addFit(f: number, fit: SparseFit, scale: RatingScale): void {
    const { cells, fold, cols } = this;
    const at: number[] = [];
    for (let t = 0; t < cells.length; t++) if (fold[t] === f) at.push(t);
    const ri = new Int32Array(at.length);
    const ci = new Int32Array(at.length);
    for (let s = 0; s < at.length; s++) {
      const c = cells[at[s]];
      ri[s] = (c / cols) | 0;
      ci[s] = c - ri[s] * cols;
    }
    const out = predictCells(fit, scale, ri, ci, new Float64Array(at.length));
    for (let s = 0; s < at.length; s++) this.estimate[at[s]] = out[s];
    this.models++;
  }

  /** Record fold f's model: its predictions (dense) and, when it has one, its own conditional sd (dense). */
  add(f: number, predictions: Float64Array, spread?: Float64Array): void {
    const cells = this.cells;
    this.models++;
    for (let t = 0; t < cells.length; t++) {
      if (this.fold[t] !== f) continue;
      const c = cells[t];
      this.estimate[t] = predictions[c];
      if (spread) this.ownSd[t] = spread[c];
    }
  }

  get complete(): boolean {
    return this.models === this.k;
  }
}

export interface IntervalCalibration {
  method: typeof INTERVAL_METHOD;
  /** How σ̂ was obtained. */
  scaleSource: 'conditional sd' | 'error model';
  /** β of the error model (low-rank), in the order of ERROR_FEATURES; empty for the Gaussian family. */
  coefficients: number[];
  heldOut: HeldOutScores;
  /** σ̂ for every cell (row-major); NaN on observed cells; empty when the view had no values (evaluation only). */
  errorScale: Float64Array;
}

export interface FullModelView {
  rows: number;
  cols: number;
  /** Dense row-major values (NaN = blank): needed for σ̂ of the blank cells; without it errorScale is empty (evaluation only). */
  values?: Float64Array;
  family: ModelFamily;
  /** Mean ensemble spread over each row's and column's blank cells (lineSpread.ts; low-rank). */
  lineSpread?: { rowSpread: Float64Array; colSpread: Float64Array };
  /** The full model's own conditional sd (Gaussian); without it σ̂ of blank cells stays NaN. */
  ownSpread?: Float64Array;
}

interface Margins {
  rowSq: Float64Array;
  rowCount: Int32Array;
  colSq: Float64Array;
  colCount: Int32Array;
  /** Training support per (row, fold) and (column, fold): observed cells outside the fold. */
  rowFold: Int32Array;
  colFold: Int32Array;
  rowSupport: Int32Array;
  colSupport: Int32Array;
  meanSq: number;
}

function margins(h: HeldOutCollector, rows: number, cols: number): Margins {
  const k = h.k;
  const m: Margins = {
    rowSq: new Float64Array(rows),
    rowCount: new Int32Array(rows),
    colSq: new Float64Array(cols),
    colCount: new Int32Array(cols),
    rowFold: new Int32Array(rows * k),
    colFold: new Int32Array(cols * k),
    rowSupport: new Int32Array(rows),
    colSupport: new Int32Array(cols),
    meanSq: 0,
  };
  let total = 0;
  let n = 0;
  for (let t = 0; t < h.cells.length; t++) {
    const c = h.cells[t];
    const i = (c / cols) | 0;
    const j = c - i * cols;
    m.rowSupport[i]++;
    m.colSupport[j]++;
    m.rowFold[i * k + h.fold[t]]++;
    m.colFold[j * k + h.fold[t]]++;
    const r = h.observed[t] - h.estimate[t];
    if (r !== r) continue;
    const r2 = r * r;
    m.rowSq[i] += r2;
    m.rowCount[i]++;
    m.colSq[j] += r2;
    m.colCount[j]++;
    total += r2;
    n++;
  }
  m.meanSq = n > 0 ? total / n : 1;
  return m;
}

const shrunkRms = (sq: number, count: number, meanSq: number): number =>
  Math.sqrt((sq + PRIOR_WEIGHT * meanSq) / (count + PRIOR_WEIGHT));

/** Fit σ̂ and score the held-out cells; σ̂ for every blank cell of the full model. */
export function calibrateIntervals(h: HeldOutCollector, full: FullModelView): IntervalCalibration {
  if (!h.complete) throw new Error('interval calibration needs every fold model');
  const { rows, cols } = full;
  const n = h.cells.length;
  const k = h.k;
  const sigma = new Float64Array(n);
  const values = full.values;
  const errorScale = new Float64Array(values ? rows * cols : 0).fill(NaN);
  const absR = new Float64Array(n);
  let meanAbs = 0;
  for (let t = 0; t < n; t++) {
    absR[t] = Math.abs(h.observed[t] - h.estimate[t]);
    meanAbs += absR[t];
  }
  meanAbs = n > 0 ? meanAbs / n : 1;
  const floor = Math.max(0.05 * meanAbs, 1e-9);
  const heldOut = (): HeldOutScores => ({ k, fold: h.fold, estimate: h.estimate, observed: h.observed, sigma });

  if (full.family === 'gaussian') {
    for (let t = 0; t < n; t++) {
      const s = h.ownSd[t];
      sigma[t] = s > floor ? s : floor;
    }
    const own = full.ownSpread ?? errorScale;
    for (let c = 0; c < errorScale.length; c++) {
      if (values![c] === values![c]) continue;
      const s = own[c];
      errorScale[c] = s > floor ? s : Number.isFinite(s) ? floor : NaN;
    }
    return { method: INTERVAL_METHOD, scaleSource: 'conditional sd', coefficients: [], heldOut: heldOut(), errorScale };
  }

  const mg = margins(h, rows, cols);
  const rowSpread = full.lineSpread?.rowSpread ?? new Float64Array(rows);
  const colSpread = full.lineSpread?.colSpread ?? new Float64Array(cols);
  const x = new Float64Array(n * P);
  for (let t = 0; t < n; t++) {
    const c = h.cells[t];
    const i = (c / cols) | 0;
    const j = c - i * cols;
    const f = h.fold[t];
    const r2 = absR[t] * absR[t];
    const o = t * P;
    x[o] = 1;
    x[o + 1] = rowSpread[i] + colSpread[j];
    x[o + 2] = shrunkRms(mg.rowSq[i] - r2, mg.rowCount[i] - 1, mg.meanSq);
    x[o + 3] = shrunkRms(mg.colSq[j] - r2, mg.colCount[j] - 1, mg.meanSq);
    x[o + 4] = 1 / Math.sqrt(1 + mg.rowSupport[i] - mg.rowFold[i * k + f]);
    x[o + 5] = 1 / Math.sqrt(1 + mg.colSupport[j] - mg.colFold[j * k + f]);
  }
  const model: ErrorScaleModel = fitErrorScale(x, absR, P);
  applyErrorScale(model, x, P, sigma);
  const b = model.coefficients;
  // σ̂ of a blank cell = β₀ + β₁·spread + (row part) + (column part), without building its features.
  const rowPart = new Float64Array(rows);
  const colPart = new Float64Array(cols);
  for (let i = 0; i < rows; i++)
    rowPart[i] =
      b[1] * rowSpread[i] +
      b[2] * shrunkRms(mg.rowSq[i], mg.rowCount[i], mg.meanSq) +
      b[4] / Math.sqrt(1 + (mg.rowSupport[i] * (k - 1)) / k);
  for (let j = 0; j < cols; j++)
    colPart[j] =
      b[1] * colSpread[j] +
      b[3] * shrunkRms(mg.colSq[j], mg.colCount[j], mg.meanSq) +
      b[5] / Math.sqrt(1 + (mg.colSupport[j] * (k - 1)) / k);
  for (let i = 0; values && i < rows; i++) {
    const base = i * cols;
    const ri = b[0] + rowPart[i];
    for (let j = 0; j < cols; j++) {
      const c = base + j;
      if (values[c] === values[c]) continue;
      const v = ri + colPart[j];
      errorScale[c] = v > model.floor ? v : model.floor;
    }
  }
  return {
    method: INTERVAL_METHOD,
    scaleSource: 'error model',
    coefficients: Array.from(b),
    heldOut: heldOut(),
    errorScale,
  };
}

/** Running sample standard deviation of every cell's prediction across ensemble members (Welford). */
export class EnsembleSpread {
  private readonly mean: Float64Array;
  private readonly m2: Float64Array;
  private members = 0;

  constructor(cells: number) {
    this.mean = new Float64Array(cells);
    this.m2 = new Float64Array(cells);
  }

  add(p: Float64Array): void {
    const cnt = ++this.members;
    const mean = this.mean;
    const m2 = this.m2;
    for (let c = 0; c < p.length; c++) {
      const d = p[c] - mean[c];
      mean[c] += d / cnt;
      m2[c] += d * (p[c] - mean[c]);
    }
  }

  /** sd with divisor M − 1. */
  spread(): Float64Array {
    const m = this.members;
    const out = new Float64Array(this.mean.length);
    for (let c = 0; c < out.length; c++) out[c] = Math.sqrt(Math.max(this.m2[c], 0) / (m - 1));
    return out;
  }
}

export interface IntervalsAtLevel {
  level: number;
  method: typeof INTERVAL_METHOD;
  scaleSource: IntervalCalibration['scaleSource'];
  /** Bounds for every cell (row-major), clipped to the scale and inclusive; NaN on observed cells. */
  lower: Float64Array;
  upper: Float64Array;
  /** Quantile used and the coverage/width measured on the held-out folds. */
  heldOut: LevelSummary;
  /** The same procedure with a constant width (σ̂ ≡ 1), for comparison. */
  constantWidth: LevelSummary;
}

/** The intervals of a run at `level`: bounds around its estimates, and what the held-out folds measured. */
export function intervalsAtLevel(
  cal: IntervalCalibration,
  estimates: Float64Array,
  scale: RatingScale,
  level: number,
): IntervalsAtLevel {
  const heldOut = summarizeLevel(cal.heldOut, level, scale, true);
  const constantWidth = summarizeLevel(cal.heldOut, level, scale, false);
  const { lower, upper } = intervalBounds(estimates, cal.errorScale, heldOut.q, scale);
  return { level, method: cal.method, scaleSource: cal.scaleSource, lower, upper, heldOut, constantWidth };
}
