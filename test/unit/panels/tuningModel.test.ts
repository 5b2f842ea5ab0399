import { describe, expect, it } from 'vitest';
import { tuneToPayload } from '../../../src-shared/apiCodec';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { tune } from '../../../src-shared/engine/tuning';
import type { GaussianSettings } from '../../../src-shared/engine/types';
import {
  MAX_GRID_SETTINGS,
  parseNumberList,
  planTuning,
  RANK_RULES,
  LAMBDA_RULES,
  rankChartData,
} from '../../../src-renderer/panels/tuningModel';
import { lowRankCase } from '../engine/helpers';

describe('parseNumberList', () => {
  it('reads commas, semicolons and spaces, drops duplicates and sorts', () => {
    expect(parseNumberList('3, 1;2  1', RANK_RULES)).toEqual({ ok: true, values: [1, 2, 3] });
    expect(parseNumberList('0.1,30, 1e1', LAMBDA_RULES)).toEqual({ ok: true, values: [0.1, 10, 30] });
  });

  it('refuses bad entries with a message naming them', () => {
    expect(parseNumberList('1, two', RANK_RULES)).toEqual({ ok: false, message: 'Ranks: “two” is not a number.' });
    expect(parseNumberList('1.5', RANK_RULES)).toEqual({ ok: false, message: 'Ranks: “1.5” is not a whole number.' });
    expect(parseNumberList('-1', LAMBDA_RULES)).toMatchObject({
      ok: false,
      message: 'λ values: -1 is outside 0–1000000.',
    });
    expect(parseNumberList('  ', RANK_RULES).ok).toBe(false);
  });
});

describe('planTuning', () => {
  const form = { ...defaultLowRankSettings(), seed: 11, maxIterations: 40, centering: 'row' as const };

  it('builds every rank × λ × centering combination on the form’s other settings', () => {
    const plan = planTuning({ ranks: '0,1,2', lambdas: '1, 10', centerings: ['row', 'both'], folds: 4 }, form);
    if (!plan.ok) throw new Error(plan.message);
    // Source: product rule of counting, 3 × 2 × 2 = 12 (common fact).
    expect(plan.settingsList).toHaveLength(12);
    expect(new Set(plan.settingsList.map((s) => `${s.rank}/${s.lambda}/${s.centering}`)).size).toBe(12);
    expect(plan.settingsList.every((s) => s.seed === 11 && s.maxIterations === 40)).toBe(true);
    expect(plan).toMatchObject({ folds: 4, seed: 11 });
  });

  it('refuses grids above the limit, empty centering and bad folds', () => {
    const ranks = Array.from({ length: 21 }, (_, i) => i).join(',');
    const lambdas = Array.from({ length: 20 }, (_, i) => i + 1).join(',');
    const big = planTuning({ ranks, lambdas, centerings: ['row'], folds: 5 }, form);
    expect(big.ok).toBe(false);
    if (!big.ok) expect(big.message).toContain(`420 settings`);
    expect(420).toBeGreaterThan(MAX_GRID_SETTINGS);
    expect(planTuning({ ranks: '1', lambdas: '1', centerings: [], folds: 5 }, form)).toMatchObject({ ok: false });
    expect(planTuning({ ranks: '1', lambdas: '1', centerings: ['none'], folds: 1 }, form)).toMatchObject({ ok: false });
  });

  it('uses the low-rank defaults when the form is Gaussian, keeping its seed', () => {
    const g: GaussianSettings = {
      model: 'gaussian',
      shrinkage: 0.1,
      transpose: false,
      maxIterations: 20,
      tolerance: 1e-6,
      seed: 3,
      clipToScale: true,
      snapToStep: false,
    };
    const plan = planTuning({ ranks: '1', lambdas: '2', centerings: ['both'], folds: 5 }, g);
    if (!plan.ok) throw new Error(plan.message);
    expect(plan.settingsList[0]).toMatchObject({ model: 'lowrank', rank: 1, lambda: 2, centering: 'both', seed: 3 });
  });
});

describe('rankChartData', () => {
  it('lays the table out as one series per (λ, centering) over sorted ranks, with best and one-SE points', () => {
    const { matrix } = lowRankCase(20, 14, 2, 0.2, 0.7, 2);
    const plan = planTuning(
      { ranks: '2, 0, 1', lambdas: '1, 10', centerings: ['none', 'both'], folds: 4 },
      defaultLowRankSettings(),
    );
    if (!plan.ok) throw new Error(plan.message);
    const reply = tuneToPayload(tune(matrix, { settings: plan.settingsList }, plan.folds, plan.seed));
    const data = rankChartData(reply);
    expect(data.ranks).toEqual([0, 1, 2]);
    expect(data.series).toHaveLength(4);
    for (const row of reply.table) {
      if (row.settings.model !== 'lowrank') continue;
      const s = data.series.find(
        (x) =>
          x.lambda === (row.settings as { lambda: number }).lambda &&
          x.centering === (row.settings as { centering: string }).centering,
      )!;
      expect(s.values[data.ranks.indexOf(row.settings.rank)]).toBe(row.meanRmse);
    }
    // Best = the smallest mean RMSE in the table, found here independently.
    const means = reply.table.map((r) => r.meanRmse ?? Infinity);
    expect(data.best!.meanRmse).toBe(Math.min(...means));
    // Source: one-standard-error rule (Hastie, Tibshirani & Friedman, ESL §7.10): the chosen point
    // lies at or under best + sd/√k and no point of smaller rank does.
    const best = reply.table[reply.bestIndex];
    const threshold = best.meanRmse! + best.sdRmse! / Math.sqrt(reply.k);
    expect(data.threshold).toBeCloseTo(threshold, 12);
    expect(data.oneSE!.meanRmse).toBeLessThanOrEqual(threshold);
    for (const s of data.series)
      s.values.forEach((v, i) => {
        if (data.ranks[i] < data.oneSE!.rank) expect(v).toBeGreaterThan(threshold);
      });
  });
});
