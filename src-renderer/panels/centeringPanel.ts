/**
 * "Compare centering": the model form's rank and λ evaluated under all four
 * centering modes on the same folds, with progress and Stop, a table (mean
 * RMSE ± sd, MAE, each fold's RMSE) with the best marked, a chart of the fold
 * spread, and a "use" action per row that puts the mode into the model form.
 */
import type { Centering } from '../../src-shared/engine/types';
import { ErrorBarChart } from '../charts/errorBarChart';
import { CENTERING_SHORT } from '../runs/describeSettings';
import { centeringRows, COMPARE_FOLDS, planCenteringComparison, type CenteringRow } from './centeringModel';
import { el, fmt } from './dom';
import { GridRunPanel } from './gridRunPanel';
import type { PanelContext } from './panelContext';

export function mountCenteringPanel(root: HTMLElement, ctx: PanelContext): void {
  const familyNote = el('p', { className: 'rf-hint rf-note', testid: 'centering-family-note', hidden: true });
  const summary = el('p', { className: 'rf-hint', testid: 'centering-summary' });
  const tableWrap = el('div', { className: 'rf-table-wrap' });
  const chartHost = el('div', { className: 'rf-chart', testid: 'centering-chart' });

  const useCentering = (c: Centering) => {
    const form = ctx.settings.value;
    const base = form.model === 'lowrank' ? form : planCenteringComparison(form).settingsList[0];
    ctx.settings.set({ ...base, centering: c });
    ctx.notice.show(
      `Model settings: centering set to “${CENTERING_SHORT[c]}”. Fill again to see the estimates.`,
      'info',
      4000,
    );
  };

  let chart: ErrorBarChart | undefined;
  type Plan = ReturnType<typeof planCenteringComparison> & { folds: number };
  const runner = new GridRunPanel<Plan>(ctx, {
    prefix: 'centering',
    recordAs: 'centering',
    runLabel: 'Compare centering',
    idleText: 'Not run yet. Uses the rank and λ now set in the Model tab.',
    plan: () => {
      const plan = planCenteringComparison(ctx.settings.value);
      familyNote.hidden = plan.note === null;
      familyNote.textContent = plan.note ?? '';
      return { ...plan, folds: COMPARE_FOLDS };
    },
    startText: () => 'Starting…',
    doneText: (plan, reply) => `Done: ${plan.settingsList.length} modes × ${reply.k} folds.`,
    failedText: 'The comparison did not finish.',
    errorPrefix: 'Could not compare centering',
    staleText: {
      replaced: 'These results belong to the previous data set. Compare again for the one now open.',
      edited: 'The data has been edited since this comparison; compare again to include the edits.',
    },
    render: (reply, plan) => {
      const first = plan.settingsList[0];
      const settingsText = `Rank ${first.rank}, λ ${first.lambda}`;
      const rows = centeringRows(reply);
      const best = rows.find((r) => r.best);
      summary.textContent = best
        ? `${settingsText}, ${reply.k} folds, seed ${reply.seed}. Lowest error: ${CENTERING_SHORT[best.centering]} (RMSE ${fmt(best.meanRmse)}).`
        : `${settingsText}: every mode failed to fit.`;
      tableWrap.replaceChildren(buildTable(rows, reply.k, useCentering));
      chart?.set(
        rows.map((r) => ({
          label: CENTERING_SHORT[r.centering],
          mean: r.meanRmse,
          sd: r.sdRmse,
          folds: r.foldRmse,
          best: r.best,
        })),
      );
    },
  });
  runner.results.append(
    summary,
    tableWrap,
    chartHost,
    el('p', { className: 'rf-hint' }, [
      'Dot: mean RMSE over the folds; whisker: ± one standard deviation of the folds; small circles: each fold. Lower is better.',
    ]),
  );

  root.append(
    el('h2', {}, ['Compare centering']),
    el('p', { className: 'rf-hint' }, [
      `Holds out one of ${COMPARE_FOLDS} parts of the observed cells at a time (${COMPARE_FOLDS} folds, the same split for every mode), fits with each centering and measures how far the estimates land from the held-out ratings.`,
    ]),
    familyNote,
    ...runner.controls(),
  );
  chart = new ErrorBarChart(chartHost);
}

function buildTable(rows: CenteringRow[], k: number, use: (c: Centering) => void): HTMLTableElement {
  const table = el('table', { className: 'rf-table rf-compare-table', testid: 'centering-table' });
  const head = el('tr', {}, [
    el('th', {}, ['Centering']),
    el('th', { title: 'Mean RMSE over the folds ± its standard deviation' }, ['RMSE ± sd']),
    el('th', { title: 'Mean absolute error over the folds' }, ['MAE']),
    el('th', {}, ['']),
  ]);
  table.append(el('thead', {}, [head]));
  const body = el('tbody');
  for (const r of rows) {
    const useButton = el(
      'button',
      {
        className: 'rf-button rf-small',
        testid: `centering-use-${r.centering}`,
        title: 'Put this centering into the model settings',
      },
      ['Use'],
    );
    useButton.addEventListener('click', () => use(r.centering));
    const mode = el('td', {}, [CENTERING_SHORT[r.centering]]);
    if (r.best) mode.append(el('span', { className: 'rf-best-mark', testid: 'centering-best-mark' }, [' ★ best']));
    const tr = el('tr', { testid: 'centering-row', className: r.best ? 'rf-best' : undefined }, [
      mode,
      el('td', { className: 'rf-num', testid: 'centering-rmse' }, [
        r.error ? 'failed' : `${fmt(r.meanRmse)} ± ${fmt(r.sdRmse)}`,
      ]),
      el('td', { className: 'rf-num' }, [fmt(r.meanMae)]),
      el('td', {}, [useButton]),
    ]);
    tr.dataset.centering = r.centering;
    const foldText = r.error ? r.error : `fold RMSE: ${r.foldRmse.map((v) => fmt(v, 2)).join('  ')}`;
    const sub = el('tr', { className: 'rf-fold-line', testid: 'centering-folds' }, [el('td', {}, [foldText])]);
    (sub.firstChild as HTMLTableCellElement).colSpan = 4;
    body.append(tr, sub);
  }
  table.append(body);
  table.title = `Each row: one centering mode, ${k}-fold cross-validation on the same folds.`;
  return table;
}
