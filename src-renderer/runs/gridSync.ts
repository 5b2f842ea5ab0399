/**
 * Keeps the grid's model layers in step with the shown run: estimates in the
 * blank cells (tinted by spread), the baselines column and row, and the marks
 * on weakly determined rows and columns. A run whose shape no longer matches
 * the matrix (rows or columns added, deleted or swapped) is not drawn.
 */
import type { FitResult } from '../../src-shared/engine/types';
import type { BaselineLayer, GridLayers, WeakMarks } from '../grid/overlayLayer';
import type { PanelContext } from '../panels/panelContext';
import type { Run } from './runStore';

export function baselineLayer(result: FitResult): BaselineLayer {
  const s = result.settings;
  if (s.model === 'gaussian') {
    return { row: null, col: result.colBaseline, colLabel: 'Column mean (μ)' };
  }
  const usesRow = s.centering === 'row' || s.centering === 'both';
  const usesCol = s.centering === 'column' || s.centering === 'both';
  return {
    row: usesRow ? result.rowBaseline : new Float64Array(result.rows).fill(s.centering === 'none' ? 0 : NaN),
    col: usesCol ? result.colBaseline : null,
    colLabel: s.centering === 'both' ? 'Column offset' : 'Column baseline',
  };
}

export function weakMarks(run: Run): WeakMarks | null {
  if (!run.trust) return null;
  const k = run.result.rank;
  const why = (n: number, what: string) => `Weakly determined: ${n} observed value${n === 1 ? '' : 's'} in this ${what}, fewer than the rank (${k}); its estimates rest mostly on the baseline.`;
  return {
    rows: new Map(run.trust.weakRows.map((i) => [i, why(run.trust!.rowSupport[i], 'row')])),
    cols: new Map(run.trust.weakCols.map((j) => [j, why(run.trust!.colSupport[j], 'column')])),
  };
}

export function layersForRun(run: Run | undefined, values: Float64Array): Partial<GridLayers> {
  if (!run || run.result.predictions.length !== values.length) return { overlay: null, baselines: null, weak: null };
  const spread = run.trust?.spread ?? run.result.spread;
  let maxSpread = 0;
  if (spread) for (let c = 0; c < values.length; c++) if (values[c] !== values[c] && spread[c] > maxSpread) maxSpread = spread[c];
  return {
    overlay: { predictions: run.result.predictions, spread, maxSpread },
    baselines: baselineLayer(run.result),
    weak: weakMarks(run),
  };
}

export function syncGridWithRuns(ctx: PanelContext): void {
  let stale = false;
  const apply = () => {
    const run = ctx.runs.shown;
    const m = ctx.store.current;
    const matches = !!run && run.rows === m.rowLabels.length && run.cols === m.colLabels.length;
    ctx.grid.setLayers(layersForRun(matches ? run : undefined, m.values));
    if (run && !matches && !stale) ctx.notice.show('Estimates hidden: the matrix’s shape changed since the last fill. Fill again to see new ones.');
    stale = !!run && !matches;
  };
  ctx.runs.subscribe((e) => {
    if (e.type === 'shown' || e.type === 'runs' || (e.type === 'updated' && e.id === ctx.runs.shownId)) apply();
  });
  ctx.store.subscribe((e) => {
    if (e.type === 'shape' || e.type === 'replaced') apply();
  });
}
