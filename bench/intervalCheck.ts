/**
 * Hidden-cell check of the intervals, shared by the open-data test and the bench:
 * hide a seeded share of the observed cells, Fill the rest (full fit + the k fold fits
 * that give the spread and the calibration), then measure on the hidden cells how often
 * the interval holds the hidden rating and how wide it is, for the normalized intervals
 * and for constant-width ones (σ̂ ≡ 1) calibrated the same way.
 */
import type { RatingMatrix } from '../src-shared/matrix/ratingMatrix';
import type { FitSettings } from '../src-shared/engine/types';
import { fitModel } from '../src-shared/engine/fitModel';
import { cellTrust } from '../src-shared/engine/trust';
import { createRng } from '../src-shared/engine/random';
import { intervalBounds, summarizeLevel } from '../src-shared/engine/intervals';

export interface HiddenCheck {
  level: number;
  normalized: { coverage: number; meanWidth: number; foldCoverage: number; foldWidth: number };
  constant: { coverage: number; meanWidth: number; foldCoverage: number; foldWidth: number };
}

export function hideShare(m: RatingMatrix, share: number, seed: number): { train: RatingMatrix; hidden: Int32Array } {
  const rng = createRng(seed);
  const values = new Float64Array(m.values);
  const hidden: number[] = [];
  for (let c = 0; c < values.length; c++) {
    if (values[c] === values[c] && rng.next() < share) {
      hidden.push(c);
      values[c] = NaN;
    }
  }
  return { train: { ...m, values }, hidden: Int32Array.from(hidden) };
}

export function checkHiddenCells(
  m: RatingMatrix,
  settings: FitSettings,
  levels: number[],
  opts: { share?: number; seed?: number; folds?: number } = {},
): { checks: HiddenCheck[]; fitMs: number; trustMs: number; calibrationMs: number; coefficients: number[] } {
  const { train, hidden } = hideShare(m, opts.share ?? 0.2, opts.seed ?? 13);
  let t0 = performance.now();
  const full = fitModel(train, settings);
  const fitMs = performance.now() - t0;
  t0 = performance.now();
  const trust = cellTrust(train, settings, { method: 'folds', k: opts.folds ?? 5, seed: settings.seed }, { full });
  const trustMs = performance.now() - t0;
  const cal = trust.intervals!;
  const n = hidden.length;
  const est = new Float64Array(n);
  const sig = new Float64Array(n);
  for (let t = 0; t < n; t++) {
    est[t] = full.predictions[hidden[t]];
    sig[t] = cal.errorScale[hidden[t]];
  }
  const ones = new Float64Array(n).fill(1);
  t0 = performance.now();
  const measure = (level: number, normalized: boolean) => {
    const s = summarizeLevel(cal.heldOut, level, m.scale, normalized);
    const b = intervalBounds(est, normalized ? sig : ones, s.q, m.scale);
    let inside = 0;
    let width = 0;
    for (let t = 0; t < n; t++) {
      const y = m.values[hidden[t]];
      if (y >= b.lower[t] && y <= b.upper[t]) inside++;
      width += b.upper[t] - b.lower[t];
    }
    return { coverage: inside / n, meanWidth: width / n, foldCoverage: s.coverage, foldWidth: s.meanWidth };
  };
  const checks = levels.map((level) => ({ level, normalized: measure(level, true), constant: measure(level, false) }));
  const calibrationMs = performance.now() - t0;
  return { checks, fitMs, trustMs, calibrationMs, coefficients: cal.coefficients };
}
