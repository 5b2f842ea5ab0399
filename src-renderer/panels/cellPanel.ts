/**
 * Details of the focused cell: the observed value, or the filled value taken
 * apart as baseline + interaction term, its spread and support, and the
 * observed cells in its row that moved it most.
 */
import { explainCell } from '../../src-shared/engine/contributions';
import { formatObserved } from '../grid/cellText';
import { runFitsDocument } from '../runs/runMatch';
import { afterPaint } from './afterPaint';
import { el, fmt } from './dom';
import type { PanelContext } from './panelContext';

function dotFactors(u: Float64Array, v: Float64Array, i: number, j: number, k: number): number {
  let s = 0;
  for (let c = 0; c < k; c++) s += u[i * k + c] * v[j * k + c];
  return s;
}

export function mountCellPanel(root: HTMLElement, ctx: PanelContext): { focus(row: number, col: number): void } {
  const body = el('div', { testid: 'cell-details' }, [el('p', { className: 'rf-hint' }, ['Select a cell to see where its value comes from.'])]);
  root.append(el('h2', {}, ['Cell details']), body);
  let focused: { row: number; col: number } | null = null;

  const render = () => {
    if (!focused) return;
    const { row, col } = focused;
    const m = ctx.store.current;
    if (row >= m.rowLabels.length || col >= m.colLabels.length) return;
    const cols = m.colLabels.length;
    const idx = row * cols + col;
    const y = m.values[idx];
    const run = ctx.runs.shown;
    const rows: [string, string][] = [];
    const title = el('p', { className: 'rf-cell-title' }, [`${m.rowLabels[row]} × ${m.colLabels[col]}`]);
    const parts: HTMLElement[] = [title];
    let rowObs = 0;
    let colObs = 0;
    for (let j = 0; j < cols; j++) if (!Number.isNaN(m.values[row * cols + j])) rowObs++;
    for (let i = 0; i < m.rowLabels.length; i++) if (!Number.isNaN(m.values[i * cols + col])) colObs++;
    const matches = runFitsDocument(run, ctx.store);
    if (!Number.isNaN(y)) {
      rows.push(['Observed rating', formatObserved(y, m.scale)]);
      if (matches) rows.push(['Model’s fit of it', fmt(run.result.predictions[idx], 2)]);
    } else if (!matches) {
      rows.push(['Value', 'blank (no estimate yet: use Fill)']);
    } else {
      const r = run.result;
      const ex = explainCell(m.values, r, row, col);
      rows.push(['Filled value (estimate)', fmt(r.predictions[idx], 2)]);
      rows.push(['= baseline', fmt(r.baseline[idx], 2)]);
      const raw = r.baseline[idx] + (r.rank > 0 ? dotFactors(r.rowFactors, r.colFactors, row, col, r.rank) : 0);
      const clipped = r.settings.model === 'lowrank' && (raw < m.scale.min || raw > m.scale.max);
      if (r.settings.model === 'lowrank') rows.push(['+ interaction term', fmt(raw - r.baseline[idx], 2)]);
      if (clipped) rows.push(['clipped to the scale from', fmt(raw, 2)]);
      const spread = run.trust?.spread[idx] ?? r.spread?.[idx];
      rows.push(['Spread (std. dev.)', fmt(spread, 2)]);
      if (ex) {
        const top = ex.contributions.slice(0, 5);
        if (top.length) {
          const table = el('table', { className: 'rf-table', testid: 'cell-contributors' }, [
            el('tr', {}, [el('th', {}, ['Observed in this row']), el('th', {}, ['value']), el('th', {}, ['adds'])]),
            ...top.map((c) =>
              el('tr', {}, [el('td', {}, [m.colLabels[c.col]]), el('td', {}, [formatObserved(c.value, m.scale)]), el('td', {}, [(c.contribution >= 0 ? '+' : '') + c.contribution.toFixed(2)])]),
            ),
          ]);
          parts.push(
            el('h3', {}, ['What moved it most']),
            el('p', { className: 'rf-hint' }, ['Each observed cell in the row adds its weight × (value − baseline); together they make up the interaction term (exactly so once the fit has settled).']),
            table,
          );
        }
      }
    }
    rows.push(['Support', `${rowObs} observed in the row, ${colObs} in the column`]);
    if (matches && run.trust) {
      if (run.trust.weakRows.includes(row)) rows.push(['Caution', `row has fewer observed values than the rank (${run.result.rank})`]);
      if (run.trust.weakCols.includes(col)) rows.push(['Caution', `column has fewer observed values than the rank (${run.result.rank})`]);
    }
    const dl = el('table', { className: 'rf-table rf-kv' }, rows.map(([k, v]) => el('tr', {}, [el('td', {}, [k]), el('td', {}, [v])])));
    parts.splice(1, 0, dl);
    body.replaceChildren(...parts);
  };

  ctx.runs.subscribe(() => afterPaint('cell-panel', render));
  ctx.store.subscribe(() => afterPaint('cell-panel', render));
  return {
    focus(row, col) {
      focused = { row, col };
      render();
    },
  };
}
