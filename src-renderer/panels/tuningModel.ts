/**
 * Pure helpers of the tuning panel: reading the typed lists of ranks and λ
 * values, building the grid (with a size limit), and turning the reply into
 * chart series (mean RMSE against rank, one line per λ and centering). No DOM here.
 */
import type { TunePayload } from '../../src-shared/api';
import { DEFAULT_FOLDS, defaultLowRankSettings } from '../../src-shared/engine/defaults';
import { expandLowRankGrid } from '../../src-shared/engine/tuning';
import type { Centering, FitSettings, LowRankSettings } from '../../src-shared/engine/types';

/** Larger grids are refused: at 5 folds that is already 2000 fits. */
export const MAX_GRID_SETTINGS = 400;
export const DEFAULT_RANKS = '0, 1, 2, 3, 5, 8';
export const DEFAULT_LAMBDAS = '0.1, 1, 10, 30';
export const DEFAULT_TUNE_FOLDS = DEFAULT_FOLDS;

export type ListResult = { ok: true; values: number[] } | { ok: false; message: string };

export interface ListRules {
  /** Shown in messages, e.g. "Ranks". */
  name: string;
  integer: boolean;
  min: number;
  max: number;
}

/**
 * Read "0, 1, 2" (commas, semicolons or spaces between entries). Duplicates are
 * dropped and the values sorted ascending; anything unreadable or out of range is
 * refused with a message naming the entry.
 */
export function parseNumberList(text: string, rules: ListRules): ListResult {
  const parts = text.split(/[\s,;]+/).filter((p) => p !== '');
  if (parts.length === 0) return { ok: false, message: `${rules.name}: enter at least one value.` };
  const seen = new Set<number>();
  for (const p of parts) {
    const v = Number(p);
    if (!Number.isFinite(v)) return { ok: false, message: `${rules.name}: “${p}” is not a number.` };
    if (rules.integer && !Number.isInteger(v))
      return { ok: false, message: `${rules.name}: “${p}” is not a whole number.` };
    if (v < rules.min || v > rules.max)
      return { ok: false, message: `${rules.name}: ${p} is outside ${rules.min}–${rules.max}.` };
    seen.add(v);
  }
  return { ok: true, values: [...seen].sort((a, b) => a - b) };
}

export const RANK_RULES: ListRules = { name: 'Ranks', integer: true, min: 0, max: 200 };
export const LAMBDA_RULES: ListRules = { name: 'λ values', integer: false, min: 0, max: 1e6 };

export interface TuningRequest {
  ranks: string;
  lambdas: string;
  centerings: Centering[];
  folds: number;
}

export type TuningPlan =
  | {
      ok: true;
      settingsList: LowRankSettings[];
      folds: number;
      seed: number;
      ranks: number[];
      lambdas: number[];
      centerings: Centering[];
    }
  | { ok: false; message: string };

/**
 * Check the inputs and build ranks × λ × centerings on top of the form's other settings
 * (the low-rank defaults when the form is on the Gaussian family).
 */
export function planTuning(req: TuningRequest, form: FitSettings): TuningPlan {
  const base: LowRankSettings = form.model === 'lowrank' ? form : defaultLowRankSettings();
  const ranks = parseNumberList(req.ranks, RANK_RULES);
  if (!ranks.ok) return ranks;
  const lambdas = parseNumberList(req.lambdas, LAMBDA_RULES);
  if (!lambdas.ok) return lambdas;
  if (req.centerings.length === 0) return { ok: false, message: 'Tick at least one centering mode.' };
  if (!Number.isInteger(req.folds) || req.folds < 2 || req.folds > 20)
    return { ok: false, message: 'Folds must be a whole number from 2 to 20.' };
  const count = ranks.values.length * lambdas.values.length * req.centerings.length;
  if (count > MAX_GRID_SETTINGS)
    return {
      ok: false,
      message: `That grid has ${count} settings (${ranks.values.length} ranks × ${lambdas.values.length} λ × ${req.centerings.length} centering); the limit is ${MAX_GRID_SETTINGS}. Use fewer values.`,
    };
  const shared: Partial<LowRankSettings> = {
    ...base,
    maxIterations: form.maxIterations,
    seed: form.seed,
    clipToScale: form.clipToScale,
    snapToStep: form.snapToStep,
  };
  const settingsList = expandLowRankGrid({
    ranks: ranks.values,
    lambdas: lambdas.values,
    centerings: req.centerings,
    base: shared,
  });
  return {
    ok: true,
    settingsList,
    folds: req.folds,
    seed: form.seed,
    ranks: ranks.values,
    lambdas: lambdas.values,
    centerings: req.centerings,
  };
}

interface RankSeries {
  lambda: number;
  centering: Centering;
  /** Mean RMSE at each of `ranks` (NaN where the grid has no such point or the fit failed). */
  values: number[];
}

interface ChartPoint {
  rank: number;
  meanRmse: number;
  series: number;
}

export interface RankChartData {
  ranks: number[];
  series: RankSeries[];
  best: ChartPoint | null;
  oneSE: ChartPoint | null;
  threshold: number;
}

const num = (x: number | null | undefined): number => (x === null || x === undefined ? NaN : x);

/** Mean RMSE against rank, one series per (λ, centering) in order of first appearance. */
export function rankChartData(reply: TunePayload): RankChartData {
  const ranks: number[] = [];
  const keys: string[] = [];
  const series: RankSeries[] = [];
  for (const row of reply.table) {
    if (row.settings.model !== 'lowrank') continue;
    if (!ranks.includes(row.settings.rank)) ranks.push(row.settings.rank);
    const key = `${row.settings.lambda}|${row.settings.centering}`;
    if (!keys.includes(key)) {
      keys.push(key);
      series.push({ lambda: row.settings.lambda, centering: row.settings.centering, values: [] });
    }
  }
  ranks.sort((a, b) => a - b);
  for (const s of series) s.values = ranks.map(() => NaN);
  const pointOf = (index: number): ChartPoint | null => {
    const row = reply.table[index];
    if (!row || row.settings.model !== 'lowrank') return null;
    return {
      rank: row.settings.rank,
      meanRmse: num(row.meanRmse),
      series: keys.indexOf(`${row.settings.lambda}|${row.settings.centering}`),
    };
  };
  for (const row of reply.table) {
    if (row.settings.model !== 'lowrank') continue;
    const s = keys.indexOf(`${row.settings.lambda}|${row.settings.centering}`);
    series[s].values[ranks.indexOf(row.settings.rank)] = num(row.meanRmse);
  }
  return {
    ranks,
    series,
    best: pointOf(reply.bestIndex),
    oneSE: pointOf(reply.oneStandardErrorIndex),
    threshold: num(reply.threshold),
  };
}
