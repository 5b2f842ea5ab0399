/**
 * Seed stability: how much the filled values move when only the seed changes.
 *
 * The same settings are fitted twice on the same data, with seed s and seed s + 1 (the seed
 * drives the spectral start's power iteration and the random start). Over the filled cells
 * (missing in the data), with a = the first fit's estimate and b = the second's:
 *   move_c = |a_c − b_c|,   threshold τ = step / 2 (half a scale step; for a continuous
 *   scale, 1/20 of its range),
 *   moved = #{c : move_c > τ},   fraction = moved / #filled,   max = max_c move_c,
 *   mean = Σ move_c / #filled.
 * The result rests on the start — and is flagged — when fraction > 1 %: then more than one
 * filled cell in a hundred changes by more than rounding to the scale would hide.
 */
import type { RatingMatrix, RatingScale } from '../matrix/ratingMatrix';
import type { SparseRatings } from '../matrix/sparseRatings';
import { predictRow } from './predictions';
import type { SparseModel } from './fitModel';
import type { FitSettings } from './types';
import { fitModel } from './fitModel';

const SEED_MOVE_SHARE = 0.01;

export interface SeedStability {
  seeds: [number, number];
  /** Filled cells compared. */
  cells: number;
  /** τ: half a scale step (continuous scale: 1/20 of the range). */
  threshold: number;
  moved: number;
  movedFraction: number;
  maxMove: number;
  meanMove: number;
  /** movedFraction > 1 %: the estimates depend on the start. */
  flagged: boolean;
}

export function moveThreshold(scale: RatingMatrix['scale']): number {
  return scale.step > 0 ? scale.step / 2 : (scale.max - scale.min) / 20;
}

/** The counts of the header formula over the filled cells, one cell at a time. */
class MoveTally {
  private cells = 0;
  private moved = 0;
  private maxMove = 0;
  private sum = 0;

  constructor(private readonly threshold: number) {}

  add(a: number, b: number): void {
    const d = Math.abs(a - b);
    if (!Number.isFinite(d)) return;
    this.cells++;
    this.sum += d;
    if (d > this.maxMove) this.maxMove = d;
    if (d > this.threshold) this.moved++;
  }

  result(seeds: [number, number]): SeedStability {
    const { cells, moved, threshold } = this;
    const movedFraction = cells > 0 ? moved / cells : 0;
    return {
      seeds,
      cells,
      threshold,
      moved,
      movedFraction,
      maxMove: this.maxMove,
      meanMove: cells > 0 ? this.sum / cells : 0,
      flagged: movedFraction > SEED_MOVE_SHARE,
    };
  }
}

/** Compare two fits' predictions over the matrix's missing cells. */
export function compareSeedFits(
  matrix: RatingMatrix,
  a: Float64Array,
  b: Float64Array,
  seeds: [number, number],
): SeedStability {
  const threshold = moveThreshold(matrix.scale);
  const v = matrix.values;
  const tally = new MoveTally(threshold);
  for (let c = 0; c < v.length; c++) if (v[c] !== v[c]) tally.add(a[c], b[c]);
  return tally.result(seeds);
}

/**
 * The same comparison from two fitted models on sparse storage: each model predicts one row
 * at a time into a reused buffer, read at the row's blank cells only (no dense matrix).
 */
export function compareSeedModels(
  data: SparseRatings,
  scale: RatingScale,
  a: SparseModel,
  b: SparseModel,
  seeds: [number, number],
): SeedStability {
  const threshold = moveThreshold(scale);
  const { rows, cols } = data;
  const ra = new Float64Array(cols);
  const rb = new Float64Array(cols);
  const row = (model: SparseModel, i: number, out: Float64Array): void => {
    if ('predictions' in model) out.set(model.predictions.subarray(i * cols, (i + 1) * cols));
    else predictRow(model, scale, i, out);
  };
  const tally = new MoveTally(threshold);
  for (let i = 0; i < rows; i++) {
    row(a, i, ra);
    row(b, i, rb);
    let p = data.rowPtr[i];
    const end = data.rowPtr[i + 1];
    for (let j = 0; j < cols; j++) {
      if (p < end && data.rowCol[p] === j) {
        p++;
        continue;
      }
      tally.add(ra[j], rb[j]);
    }
  }
  return tally.result(seeds);
}

/** Fit with seed s and s + 1 and compare (`first` may pass an existing seed-s fit's predictions). */
export function seedStability(matrix: RatingMatrix, settings: FitSettings, first?: Float64Array): SeedStability {
  const s = settings.seed;
  const a = first ?? fitModel(matrix, settings).predictions;
  const b = fitModel(matrix, { ...settings, seed: s + 1 }).predictions;
  return compareSeedFits(matrix, a, b, [s, s + 1]);
}

/** One line for people, or '' when the result does not rest on the start. */
export function describeSeedStability(r: SeedStability): string {
  if (!r.flagged) return '';
  return (
    `the estimates depend on the start: with seed ${r.seeds[1]} instead of ${r.seeds[0]}, ${r.moved} of ${r.cells} filled cells ` +
    `(${(100 * r.movedFraction).toFixed(1)} %) move by more than ${r.threshold} (half a scale step); largest move ${r.maxMove.toFixed(2)}, mean ${r.meanMove.toFixed(3)}`
  );
}
