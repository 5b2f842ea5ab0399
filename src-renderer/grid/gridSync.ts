/**
 * Keeps the grid's model layers in step with the shown run: estimates in the
 * blank cells (tinted by interval width, or by spread for a run without intervals), the baselines column and row, and the marks
 * on weakly determined rows and columns. A run is drawn only on the data set
 * and cell layout it was computed on (runs/runMatch.ts); after rows or columns
 * change, its estimates stay hidden until the live refit brings new ones.
 */
import { supportOf, weakThreshold } from '../../src-shared/engine/trust';
import type { FitResult } from '../../src-shared/engine/types';
import type { RatingMatrix } from '../../src-shared/matrix/ratingMatrix';
import type { BaselineLayer, GridLayers, WeakMarks } from './overlayLayer';
import type { PanelContext } from '../panels/panelContext';
import { DEFAULT_INTERVAL_LEVEL } from '../../src-shared/engine/intervals';
import { runFitsDocument } from '../runs/runMatch';
import { intervalsOfRun } from '../runs/runIntervals';
import type { Run } from '../runs/runStore';

function baselineLayer(result: FitResult): BaselineLayer {
  const s = result.settings;
  if (s.model === 'gaussian') {
    return {
      row: null,
      col: result.colBaseline,
      colLabel: 'Column mean (μ)',
      colTooltip:
        'The Gaussian model’s estimate of each column’s mean μ. A filled value is μ plus the regression on the observed cells of its row (Cell tab).',
    };
  }
  const usesRow = s.centering === 'row' || s.centering === 'both';
  const usesCol = s.centering === 'column' || s.centering === 'both';
  const words: Record<
    typeof s.centering,
    { rowLabel: string; rowTooltip: string; colLabel: string; colTooltip: string }
  > = {
    none: {
      rowLabel: 'Baseline',
      rowTooltip: 'Centering none: every baseline is 0, so a filled value is the interaction term alone.',
      colLabel: 'Column baseline',
      colTooltip: '',
    },
    row: {
      rowLabel: 'Row mean',
      rowTooltip:
        'The mean of the row’s observed ratings: the baseline of every cell in the row. A filled value is this plus the interaction term.',
      colLabel: 'Column baseline',
      colTooltip: '',
    },
    column: {
      rowLabel: 'Baseline',
      rowTooltip: 'Centering by column: the baseline is in the bottom row.',
      colLabel: 'Column mean',
      colTooltip:
        'The mean of the column’s observed ratings: the baseline of every cell in the column. A filled value is this plus the interaction term.',
    },
    both: {
      rowLabel: 'Row part',
      rowTooltip:
        'The row’s part of the baseline: global mean + the row’s offset. A cell’s baseline adds its column’s offset (bottom row); a filled value adds the interaction term to that.',
      colLabel: 'Column offset',
      colTooltip:
        'The column’s offset from the global mean (shrunk toward 0). A cell’s baseline is the row part (right-hand column) + this offset.',
    },
  };
  const w = words[s.centering];
  return {
    row: usesRow ? result.rowBaseline : new Float64Array(result.rows).fill(s.centering === 'none' ? 0 : NaN),
    col: usesCol ? result.colBaseline : null,
    colLabel: w.colLabel,
    rowLabel: w.rowLabel,
    rowTooltip: w.rowTooltip,
    ...(usesCol ? { colTooltip: w.colTooltip } : {}),
  };
}

/**
 * Rows and columns with fewer observed values than the rank, counted on the
 * matrix as it is now (so a new, empty row is marked together with its estimates).
 */
function weakMarks(run: Run, m: RatingMatrix): WeakMarks {
  const k = run.result.rank;
  const s = supportOf(m.values, m.rowLabels.length, m.colLabels.length, weakThreshold(run.settings));
  const why = (n: number, what: string) =>
    `Weakly determined: ${n} observed value${n === 1 ? '' : 's'} in this ${what}, fewer than the rank (${k}); its estimates rest mostly on the baseline.`;
  return {
    rows: new Map(s.weakRows.map((i) => [i, why(s.rowSupport[i], 'row')])),
    cols: new Map(s.weakCols.map((j) => [j, why(s.colSupport[j], 'column')])),
  };
}

/** The layers for a run the caller has checked with runFitsDocument, or empty layers. */
function layersForRun(run: Run | undefined, m: RatingMatrix, level = DEFAULT_INTERVAL_LEVEL): Partial<GridLayers> {
  const values = m.values;
  if (!run) return { overlay: null, baselines: null, weak: null };
  const spread = run.trust?.spread ?? run.result.spread;
  let maxSpread = 0;
  if (spread)
    for (let c = 0; c < values.length; c++) if (values[c] !== values[c] && spread[c] > maxSpread) maxSpread = spread[c];
  const iv = intervalsOfRun(run, m.scale, level);
  let width: Float64Array | undefined;
  let maxWidth = 0;
  let minWidth = Infinity;
  if (iv) {
    width = new Float64Array(values.length);
    for (let c = 0; c < values.length; c++) {
      const w = iv.upper[c] - iv.lower[c];
      width[c] = w;
      if (values[c] !== values[c] && w > maxWidth) maxWidth = w;
      if (values[c] !== values[c] && w < minWidth) minWidth = w;
    }
  }
  return {
    overlay: {
      predictions: run.result.predictions,
      spread,
      maxSpread,
      ...(width ? { width, maxWidth, minWidth: Number.isFinite(minWidth) ? minWidth : 0 } : {}),
    },
    baselines: baselineLayer(run.result),
    weak: weakMarks(run, m),
  };
}

function sameKeys(a: Map<number, string>, b: Map<number, string>): boolean {
  if (a.size !== b.size) return false;
  for (const k of a.keys()) if (!b.has(k)) return false;
  return true;
}

export function syncGridWithRuns(ctx: PanelContext): void {
  let hiddenNotice: number | null = null;
  const apply = () => {
    const run = ctx.runs.shown;
    const fits = runFitsDocument(run, ctx.store);
    ctx.grid.setLayers(layersForRun(fits ? run : undefined, ctx.store.current, ctx.view.state.intervalLevel));
    if (fits || !run) {
      // Estimates are drawn again (or there is no run): the "hidden" notice no longer holds.
      if (hiddenNotice !== null) ctx.notice.clear(hiddenNotice);
      hiddenNotice = null;
      return;
    }
    // The shown run was computed on another arrangement of the cells.
    if (hiddenNotice !== null) return;
    hiddenNotice = ctx.notice.show(
      ctx.controller.liveRefit
        ? 'Rows or columns changed: estimates are hidden until the refit for the new layout arrives.'
        : 'Estimates hidden: rows or columns changed since the last fill. Fill again to see new ones.',
    );
  };
  ctx.view.subscribe((changed) => {
    if (changed.has('intervalLevel')) apply();
  });
  ctx.runs.subscribe((e) => {
    if (e.type === 'shown' || e.type === 'runs' || (e.type === 'updated' && e.id === ctx.runs.shownId)) apply();
  });
  ctx.store.subscribe((e) => {
    if (e.type === 'shape' || e.type === 'replaced') apply();
    // Weak marks follow the observed counts.
    else if (e.type === 'cells' && runFitsDocument(ctx.runs.shown, ctx.store)) {
      const weak = weakMarks(ctx.runs.shown!, ctx.store.current);
      const before = ctx.grid.currentLayers.weak;
      if (!before || !sameKeys(before.rows, weak.rows) || !sameKeys(before.cols, weak.cols))
        ctx.grid.setLayers({ weak });
    }
  });
}
