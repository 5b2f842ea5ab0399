/**
 * Gathers the study report's input in the page: the shown run, its cross-validation beside
 * the baselines alone (computed once per run and data state, on the evaluation lane), the
 * centering comparison and tuning when they belong to the current data, the exports
 * written from the run, and the input hash. The builder in src-shared/report does the rest.
 */
import { AUTO_FOLDS } from '../../src-shared/engine/autoSettings';
import { matrixFingerprintText } from '../../src-shared/io/exportFilled';
import type { ReportInput } from '../../src-shared/report/reportInput';
import { REPORT_FOLDS, reportEvaluationSettings } from '../../src-shared/report/reportEvaluation';
import type { PanelContext } from '../panels/panelContext';
import { sha256Hex } from '../panels/sha256';
import { intervalsOfRun } from '../runs/runIntervals';
import type { Run } from '../runs/runStore';
import { reportIntervals } from '../../src-shared/report/reportIntervals';
import type { StudyRecord } from './studyRecord';

export interface GatherOptions {
  appVersion: string;
  reportPath: string;
  onStep?: (done: number, total: number) => void;
}

export async function gatherReport(
  ctx: PanelContext,
  record: StudyRecord,
  run: Run,
  o: GatherOptions,
): Promise<ReportInput> {
  const m = ctx.store.current;
  let evaluation = record.evaluation(run.id);
  if (!evaluation) {
    const revision = ctx.store.revision;
    evaluation = await ctx.controller.evaluateGrid(
      reportEvaluationSettings(run.settings),
      REPORT_FOLDS,
      run.settings.seed,
      o.onStep,
    );
    if (ctx.store.revision !== revision)
      throw new Error('The data changed while the report was being prepared; write the report again.');
    record.setEvaluation(run.id, evaluation, revision);
  }
  const trace = run.result.objectiveTrace;
  // The run's intervals at the level chosen in the page, when its trust carries a calibration.
  const intervals = intervalsOfRun(run, m.scale, ctx.view.state.intervalLevel);
  // The first Fill may have chosen its settings from the data (runs/firstFill.ts): say so when this run uses them.
  const chosen =
    ctx.settings.origin === 'chosen' && JSON.stringify(ctx.settings.value) === JSON.stringify(run.settings);
  const candidates = /of (\d+) settings/.exec(ctx.settings.reason)?.[1];
  const source =
    ctx.store.filePath ??
    (ctx.store.source.kind === 'sample' ? `sample “${ctx.store.source.name}”` : ctx.store.source.name || undefined);
  return {
    title: ctx.store.title,
    ...(source ? { source } : {}),
    app: { name: 'Rankfill', version: o.appVersion },
    createdAt: new Date().toISOString(),
    matrix: m,
    inputSha256: await sha256Hex(matrixFingerprintText(m)),
    run: {
      label: `Run ${run.id}`,
      settings: run.settings,
      iterations: run.result.iterations,
      converged: run.result.converged,
      finalObjective: trace.length ? trace[trace.length - 1] : null,
      objectiveTrace: trace,
      refitsAfterEdits: run.refits,
    },
    evaluation,
    choice: chosen
      ? {
          reason: ctx.settings.reason,
          folds: AUTO_FOLDS,
          candidates: candidates ? Number(candidates) : null,
          meanRmse: null,
          baselineMeanRmse: null,
        }
      : null,
    intervals: intervals ? reportIntervals(intervals) : null,
    centering: record.grid('centering'),
    tuning: record.grid('tuning'),
    exports: record.exportsOf(run.id),
    reportPath: o.reportPath,
  };
}
