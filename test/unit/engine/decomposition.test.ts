/**
 * The Cell tab's decomposition adds up to the engine's own prediction (to 1e-9) for every
 * centering of the low-rank family and for the Gaussian family (also transposed), with and
 * without clipping and rounding to the step. The Gaussian regression weights are checked
 * against ml-matrix's own solve of Σ_oo w = Σ_oj (the conditional-mean formula of the
 * multivariate normal, e.g. Anderson, An Introduction to Multivariate Statistical Analysis, §2.5).
 */
import { describe, expect, it } from 'vitest';
import { Matrix, solve } from 'ml-matrix';
import { decomposeCell } from '../../../src-shared/engine/decomposition';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { defaultGaussianSettings } from '../../../src-shared/engine/gaussian/settings';
import type { Centering, FitResult } from '../../../src-shared/engine/types';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';
import { ar1Covariance, drawNormal, hideAtRandom, toMatrix } from '../gaussian/helpers';
import { lowRankCase } from './helpers';

function checkEveryMissingCell(m: RatingMatrix, r: FitResult): number {
  const cols = m.colLabels.length;
  let checked = 0;
  for (let i = 0; i < m.rowLabels.length; i++)
    for (let j = 0; j < cols; j++) {
      if (!Number.isNaN(m.values[i * cols + j])) continue;
      const d = decomposeCell(m.values, r, m.scale, i, j)!;
      let s = 0;
      for (const t of d.terms) s += t.value;
      expect(Math.abs(s - r.predictions[i * cols + j])).toBeLessThan(1e-9);
      expect(d.total).toBe(s);
      checked++;
    }
  return checked;
}

describe('low-rank decomposition', () => {
  const base = lowRankCase(18, 11, 2, 0.3, 0.6, 5).matrix;
  // Shift onto a 1–9 style range so the baselines matter; clipping and step rounding on a tight scale.
  const shifted = { ...base, values: base.values.map((x) => x + 5), scale: { min: -1e9, max: 1e9, step: 0 } };
  const tight = { ...shifted, scale: { min: 4, max: 6, step: 0.5 } };
  for (const centering of ['none', 'row', 'column', 'both'] as Centering[]) {
    for (const rank of [0, 2]) {
      it(`centering ${centering}, rank ${rank}: the terms add up to the prediction`, () => {
        const r = fitModel(shifted, { ...defaultLowRankSettings(), centering, rank, lambda: 0.5 });
        expect(checkEveryMissingCell(shifted, r)).toBeGreaterThan(40);
        const d = decomposeCell(shifted.values, r, shifted.scale, 0, 0)!;
        const kinds = d.terms.map((t) => t.kind);
        const expected = { none: [], row: ['row'], column: ['column'], both: ['global', 'row', 'column'] }[centering];
        expect(kinds.filter((k) => k !== 'interaction')).toEqual(expected);
        expect(kinds.includes('interaction')).toBe(rank > 0);
      });
    }
    it(`centering ${centering}, clipped and rounded to a 0.5 step: an adjustment term closes the sum`, () => {
      const r = fitModel(tight, { ...defaultLowRankSettings(), centering, rank: 2, lambda: 0.5, snapToStep: true });
      checkEveryMissingCell(tight, r);
      let adjusted = 0;
      for (let c = 0; c < tight.values.length; c++) {
        if (!Number.isNaN(tight.values[c])) continue;
        const d = decomposeCell(tight.values, r, tight.scale, Math.floor(c / 11), c % 11)!;
        if (d.terms.some((t) => t.kind === 'adjustment')) adjusted++;
      }
      expect(adjusted).toBeGreaterThan(0);
    });
  }
  it('under both, the row-part the grid shows is global mean + row offset', () => {
    const r = fitModel(shifted, { ...defaultLowRankSettings(), centering: 'both' });
    const d = decomposeCell(shifted.values, r, shifted.scale, 3, 4)!;
    expect(d.terms[0].value + d.terms[1].value).toBeCloseTo(r.rowBaseline[3], 12);
    expect(d.terms[2].value).toBe(r.colBaseline[4]);
  });
});

describe('Gaussian decomposition: column mean + regression on the row’s observed cells', () => {
  const p = 5;
  const n = 80;
  const full = drawNormal(n, [5, 4, 6, 5, 3], ar1Covariance([1, 1.2, 0.8, 1, 1.1], 0.6), 11);
  const values = hideAtRandom(full, 0.25, 12);
  const m = toMatrix(values, n, p);
  it('adds up to the engine’s conditional mean in every missing cell', () => {
    const r = fitModel(m, defaultGaussianSettings());
    expect(r.covariance).toHaveLength(p * p);
    expect(checkEveryMissingCell(m, r)).toBeGreaterThan(60);
  });
  it('the weights are Σ_oo⁻¹ Σ_oj (ml-matrix solve) and the shares add up to the regression term', () => {
    const r = fitModel(m, defaultGaussianSettings());
    const S = r.covariance!;
    let row = -1;
    let col = -1;
    for (let c = 0; c < values.length && row < 0; c++) {
      const i = Math.floor(c / p);
      let obs = 0;
      for (let v = 0; v < p; v++) if (!Number.isNaN(values[i * p + v])) obs++;
      if (Number.isNaN(values[c]) && obs >= 3) [row, col] = [i, c % p];
    }
    const d = decomposeCell(m.values, r, m.scale, row, col)!;
    const obs = [...Array(p).keys()].filter((v) => !Number.isNaN(values[row * p + v]));
    const soo = new Matrix(obs.map((a) => obs.map((b) => S[a * p + b])));
    const soj = Matrix.columnVector(obs.map((a) => S[a * p + col]));
    const w = solve(soo, soj).to1DArray();
    for (const share of d.shares!) expect(share.weight).toBeCloseTo(w[obs.indexOf(share.col)], 10);
    const reg = d.terms.find((t) => t.kind === 'regression')!;
    expect(d.shares!.reduce((a, s) => a + s.contribution, 0)).toBeCloseTo(reg.value, 12);
    expect(d.terms[0]).toMatchObject({ kind: 'mean', value: r.colBaseline[col] });
  });
  it('transposed (variables are rows), and clipped to a 1–9 scale with step 1', () => {
    const tm = toMatrix(new Float64Array(values.length), p, n);
    for (let i = 0; i < n; i++) for (let j = 0; j < p; j++) tm.values[j * n + i] = values[i * p + j];
    const r = fitModel(tm, { ...defaultGaussianSettings(), transpose: true });
    expect(checkEveryMissingCell(tm, r)).toBeGreaterThan(60);
    const clipped = { ...m, scale: { min: 4, max: 6, step: 1 } };
    const rc = fitModel(clipped, { ...defaultGaussianSettings(), snapToStep: true });
    checkEveryMissingCell(clipped, rc);
  });
});
