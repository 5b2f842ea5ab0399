/**
 * The rating matrix: the observed data an analyst edits.
 *
 * Values are stored row-major in one Float64Array of length rows × cols;
 * a missing cell is NaN (and only NaN). Model output never lives here:
 * predictions, baselines and spreads belong to a FitResult (see engine/types.ts).
 */

export interface RatingScale {
  /** Lowest allowed rating. */
  min: number;
  /** Highest allowed rating. */
  max: number;
  /** Step between allowed ratings (0 = continuous). */
  step: number;
}

export interface RatingMatrix {
  rowLabels: string[];
  colLabels: string[];
  /** Row-major, length rowLabels.length * colLabels.length; NaN = missing. */
  values: Float64Array;
  scale: RatingScale;
  /** Title of the row-label column (e.g. "Wine"), as the imported file gave it; absent when none. */
  rowHeader?: string;
}

function rowCount(m: RatingMatrix): number {
  return m.rowLabels.length;
}

function colCount(m: RatingMatrix): number {
  return m.colLabels.length;
}

export function observedCount(m: RatingMatrix): number {
  let n = 0;
  const v = m.values;
  for (let i = 0; i < v.length; i++) if (v[i] === v[i]) n++;
  return n;
}

/** Summary shown in the status line. */
export interface MatrixSummary {
  rows: number;
  cols: number;
  observed: number;
  missing: number;
  /** Percent of cells that are missing, 0–100. */
  percentMissing: number;
}

export function summarize(m: RatingMatrix): MatrixSummary {
  const rows = rowCount(m);
  const cols = colCount(m);
  const total = rows * cols;
  const observed = observedCount(m);
  return {
    rows,
    cols,
    observed,
    missing: total - observed,
    percentMissing: total === 0 ? 0 : (100 * (total - observed)) / total,
  };
}

/** Number of decimals needed to show values on this scale's step (0–6). */
export function scaleDecimals(scale: RatingScale): number {
  if (!(scale.step > 0)) return 2;
  for (let d = 0; d <= 6; d++) {
    const f = 10 ** d;
    if (Math.abs(Math.round(scale.step * f) - scale.step * f) < 1e-9) return d;
  }
  return 6;
}

export function cloneMatrix(m: RatingMatrix): RatingMatrix {
  return {
    rowLabels: m.rowLabels.slice(),
    colLabels: m.colLabels.slice(),
    values: new Float64Array(m.values),
    scale: { ...m.scale },
    ...(m.rowHeader !== undefined ? { rowHeader: m.rowHeader } : {}),
  };
}
