/**
 * Run history and the comparison of two runs. Each Fill adds a run (settings,
 * time, objective, and cross-validated errors once evaluated); any run can be
 * shown in the grid again. Comparing draws B − A on the filled cells with our
 * diverging colours and counts the cells that move by more than one step.
 */
import { runDifference } from '../../src-shared/engine/runDifference';
import { describeSeedStability } from '../../src-shared/engine/seedStability';
import { describeSettings } from '../runs/describeSettings';
import { runFitsDocument } from '../runs/runMatch';
import type { Run } from '../runs/runStore';
import { promptDialog } from '../dialogs/modal';
import { afterPaint } from './afterPaint';
import { el, fmt } from './dom';
import type { PanelContext } from './panelContext';

function timeOf(ms: number): string {
  const d = new Date(ms);
  const time = d.toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit', second: '2-digit' });
  // A run kept in a project may come from another day: then the date is said too.
  return d.toDateString() === new Date().toDateString()
    ? time
    : `${d.toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric' })} ${time}`;
}

/** "Run 11" or "Run 11 “tasting pick”". */
export function runTitle(r: Run): string {
  return r.name ? `Run ${r.id} “${r.name}”` : `Run ${r.id}`;
}

function cvText(run: Run | undefined): string {
  const e = run?.evaluation;
  if (!e) return 'not evaluated';
  return `RMSE ${fmt(e.meanRmse)} ± ${fmt(e.sdRmse)} · MAE ${fmt(e.meanMae)} (${e.k}-fold)`;
}

/** After Evaluate: whether the filled values rest on the start (engine/seedStability.ts). */
function seedLine(run: Run): HTMLElement[] {
  const s = run.seedStability;
  if (!s) return [];
  const unstable = describeSeedStability(s);
  return [
    unstable
      ? el('div', { className: 'rf-warn-text', testid: `run-seeds-${run.id}` }, [`Caution: ${unstable}.`])
      : el('div', { className: 'rf-hint', testid: `run-seeds-${run.id}` }, [
          `Seed check: with seed ${s.seeds[1]}, ${s.moved} of ${s.cells} filled cells move by more than ${s.threshold} (largest move ${s.maxMove.toFixed(2)}); the result does not rest on the start.`,
        ]),
  ];
}

export function mountRunsPanel(root: HTMLElement, ctx: PanelContext): void {
  const list = el('div', { testid: 'run-list' });
  const selA = el('select', { testid: 'compare-a' });
  const selB = el('select', { testid: 'compare-b' });
  const compareButton = el('button', { className: 'rf-button', testid: 'compare-button' }, ['Show B − A in the grid']);
  const clearButton = el('button', { className: 'rf-button', testid: 'compare-clear', hidden: true }, [
    'Back to estimates',
  ]);
  const summary = el('div', { testid: 'compare-summary' });

  root.append(
    el('h2', {}, ['Runs']),
    el('p', { className: 'rf-hint' }, [
      'Every Fill is kept here. Show a run to put its estimates back in the grid; evaluate it to get cross-validated errors.',
    ]),
    list,
    el('h3', {}, ['Compare two runs']),
    el('div', { className: 'rf-compare-pick' }, [el('label', {}, ['A ', selA]), el('label', {}, ['B ', selB])]),
    el('div', { className: 'rf-row' }, [compareButton, clearButton]),
    summary,
  );

  const renderList = () => {
    const runs = [...ctx.runs.runs].reverse();
    if (runs.length === 0) {
      list.replaceChildren(el('p', { className: 'rf-hint' }, ['No runs yet. Use Fill blank cells in the Model tab.']));
    } else {
      list.replaceChildren(
        ...runs.map((r) => {
          const shown = ctx.runs.shownId === r.id;
          const show = el('button', { className: 'rf-button', testid: `run-show-${r.id}`, disabled: shown }, [
            shown ? 'Shown' : 'Show',
          ]);
          show.addEventListener('click', () => ctx.runs.show(r.id));
          const evaluate = el('button', { className: 'rf-button', testid: `run-evaluate-${r.id}` }, ['Evaluate']);
          evaluate.addEventListener('click', () => {
            evaluate.disabled = true;
            evaluate.textContent = 'Evaluating…';
            ctx.controller
              .evaluate(r, (done, total) => (evaluate.textContent = `Fold ${done}/${total}`))
              .catch((err: unknown) =>
                ctx.notice.show(`Evaluation stopped: ${err instanceof Error ? err.message : String(err)}`, 'error'),
              )
              .finally(() => renderList());
          });
          const rename = el('button', { className: 'rf-button', testid: `run-rename-${r.id}` }, [
            r.name ? 'Rename…' : 'Name…',
          ]);
          rename.addEventListener('click', () => {
            void promptDialog({
              title: `Name run ${r.id}`,
              label: 'Name (kept in the project; leave empty for none)',
              initial: r.name ?? '',
              confirmLabel: 'Use this name',
              testId: 'run-name-dialog',
              check: (v) => (v.trim().length > 200 ? 'at most 200 characters' : undefined),
            }).then((name) => {
              if (name !== null) ctx.runs.rename(r.id, name);
            });
          });
          const last = r.result.objectiveTrace[r.result.objectiveTrace.length - 1];
          return el('div', { className: `rf-run${shown ? ' rf-run-shown' : ''}`, testid: `run-${r.id}` }, [
            el('div', { className: 'rf-run-head', testid: `run-head-${r.id}` }, [
              el('strong', {}, [runTitle(r)]),
              ` · ${timeOf(r.createdAt)}`,
            ]),
            el('div', {}, [describeSettings(r.settings)]),
            el('div', { className: 'rf-hint' }, [
              `${r.result.iterations} iterations${r.result.converged ? '' : ' (not settled)'} · ${r.settings.model === 'gaussian' ? 'log-likelihood' : 'objective'} ${fmt(last, 4)}` +
                (r.refits ? ` · refitted after ${r.refits} edit${r.refits === 1 ? '' : 's'}` : ''),
            ]),
            el('div', { className: 'rf-hint', testid: `run-cv-${r.id}` }, [cvText(r)]),
            ...seedLine(r),
            el('div', { className: 'rf-row' }, [show, evaluate, rename]),
          ]);
        }),
      );
    }
    for (const [sel, pick] of [
      [selA, (p: { a: number; b: number } | null) => p?.a],
      [selB, (p: { a: number; b: number } | null) => p?.b],
    ] as const) {
      const current = sel.value;
      sel.replaceChildren(
        ...ctx.runs.runs.map((r) => new Option(`${runTitle(r)}: ${describeSettings(r.settings)}`, String(r.id))),
      );
      const want = pick(ctx.runs.compare) ?? (current ? Number(current) : undefined);
      if (want !== undefined && ctx.runs.get(want)) sel.value = String(want);
    }
    if (!ctx.runs.compare && ctx.runs.runs.length >= 2) {
      selA.value = String(ctx.runs.runs[ctx.runs.runs.length - 2].id);
      selB.value = String(ctx.runs.runs[ctx.runs.runs.length - 1].id);
    }
    compareButton.disabled = ctx.runs.runs.length < 2;
  };

  const renderCompare = () => {
    const pair = ctx.runs.compare;
    clearButton.hidden = !pair;
    if (!pair) {
      summary.replaceChildren();
      ctx.grid.setLayers({ diff: null });
      return;
    }
    const a = ctx.runs.get(pair.a);
    const b = ctx.runs.get(pair.b);
    const m = ctx.store.current;
    if (!runFitsDocument(a, ctx.store) || !runFitsDocument(b, ctx.store)) {
      summary.replaceChildren(
        el('p', { className: 'rf-panel-error' }, [
          'These runs no longer match the matrix’s shape; fill again to compare.',
        ]),
      );
      ctx.grid.setLayers({ diff: null });
      return;
    }
    const d = runDifference(m.values, a.result.predictions, b.result.predictions, m.scale.step);
    ctx.grid.setLayers({ diff: { values: d.diff, maxAbs: d.maxAbs } });
    summary.replaceChildren(
      el('p', { testid: 'compare-moved' }, [
        `${d.moved} of ${d.filled} filled cells move by more than ${d.threshold} (one scale step) from A to B.`,
      ]),
      el('p', { className: 'rf-hint' }, [`Largest change ${fmt(d.maxAbs, 2)}, mean change ${fmt(d.meanAbs, 2)}.`]),
      el('table', { className: 'rf-table', testid: 'compare-errors' }, [
        el('tr', {}, [el('th', {}, ['']), el('th', {}, ['A']), el('th', {}, ['B'])]),
        el('tr', {}, [
          el('td', {}, ['settings']),
          el('td', {}, [describeSettings(a.settings)]),
          el('td', {}, [describeSettings(b.settings)]),
        ]),
        el('tr', {}, [
          el('td', {}, ['cross-validated RMSE']),
          el('td', {}, [fmt(a.evaluation?.meanRmse)]),
          el('td', {}, [fmt(b.evaluation?.meanRmse)]),
        ]),
        el('tr', {}, [
          el('td', {}, ['cross-validated MAE']),
          el('td', {}, [fmt(a.evaluation?.meanMae)]),
          el('td', {}, [fmt(b.evaluation?.meanMae)]),
        ]),
      ]),
      el('div', { className: 'rf-legend' }, [
        el('span', { className: 'rf-legend-diff-neg' }, ['−1.0']),
        ' B lower   ',
        el('span', { className: 'rf-legend-diff-pos' }, ['+1.0']),
        ' B higher (cells show B − A)',
      ]),
    );
  };

  compareButton.addEventListener('click', () => {
    const a = Number(selA.value);
    const b = Number(selB.value);
    if (a === b) {
      ctx.notice.show('Pick two different runs to compare.', 'error');
      return;
    }
    ctx.runs.setCompare({ a, b });
  });
  clearButton.addEventListener('click', () => ctx.runs.setCompare(null));

  ctx.runs.subscribe((e) => {
    if (e.type === 'compare') renderCompare();
    else {
      afterPaint('runs-list', renderList);
      if (e.type === 'updated' && ctx.runs.compare) afterPaint('runs-compare', renderCompare);
    }
  });
  ctx.store.subscribe((e) => {
    if (e.type === 'cells' && ctx.runs.compare) afterPaint('runs-compare', renderCompare);
  });
  renderList();
}
