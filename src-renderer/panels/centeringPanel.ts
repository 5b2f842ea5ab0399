/**
 * "Compare centering": the model form's rank and λ evaluated under all four
 * centering modes on the same folds, with progress and Stop, a table (mean
 * RMSE ± sd, MAE, each fold's RMSE) with the best marked, a chart of the fold
 * spread, and a "use" action per row that puts the mode into the model form.
 */
import type { TunePayload } from '../../src-shared/api';
import type { Centering } from '../../src-shared/engine/types';
import { JobEndedError } from '../bridge/jobTracker';
import { ErrorBarChart } from '../charts/errorBarChart';
import { CENTERING_SHORT } from '../runs/describeSettings';
import { centeringRows, COMPARE_FOLDS, planCenteringComparison, type CenteringRow } from './centeringModel';
import { el, fmt } from './dom';
import type { PanelContext } from './panelContext';

export function mountCenteringPanel(root: HTMLElement, ctx: PanelContext): void {
  const runButton = el('button', { className: 'rf-button rf-primary', testid: 'centering-run' }, ['Compare centering']);
  const stopButton = el('button', { className: 'rf-button', testid: 'centering-stop', disabled: true }, ['Stop']);
  const bar = el('progress', { testid: 'centering-progress', hidden: true });
  bar.max = 1;
  bar.value = 0;
  const progressText = el('div', { className: 'rf-hint', testid: 'centering-progress-text' }, [
    'Not run yet. Uses the rank and λ now set in the Model tab.',
  ]);
  const familyNote = el('p', { className: 'rf-hint rf-note', testid: 'centering-family-note', hidden: true });
  const error = el('div', { className: 'rf-panel-error', testid: 'centering-error', hidden: true });
  const stale = el('p', { className: 'rf-stale', testid: 'centering-stale', hidden: true });
  const results = el('div', { testid: 'centering-results', hidden: true });
  const summary = el('p', { className: 'rf-hint', testid: 'centering-summary' });
  const tableWrap = el('div', { className: 'rf-table-wrap' });
  const chartHost = el('div', { className: 'rf-chart', testid: 'centering-chart' });
  results.append(summary, tableWrap, chartHost, el('p', { className: 'rf-hint' }, [
    'Dot: mean RMSE over the folds; whisker: ± one standard deviation of the folds; small circles: each fold. Lower is better.',
  ]));

  root.append(
    el('h2', {}, ['Compare centering']),
    el('p', { className: 'rf-hint' }, [
      `Holds out a fifth of the observed cells at a time (${COMPARE_FOLDS} folds, the same split for every mode), fits with each centering and measures how far the estimates land from the held-out ratings.`,
    ]),
    familyNote,
    el('div', { className: 'rf-row' }, [runButton, stopButton]),
    bar,
    progressText,
    error,
    stale,
    results,
  );

  const chart = new ErrorBarChart(chartHost);
  let jobId: string | null = null;
  let running = false;
  let stopRequested = false;
  /** The data the shown results were computed on changed (replaced or edited). */
  let dataChanged: 'replaced' | 'edited' | null = null;
  let runToken = 0;

  const setRunning = (on: boolean) => {
    running = on;
    runButton.disabled = on;
    stopButton.disabled = !on;
    bar.hidden = !on;
  };

  const showError = (message: string | null) => {
    error.hidden = message === null;
    error.textContent = message ?? '';
  };

  const renderStale = () => {
    stale.hidden = dataChanged === null || results.hidden;
    stale.textContent =
      dataChanged === 'replaced'
        ? 'These results belong to the previous data set. Compare again for the one now open.'
        : 'The data has been edited since this comparison; compare again to include the edits.';
  };

  const useCentering = (c: Centering) => {
    const form = ctx.model.settings();
    const base = form.model === 'lowrank' ? form : planCenteringComparison(form).settingsList[0];
    ctx.model.apply({ ...base, centering: c });
    ctx.notice.show(`Model settings: centering set to “${CENTERING_SHORT[c]}”. Fill again to see the estimates.`, 'info', 4000);
  };

  const renderResults = (reply: TunePayload, settingsText: string) => {
    const rows = centeringRows(reply);
    const best = rows.find((r) => r.best);
    summary.textContent = best
      ? `${settingsText}, ${reply.k} folds, seed ${reply.seed}. Lowest error: ${CENTERING_SHORT[best.centering]} (RMSE ${fmt(best.meanRmse)}).`
      : `${settingsText}: every mode failed to fit.`;
    tableWrap.replaceChildren(buildTable(rows, reply.k, useCentering));
    results.hidden = false;
    chart.set(
      rows.map((r) => ({ label: CENTERING_SHORT[r.centering], mean: r.meanRmse, sd: r.sdRmse, folds: r.foldRmse, best: r.best })),
    );
  };

  runButton.addEventListener('click', () => {
    void (async () => {
      if (running) return;
      const form = ctx.model.settings();
      const plan = planCenteringComparison(form);
      familyNote.hidden = plan.note === null;
      familyNote.textContent = plan.note ?? '';
      showError(null);
      if (ctx.store.current.rowLabels.length === 0) {
        showError('Open a data set first.');
        return;
      }
      const token = ++runToken;
      stopRequested = false;
      jobId = null;
      setRunning(true);
      bar.value = 0;
      progressText.textContent = 'Starting…';
      const first = plan.settingsList[0];
      const settingsText = `Rank ${first.rank}, λ ${first.lambda}`;
      try {
        const reply = await ctx.controller.evaluateGrid(
          plan.settingsList,
          COMPARE_FOLDS,
          plan.seed,
          (done, total) => {
            if (token !== runToken) return;
            bar.max = Math.max(1, total);
            bar.value = done;
            progressText.textContent = `Fitting fold models: ${done} of ${total} done.`;
          },
          (id) => {
            jobId = id;
            if (stopRequested) void ctx.controller.cancelJob(id);
          },
        );
        if (token !== runToken) return;
        dataChanged = null;
        progressText.textContent = `Done: ${plan.settingsList.length} modes × ${reply.k} folds.`;
        renderResults(reply, settingsText);
      } catch (err) {
        if (token !== runToken) return;
        if (err instanceof JobEndedError && err.cancelled) progressText.textContent = 'Stopped. Earlier results, if any, stay shown.';
        else {
          progressText.textContent = 'The comparison did not finish.';
          showError(`Could not compare centering: ${messageOf(err)}`);
        }
      } finally {
        if (token === runToken) {
          setRunning(false);
          jobId = null;
          renderStale();
        }
      }
    })();
  });

  stopButton.addEventListener('click', () => {
    stopRequested = true;
    progressText.textContent = 'Stopping…';
    if (jobId) void ctx.controller.cancelJob(jobId);
  });

  ctx.store.subscribe((e) => {
    if (e.type === 'replaced') {
      if (running) {
        // The job is computing on the previous data: stop it and say why.
        stopRequested = true;
        if (jobId) void ctx.controller.cancelJob(jobId);
        runToken++;
        setRunning(false);
        progressText.textContent = 'Stopped: another data set was opened.';
      }
      dataChanged = 'replaced';
      renderStale();
    } else if ((e.type === 'cells' || e.type === 'shape') && dataChanged === null && !results.hidden) {
      dataChanged = 'edited';
      renderStale();
    }
  });
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
    const useButton = el('button', { className: 'rf-button rf-small', testid: `centering-use-${r.centering}`, title: 'Put this centering into the model settings' }, ['Use']);
    useButton.addEventListener('click', () => use(r.centering));
    const mode = el('td', {}, [CENTERING_SHORT[r.centering]]);
    if (r.best) mode.append(el('span', { className: 'rf-best-mark', testid: 'centering-best-mark' }, [' ★ best']));
    const tr = el('tr', { testid: 'centering-row', className: r.best ? 'rf-best' : undefined }, [
      mode,
      el('td', { className: 'rf-num', testid: 'centering-rmse' }, [r.error ? 'failed' : `${fmt(r.meanRmse)} ± ${fmt(r.sdRmse)}`]),
      el('td', { className: 'rf-num' }, [fmt(r.meanMae)]),
      el('td', {}, [useButton]),
    ]);
    tr.dataset.centering = r.centering;
    const foldText = r.error
      ? r.error
      : `fold RMSE: ${r.foldRmse.map((v) => fmt(v, 2)).join('  ')}`;
    const sub = el('tr', { className: 'rf-fold-line', testid: 'centering-folds' }, [el('td', {}, [foldText])]);
    (sub.firstChild as HTMLTableCellElement).colSpan = 4;
    body.append(tr, sub);
  }
  table.append(body);
  table.title = `Each row: one centering mode, ${k}-fold cross-validation on the same folds.`;
  return table;
}

function messageOf(err: unknown): string {
  return err instanceof Error ? err.message : String(err);
}
