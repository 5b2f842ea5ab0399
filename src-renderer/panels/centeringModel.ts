/**
 * Pure helpers of the centering comparison: which four settings are evaluated,
 * and how the tuning reply becomes table rows and chart points. No DOM here.
 */
import type { TunePayload } from '../../src-shared/api';
import { DEFAULT_FOLDS, defaultLowRankSettings } from '../../src-shared/engine/defaults';
import type { Centering, FitSettings, LowRankSettings } from '../../src-shared/engine/types';

export const CENTERING_MODES: readonly Centering[] = ['none', 'row', 'column', 'both'];
export const COMPARE_FOLDS = DEFAULT_FOLDS;

export interface CenteringPlan {
  /** One low-rank setting per centering mode, in CENTERING_MODES order. */
  settingsList: LowRankSettings[];
  seed: number;
  /** Set when the form is on a family that has no centering (the low-rank defaults are used instead). */
  note: string | null;
}

/** The form's settings with only the centering changed; the Gaussian family falls back to low-rank defaults. */
export function planCenteringComparison(form: FitSettings): CenteringPlan {
  let base: LowRankSettings;
  let note: string | null = null;
  if (form.model === 'lowrank') base = form;
  else {
    base = {
      ...defaultLowRankSettings(),
      maxIterations: form.maxIterations,
      seed: form.seed,
      clipToScale: form.clipToScale,
      snapToStep: form.snapToStep,
    };
    note =
      `Centering does not apply to the Gaussian model (it estimates each variable’s mean itself), ` +
      `so the low-rank model is compared instead, at rank ${base.rank} and λ ${base.lambda}.`;
  }
  return { settingsList: CENTERING_MODES.map((centering) => ({ ...base, centering })), seed: form.seed, note };
}

export interface CenteringRow {
  centering: Centering;
  meanRmse: number;
  sdRmse: number;
  meanMae: number;
  /** RMSE of each fold (NaN where a fold had nothing to score). */
  foldRmse: number[];
  /** Smallest and largest fold RMSE (NaN when no fold scored). */
  minRmse: number;
  maxRmse: number;
  best: boolean;
  error?: string;
}

const num = (x: number | null | undefined): number => (x === null || x === undefined ? NaN : x);

/** Table rows in the order of the reply (which is the order the settings were sent in). */
export function centeringRows(reply: TunePayload): CenteringRow[] {
  return reply.table.map((row, i) => {
    const foldRmse = row.folds.map((f) => num(f.rmse));
    const finite = foldRmse.filter(Number.isFinite);
    return {
      centering: row.settings.model === 'lowrank' ? row.settings.centering : 'none',
      meanRmse: num(row.meanRmse),
      sdRmse: num(row.sdRmse),
      meanMae: num(row.meanMae),
      foldRmse,
      minRmse: finite.length ? Math.min(...finite) : NaN,
      maxRmse: finite.length ? Math.max(...finite) : NaN,
      best: i === reply.bestIndex,
      ...(row.error ? { error: row.error } : {}),
    };
  });
}
