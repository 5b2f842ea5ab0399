/**
 * Puts the model settings and the run history into every saved project (and
 * recovery snapshot), and brings them back on open. A saved run keeps its
 * number, its name, the time of its Fill, its settings, its figures (iterations, final
 * objective, cross-validated errors) and — for matrices up to 250,000 cells — its
 * predictions. Since a fit is deterministic for given data, settings and seed,
 * opening a project refits each saved run to restore its full result
 * (baselines, factors, spread), then reattaches the saved cross-validated errors.
 */
import type { SavedRun } from '../../src-shared/project/projectDocument';
import type { PanelContext } from '../panels/panelContext';
import { describeSettings } from '../runs/describeSettings';
import { runFitsDocument } from '../runs/runMatch';
import type { Run } from '../runs/runStore';

const MAX_SAVED_PREDICTION_CELLS = 250_000;

function toSavedRun(run: Run, cells: number): SavedRun {
  const e = run.evaluation;
  const trace = run.result.objectiveTrace;
  return {
    id: `run-${run.id}`,
    number: run.id,
    name: run.name ?? '',
    fittedAt: new Date(run.createdAt).toISOString(),
    savedAt: new Date().toISOString(),
    settings: run.settings,
    metrics: {
      iterations: run.result.iterations,
      finalObjective: trace.length ? trace[trace.length - 1] : null,
      cvFolds: e ? e.k : null,
      cvSeed: e ? e.seed : null,
      cvRmse: e?.meanRmse ?? null,
      cvRmseSd: e?.sdRmse ?? null,
      cvMae: e?.meanMae ?? null,
      cvMaeSd: e?.sdMae ?? null,
    },
    ...(cells <= MAX_SAVED_PREDICTION_CELLS && run.result.predictions.length === cells
      ? { predictions: run.result.predictions }
      : {}),
  };
}

export function installRunPersistence(ctx: PanelContext): void {
  let restoring = 0;
  ctx.store.addContributor({
    collect(parts) {
      const cells = ctx.store.current.values.length;
      parts.settings = ctx.settings.value;
      parts.runs = ctx.runs.runs.filter((r) => runFitsDocument(r, ctx.store)).map((r) => toSavedRun(r, cells));
    },
    load(parts) {
      if (parts.settings) ctx.settings.set(parts.settings);
      const saved = parts.runs.slice();
      if (saved.length === 0) return;
      const token = ++restoring;
      // After the document is in place (and the previous runs are cleared), refit in order.
      setTimeout(() => void restore(saved, token), 0);
    },
  });

  async function restore(saved: SavedRun[], token: number): Promise<void> {
    for (const s of saved) {
      if (token !== restoring) return;
      const fitted = Date.parse(s.fittedAt);
      const run = await ctx.controller.fill(s.settings, {
        number: s.number,
        name: s.name,
        createdAt: Number.isFinite(fitted) ? fitted : Date.now(),
      });
      if (!run) {
        ctx.notice.show(
          `A saved run (Run ${s.number}${s.name ? ` “${s.name}”` : ''}: ${describeSettings(s.settings)}) could not be restored; its settings are in the file.`,
          'error',
        );
        continue;
      }
      const m = s.metrics;
      if (m.cvRmse !== null && m.cvRmse !== undefined && m.cvFolds) {
        ctx.runs.setEvaluation(run.id, {
          k: m.cvFolds,
          seed: m.cvSeed ?? s.settings.seed,
          folds: [],
          meanRmse: m.cvRmse,
          sdRmse: m.cvRmseSd ?? null,
          meanMae: m.cvMae ?? null,
          sdMae: m.cvMaeSd ?? null,
        });
      }
    }
  }
}
