/**
 * The model's layers as the grid draws them. Everything here is derived from
 * a run (or a pair of runs) and is never stored in the document.
 */

export interface OverlayLayer {
  /** Row-major predictions for every cell; drawn only where the document is blank. */
  predictions: Float64Array;
  /** Row-major spread (std. dev.) per cell, when the run computed it. */
  spread?: Float64Array;
  /** Largest spread over blank cells, for scaling the tint. */
  maxSpread: number;
  /** Row-major interval width (upper − lower) per cell, when the run has intervals: the tint follows it. */
  width?: Float64Array;
  /** Largest and smallest width over blank cells: the tint runs from pale at the smallest to deep at the largest. */
  maxWidth?: number;
  minWidth?: number;
}

interface DiffLayer {
  /** Row-major B − A on cells blank in the document; NaN elsewhere. */
  values: Float64Array;
  maxAbs: number;
}

export interface BaselineLayer {
  /** One baseline per row (side column), or null when the model has none (the column then shows only counts). */
  row: Float64Array | null;
  /** One per column (pinned bottom row), or null when the centering has none. */
  col: Float64Array | null;
  /** Label of the bottom row. */
  colLabel: string;
  /** Title of the side column, and what the side column and the bottom row hold, in words (their tooltips). */
  rowLabel?: string;
  rowTooltip?: string;
  colTooltip?: string;
}

export interface WeakMarks {
  /** Row index → reason shown on hover. */
  rows: Map<number, string>;
  cols: Map<number, string>;
}

export interface GridLayers {
  overlay: OverlayLayer | null;
  overlayVisible: boolean;
  diff: DiffLayer | null;
  baselines: BaselineLayer | null;
  weak: WeakMarks | null;
}

/**
 * Amber tint whose strength grows with the cell's interval width (or, for a run without
 * intervals, its spread): faint = narrow interval, strong = wide.
 */
export function estimateTint(layer: OverlayLayer, index: number): string {
  const byWidth = layer.width !== undefined && (layer.maxWidth ?? 0) > 0;
  const low = byWidth ? Math.min(layer.minWidth ?? 0, layer.maxWidth!) : 0;
  const s = byWidth ? layer.width![index] - low : layer.spread?.[index];
  const top = byWidth ? layer.maxWidth! - low : layer.maxSpread;
  const strength =
    s === undefined || !Number.isFinite(s) || !(top > 0) ? 0.1 : 0.06 + 0.36 * Math.max(0, Math.min(1, s / top));
  return `rgba(214, 138, 54, ${strength.toFixed(3)})`;
}

/** Our diverging scale for B − A: slate blue below zero, paper at zero, brick red above. */
export function diffColour(d: number, maxAbs: number): string {
  const t = maxAbs > 0 ? Math.max(-1, Math.min(1, d / maxAbs)) : 0;
  const a = (0.08 + 0.5 * Math.abs(t)).toFixed(3);
  return t < 0 ? `rgba(58, 96, 160, ${a})` : `rgba(178, 64, 44, ${a})`;
}
