/**
 * Fill with settings that adapt to the data: the first Fill of a data set, while the
 * user has not set the model settings themselves, first scores the candidates of
 * engine/autoSettings.ts (the baselines alone under the four centerings, then a few
 * well-spread ranks × λ under the best centering) on 3 shared folds in the worker,
 * puts the lowest-error candidate into the settings store (the Model tab shows it as
 * ordinary, editable settings, with the one-line reason), then fills with it.
 * Every later Fill, and every Fill after the user changed a setting, uses the settings as
 * they stand.
 */
import {
  AUTO_FOLDS,
  baselineCandidates,
  bestBaselineCentering,
  chooseAuto,
  factorCandidates,
} from '../../src-shared/engine/autoSettings';
import type { TuneRow } from '../../src-shared/engine/tuning';
import type { FitSettings, LowRankSettings } from '../../src-shared/engine/types';
import { summarizeForGrid } from '../../src-shared/engine/tuningGrid';
import type { TunePayload } from '../../src-shared/api';
import type { DocumentStore } from '../state/documentStore';
import type { SettingsStore } from '../state/settingsStore';
import type { FitController } from './fitController';
import type { RunStore } from './runStore';

interface ChoosingState {
  done: number;
  total: number;
}

export interface FirstFillDeps {
  controller: FitController;
  settings: SettingsStore;
  runs: RunStore;
  store: DocumentStore;
  /** Progress of the choice (null when it ends); `cancel` stops it. */
  onChoosing(state: ChoosingState | null, cancel: () => void): void;
  onFailed(message: string): void;
}

/** True when a Fill now should choose its settings first. */
function shouldChoose(settings: SettingsStore, runs: RunStore): boolean {
  return settings.origin !== 'user' && settings.value.model === 'lowrank' && runs.runs.length === 0;
}

function rowsOf(reply: TunePayload): TuneRow[] {
  return reply.table.map((r) => ({
    settings: r.settings as FitSettings,
    meanRmse: r.meanRmse ?? NaN,
    sdRmse: r.sdRmse ?? NaN,
    meanMae: r.meanMae ?? NaN,
    sdMae: r.sdMae ?? NaN,
    folds: r.folds.map((f) => ({ rmse: f.rmse ?? NaN, mae: f.mae ?? NaN, n: f.n })),
    ...(r.error ? { error: r.error } : {}),
  }));
}

/** Fill; choose the settings first when `shouldChoose`. Resolves when the fill is done, failed or stopped. */
export async function fillAdaptively(d: FirstFillDeps): Promise<void> {
  if (!shouldChoose(d.settings, d.runs)) {
    await d.controller.fill(d.settings.value);
    return;
  }
  const base = d.settings.value as LowRankSettings;
  const matrix = d.store.current;
  let observed = 0;
  for (let c = 0; c < matrix.values.length; c++) if (matrix.values[c] === matrix.values[c]) observed++;
  if (observed < 2 * AUTO_FOLDS) {
    await d.controller.fill(base);
    return;
  }
  const revision = d.store.revision;
  let job: string | null = null;
  let stopped = false;
  const cancel = () => {
    stopped = true;
    if (job) void d.controller.cancelJob(job);
  };
  const summary = summarizeForGrid(matrix);
  const first = baselineCandidates(matrix, base, summary);
  // The factor candidates are known once the baselines are scored; the total is fixed up front.
  const factorCount = factorCandidates(matrix, 'both', base, summary).length;
  const total = (first.length + factorCount) * AUTO_FOLDS;
  try {
    d.onChoosing({ done: 0, total }, cancel);
    const stage1 = rowsOf(
      await d.controller.evaluateGrid(
        first,
        AUTO_FOLDS,
        base.seed,
        (done) => d.onChoosing({ done, total }, cancel),
        (id) => (job = id),
      ),
    );
    if (stopped) return;
    const second = factorCandidates(matrix, bestBaselineCentering(stage1), base, summary);
    const offset = first.length * AUTO_FOLDS;
    const stage2 =
      second.length > 0
        ? rowsOf(
            await d.controller.evaluateGrid(
              second,
              AUTO_FOLDS,
              base.seed,
              (done) => d.onChoosing({ done: offset + done, total }, cancel),
              (id) => (job = id),
            ),
          )
        : [];
    if (stopped || d.store.revision !== revision || d.settings.origin === 'user') {
      // Stopped, the data changed, or the user set the settings meanwhile: theirs win.
      if (!stopped) await d.controller.fill(d.settings.value);
      return;
    }
    const choice = chooseAuto([...stage1, ...stage2], AUTO_FOLDS, base);
    d.settings.choose(choice.settings, choice.reason);
  } catch (err) {
    if (!stopped) d.onFailed(err instanceof Error ? err.message : String(err));
    return;
  } finally {
    d.onChoosing(null, cancel);
  }
  await d.controller.fill(d.settings.value);
}
