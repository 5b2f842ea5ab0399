/**
 * Details of the focused cell: the observed value, or the filled value taken apart into
 * terms that add up to it (engine/decomposition.ts: the baseline parts of the run's centering
 * + the interaction term, or for the Gaussian family the column mean μ + the regression on
 * the row's observed cells; then any clipping or rounding), its spread labelled for what it
 * is, its support, and the observed cells that moved it most.
 */
import { explainCell } from '../../src-shared/engine/contributions';
import { decomposeCell } from '../../src-shared/engine/decomposition';
import { formatObserved } from '../grid/cellText';
import { runFitsDocument } from '../runs/runMatch';
import { afterPaint } from './afterPaint';
import { el, fmt } from './dom';
import type { IntervalsAtLevel } from '../../src-shared/engine/cellIntervals';
import { ratingsInside } from '../../src-shared/engine/intervals';
import type { RatingScale } from '../../src-shared/matrix/ratingMatrix';
import { intervalsOfRun, levelText } from '../runs/runIntervals';
import type { PanelContext } from './panelContext';

/** "estimate 4.6, 80 % interval 3.4–5.8" and what it means. */
function intervalBlock(estimate: number, iv: IntervalsAtLevel, idx: number, scale: RatingScale): HTMLElement[] {
  const lo = iv.lower[idx];
  const hi = iv.upper[idx];
  const level = levelText(iv.level);
  const inside = ratingsInside(lo, hi, scale);
  const measured = Number.isFinite(iv.heldOut.coverage)
    ? ` On the held-out folds such intervals held the hidden rating ${(iv.heldOut.coverage * 100).toFixed(1)} % of the time.`
    : '';
  return [
    el('p', { className: 'rf-cell-interval', testid: 'cell-interval' }, [
      `estimate ${fmt(estimate, 1)}, ${level} interval ${fmt(lo, 1)}–${fmt(hi, 1)}`,
    ]),
    el('p', { className: 'rf-hint', testid: 'cell-interval-meaning' }, [
      `Among blank cells like this one, the true rating lies inside such an interval about ${level} of the time; ` +
        'this holds on average over cells like the ones hidden during cross-validation, not as a promise for this cell. ' +
        'Both ends count as inside; the range is cut to the scale.' +
        (inside ? ` On this scale it holds the ratings ${inside.first} to ${inside.last}.` : '') +
        measured,
    ]),
  ];
}

export function mountCellPanel(root: HTMLElement, ctx: PanelContext): { focus(row: number, col: number): void } {
  const body = el('div', { testid: 'cell-details' }, [
    el('p', { className: 'rf-hint' }, ['Select a cell to see where its value comes from.']),
  ]);
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
    let termValues: number[] | undefined;
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
      const d = decomposeCell(m.values, r, m.scale, row, col);
      rows.push(['Filled value (estimate)', fmt(r.predictions[idx], 3)]);
      const iv = intervalsOfRun(run, m.scale, ctx.view.state.intervalLevel);
      if (iv && Number.isFinite(iv.lower[idx])) parts.push(...intervalBlock(r.predictions[idx], iv, idx, m.scale));
      if (d) {
        d.terms.forEach((t, n) => rows.push([`${n === 0 ? '=' : '+'} ${t.label}`, fmt(t.value, 3)]));
        termValues = d.terms.map((t) => t.value);
      }
      const spread = run.trust?.spread[idx] ?? r.spread?.[idx];
      if (r.settings.model === 'gaussian') rows.push(['Conditional spread (std. dev.)', fmt(spread, 2)]);
      else rows.push(['Fold-model spread', fmt(spread, 2)]);
      const shares = d?.shares;
      const ex = r.settings.model === 'lowrank' ? explainCell(m.values, r, row, col) : undefined;
      const top = shares
        ? shares.slice(0, 5).map((c) => ({
            label: r.settings.model === 'gaussian' && r.settings.transpose ? m.rowLabels[c.row] : m.colLabels[c.col],
            value: c.value,
            contribution: c.contribution,
          }))
        : (ex?.contributions
            .slice(0, 5)
            .map((c) => ({ label: m.colLabels[c.col], value: c.value, contribution: c.contribution })) ?? []);
      if (top.length) {
        const table = el('table', { className: 'rf-table', testid: 'cell-contributors' }, [
          el('tr', {}, [
            el('th', {}, [
              shares && r.settings.model === 'gaussian' && r.settings.transpose
                ? 'Observed in this column'
                : 'Observed in this row',
            ]),
            el('th', {}, ['value']),
            el('th', {}, ['adds']),
          ]),
          ...top.map((c) =>
            el('tr', {}, [
              el('td', {}, [c.label]),
              el('td', {}, [formatObserved(c.value, m.scale)]),
              el('td', {}, [(c.contribution >= 0 ? '+' : '') + c.contribution.toFixed(3)]),
            ]),
          ),
        ]);
        parts.push(
          el('h3', {}, ['What moved it most']),
          el('p', { className: 'rf-hint' }, [
            shares
              ? 'Each observed cell adds its regression weight × (value − its column mean μ); together they make the regression term above exactly.'
              : 'Each observed cell in the row adds its weight × (value − baseline); together they make up the interaction term (exactly so once the fit has settled).',
          ]),
          table,
        );
      }
      parts.push(
        el('p', { className: 'rf-hint', testid: 'cell-spread-note' }, [
          r.settings.model === 'gaussian'
            ? 'Conditional spread: the Gaussian model’s own standard deviation of this cell given the row’s observed cells. It is not a cross-validated error.'
            : 'Fold-model spread: how much this estimate moves between 5 refits, each leaving out a fifth of the observed cells. It measures the model’s stability, not its error: it is not an error bar (the interval above is).',
        ]),
        el('p', { className: 'rf-hint' }, ['Terms are shown to 3 decimals; they add up to the value before rounding.']),
      );
    }
    rows.push(['Support', `${rowObs} observed in the row, ${colObs} in the column`]);
    if (matches && run.trust) {
      if (run.trust.weakRows.includes(row))
        rows.push(['Caution', `row has fewer observed values than the rank (${run.result.rank})`]);
      if (run.trust.weakCols.includes(col))
        rows.push(['Caution', `column has fewer observed values than the rank (${run.result.rank})`]);
    }
    const dl = el(
      'table',
      { className: 'rf-table rf-kv', testid: 'cell-facts' },
      rows.map(([k, v]) => el('tr', {}, [el('td', {}, [k]), el('td', {}, [v])])),
    );
    // The exact terms, for whoever checks that they add up (the end-to-end tests do).
    if (termValues) dl.dataset.terms = JSON.stringify(termValues);
    parts.splice(1, 0, dl);
    body.replaceChildren(...parts);
  };

  ctx.runs.subscribe(() => afterPaint('cell-panel', render));
  ctx.view.subscribe((changed) => {
    if (changed.has('intervalLevel')) afterPaint('cell-panel', render);
  });
  ctx.store.subscribe(() => afterPaint('cell-panel', render));
  return {
    focus(row, col) {
      focused = { row, col };
      render();
    },
  };
}
