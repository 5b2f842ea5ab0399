/**
 * The tuning panel: a grid of ranks × λ values × centering modes, all
 * cross-validated on the same folds, with progress and Stop; a table, a chart
 * of mean RMSE against rank (one line per λ and centering) with the best point
 * and the one-standard-error choice marked, and buttons that put either
 * choice into the model form.
 */
import type { TunePayload } from '../../src-shared/api';
import type { Centering, FitSettings } from '../../src-shared/engine/types';
import { RankErrorChart } from '../charts/rankErrorChart';
import { CENTERING_SHORT } from '../runs/describeSettings';
import { CENTERING_MODES } from './centeringModel';
import { el, field, fmt, numberInput } from './dom';
import { GridRunPanel } from './gridRunPanel';
import { defaultGrid } from '../../src-shared/engine/tuningGrid';
import type { PanelContext } from './panelContext';
import {
  DEFAULT_LAMBDAS,
  DEFAULT_RANKS,
  DEFAULT_TUNE_FOLDS,
  LAMBDA_RULES,
  MAX_GRID_SETTINGS,
  parseNumberList,
  planTuning,
  RANK_RULES,
  rankChartData,
} from './tuningModel';

export function mountTuningPanel(root: HTMLElement, ctx: PanelContext): void {
  const ranksInput = el('input', { testid: 'tuning-ranks' });
  ranksInput.type = 'text';
  ranksInput.value = DEFAULT_RANKS;
  const lambdasInput = el('input', { testid: 'tuning-lambdas' });
  lambdasInput.type = 'text';
  lambdasInput.value = DEFAULT_LAMBDAS;
  const foldsInput = numberInput('tuning-folds', DEFAULT_TUNE_FOLDS, { min: 2, max: 20, step: 1 });
  // Until the user types in them, the ranks and λ values are suggested from the open data
  // (engine/tuningGrid.ts: λ ×2 apart below σ₁ of the residuals, ranks the ratings support).
  const gridNote = el('p', { className: 'rf-hint', testid: 'tuning-grid-note' });
  let gridTouched = false;
  const suggestGrid = () => {
    if (gridTouched) return;
    const m = ctx.store.current;
    if (m.values.length === 0) return;
    const g = defaultGrid(m);
    ranksInput.value = g.ranks.join(', ');
    lambdasInput.value = g.lambdas.join(', ');
    gridNote.textContent =
      `Suggested from this data: ranks up to ${Math.max(...g.ranks)} (what ${g.summary.observed} ratings support); ` +
      `λ ×2 apart up to half of ${fmt(2 * g.topLambda, 1)}, the strength of the data’s strongest pattern (at λ above it no trait survives).`;
  };
  for (const input of [ranksInput, lambdasInput])
    input.addEventListener('input', () => {
      gridTouched = true;
      gridNote.textContent = '';
    });
  const checks = new Map<Centering, HTMLInputElement>();
  const checkRow = el('div', { className: 'rf-check-row' });
  for (const c of CENTERING_MODES) {
    const box = el('input', { testid: `tuning-centering-${c}` });
    box.type = 'checkbox';
    checks.set(c, box);
    checkRow.append(el('label', { className: 'rf-check' }, [box, ` ${CENTERING_SHORT[c]}`]));
  }
  let centeringTouched = false;
  const syncCenteringFromForm = () => {
    if (centeringTouched) return;
    const form = ctx.settings.value;
    const current: Centering = form.model === 'lowrank' ? form.centering : 'both';
    for (const [c, box] of checks) box.checked = c === current;
    updateSize();
  };
  for (const box of checks.values())
    box.addEventListener('change', () => {
      centeringTouched = true;
      updateSize();
    });

  const size = el('p', { className: 'rf-hint', testid: 'tuning-size' });
  const familyNote = el('p', { className: 'rf-hint rf-note', testid: 'tuning-family-note', hidden: true });
  const summary = el('div', { className: 'rf-tune-summary', testid: 'tuning-summary' });
  const applyBest = el('button', { className: 'rf-button', testid: 'tuning-apply-best' }, ['Apply best']);
  const applyOneSE = el('button', { className: 'rf-button', testid: 'tuning-apply-onese' }, [
    'Apply simpler choice (one-SE)',
  ]);
  const chartHost = el('div', { className: 'rf-chart', testid: 'tuning-chart' });
  const tableWrap = el('div', { className: 'rf-table-wrap rf-table-scroll' });

  let chart: RankErrorChart | undefined;
  let last: TunePayload | null = null;

  function request() {
    return {
      ranks: ranksInput.value,
      lambdas: lambdasInput.value,
      centerings: CENTERING_MODES.filter((c) => checks.get(c)!.checked),
      folds: Math.round(Number(foldsInput.value)),
    };
  }

  function updateSize(): void {
    const r = request();
    const ranks = parseNumberList(r.ranks, RANK_RULES);
    const lambdas = parseNumberList(r.lambdas, LAMBDA_RULES);
    if (!ranks.ok || !lambdas.ok) {
      size.textContent = (!ranks.ok ? ranks.message : '') + (!lambdas.ok ? ` ${lambdas.message}` : '');
      size.classList.add('rf-warn-text');
      return;
    }
    const n = ranks.values.length * lambdas.values.length * r.centerings.length;
    const folds = Number.isFinite(r.folds) && r.folds >= 2 ? r.folds : '?';
    size.textContent =
      n > MAX_GRID_SETTINGS
        ? `${n} settings: more than the limit of ${MAX_GRID_SETTINGS}.`
        : `${n} setting${n === 1 ? '' : 's'} × ${folds} folds = ${typeof folds === 'number' ? n * folds : '?'} fits.`;
    size.classList.toggle('rf-warn-text', n > MAX_GRID_SETTINGS || n === 0);
  }
  for (const input of [ranksInput, lambdasInput, foldsInput]) input.addEventListener('input', updateSize);
  suggestGrid();
  ctx.store.subscribe((e) => {
    if (e.type !== 'replaced') return;
    suggestGrid();
    updateSize();
  });
  syncCenteringFromForm();
  ctx.settings.subscribe(syncCenteringFromForm);

  const apply = (settings: FitSettings, what: string) => {
    ctx.settings.set(settings);
    ctx.notice.show(
      `Model settings: ${what} applied (${describe(settings)}). Fill again to see the estimates.`,
      'info',
      5000,
    );
  };
  applyBest.addEventListener('click', () => {
    if (last) apply(last.table[last.bestIndex].settings, 'best');
  });
  applyOneSE.addEventListener('click', () => {
    if (last) apply(last.table[last.oneStandardErrorIndex].settings, 'one-SE choice');
  });

  const renderResults = (reply: TunePayload) => {
    last = reply;
    const data = rankChartData(reply);
    const severalCenterings = new Set(data.series.map((s) => s.centering)).size > 1;
    const lambdas = [...new Set(data.series.map((s) => s.lambda))];
    const centerings = CENTERING_MODES.filter((c) => data.series.some((s) => s.centering === c));
    chart?.set({
      ranks: data.ranks,
      lines: data.series.map((s) => ({
        label: `λ ${s.lambda}${severalCenterings ? ` · ${CENTERING_SHORT[s.centering]}` : ''}`,
        colour: lambdas.indexOf(s.lambda),
        dash: severalCenterings ? centerings.indexOf(s.centering) : 0,
        values: s.values,
      })),
      best: data.best && { rank: data.best.rank, value: data.best.meanRmse },
      oneSE: data.oneSE && { rank: data.oneSE.rank, value: data.oneSE.meanRmse },
      threshold: data.threshold,
    });
    const best = reply.table[reply.bestIndex];
    const one = reply.table[reply.oneStandardErrorIndex];
    summary.replaceChildren(
      el('div', { testid: 'tuning-best' }, [
        el('b', {}, ['Best: ']),
        `${describe(best.settings)} — RMSE ${fmt(best.meanRmse)} ± ${fmt(best.sdRmse)}`,
      ]),
      el('div', { testid: 'tuning-onese' }, [
        el('b', {}, ['Simpler choice (one-SE): ']),
        `${describe(one.settings)} — RMSE ${fmt(one.meanRmse)}`,
        reply.oneStandardErrorIndex === reply.bestIndex ? ' (the best is already the simplest within reach)' : '',
      ]),
      el('div', { className: 'rf-hint' }, [
        `One-SE threshold ${fmt(reply.threshold)} = best RMSE + its standard error over ${reply.k} folds.`,
      ]),
    );
    const failed = reply.table.filter((r) => r.error).length;
    if (failed > 0)
      summary.append(
        el('div', { className: 'rf-warn-text' }, [
          `${failed} setting${failed === 1 ? '' : 's'} failed to fit (see the table).`,
        ]),
      );
    tableWrap.replaceChildren(buildTable(reply, severalCenterings));
  };

  type Plan = Extract<ReturnType<typeof planTuning>, { ok: true }>;
  const runner = new GridRunPanel<Plan>(ctx, {
    prefix: 'tuning',
    recordAs: 'tuning',
    runLabel: 'Run tuning',
    idleText: 'Not run yet.',
    plan: () => {
      const form = ctx.settings.value;
      const plan = planTuning(request(), form);
      if (!plan.ok) return { error: plan.message };
      familyNote.hidden = form.model === 'lowrank';
      familyNote.textContent =
        'The Model tab is on the Gaussian family; tuning searches the low-rank family (rank, λ, centering).';
      return plan;
    },
    startText: (plan) => `Starting ${plan.settingsList.length} settings…`,
    doneText: (plan) => `Done: ${plan.settingsList.length} settings × ${plan.folds} folds, seed ${plan.seed}.`,
    failedText: 'The tuning run did not finish.',
    errorPrefix: 'Could not run the tuning grid',
    staleText: {
      replaced: 'These results belong to the previous data set. Run again for the one now open.',
      edited: 'The data has been edited since this run; run again to include the edits.',
    },
    render: (reply) => renderResults(reply),
  });
  runner.results.append(summary, el('div', { className: 'rf-row' }, [applyBest, applyOneSE]), chartHost, tableWrap);

  root.append(
    el('h2', {}, ['Tuning']),
    el('p', { className: 'rf-hint' }, [
      'Tries every combination below on the same cross-validation folds and reports the held-out error of each. Other settings (iterations, seed, clipping) come from the Model tab.',
    ]),
    el('div', { className: 'rf-fields rf-tune-fields' }, [
      field('Ranks', ranksInput, 'Whole numbers, separated by commas.'),
      field('λ values', lambdasInput, 'Regularization strengths to try.'),
      field('Folds', foldsInput),
      el('div', { className: 'rf-form-field' }, [el('span', { className: 'rf-form-label' }, ['Centering']), checkRow]),
    ]),
    gridNote,
    size,
    familyNote,
    ...runner.controls(),
  );
  chart = new RankErrorChart(chartHost);
}

function describe(s: FitSettings): string {
  return s.model === 'lowrank'
    ? `rank ${s.rank}, λ ${s.lambda}, centering ${CENTERING_SHORT[s.centering]}`
    : 'Gaussian model';
}

function buildTable(reply: TunePayload, showCentering: boolean): HTMLTableElement {
  const table = el('table', { className: 'rf-table', testid: 'tuning-table' });
  table.append(
    el('thead', {}, [
      el('tr', {}, [
        el('th', {}, ['Rank']),
        el('th', {}, ['λ']),
        ...(showCentering ? [el('th', {}, ['Centering'])] : []),
        el('th', { title: 'Mean RMSE over the folds ± its standard deviation' }, ['RMSE ± sd']),
        el('th', { title: 'Mean absolute error over the folds' }, ['MAE']),
        el('th', {}, ['']),
      ]),
    ]),
  );
  const body = el('tbody');
  reply.table.forEach((row, i) => {
    const s = row.settings;
    const marks: string[] = [];
    if (i === reply.bestIndex) marks.push('★ best');
    if (i === reply.oneStandardErrorIndex) marks.push('◇ 1-SE');
    const classes = [i === reply.bestIndex ? 'rf-best' : '', i === reply.oneStandardErrorIndex ? 'rf-onese' : '']
      .filter(Boolean)
      .join(' ');
    const tr = el('tr', { testid: 'tuning-row', className: classes || undefined, title: row.error }, [
      el('td', {}, [s.model === 'lowrank' ? String(s.rank) : '—']),
      el('td', {}, [s.model === 'lowrank' ? String(s.lambda) : '—']),
      ...(showCentering ? [el('td', {}, [s.model === 'lowrank' ? CENTERING_SHORT[s.centering] : '—'])] : []),
      el('td', {}, [row.error ? 'failed' : `${fmt(row.meanRmse)} ± ${fmt(row.sdRmse, 2)}`]),
      el('td', {}, [fmt(row.meanMae)]),
      el('td', { className: 'rf-mark-cell' }, [marks.join(' ')]),
    ]);
    body.append(tr);
  });
  table.append(body);
  return table;
}
