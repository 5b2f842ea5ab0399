/**
 * Changing a project's rating scale. A new scale never silently alters values:
 * `valuesOutside` lists the observed cells that fall outside it, the user sees
 * that list and confirms, and then `applyScale` clears exactly those cells
 * (made blank) together with the scale change, as ONE undoable change.
 * (Choice: clearing rather than keeping flagged values, because every other
 * part of the program may assume observed values lie on the scale.)
 */
import type { RatingMatrix, RatingScale } from '../../src-shared/matrix/ratingMatrix';

export interface OutsideValue {
  row: number;
  col: number;
  value: number;
}

/** Why a scale cannot be used, or undefined. */
export function scaleProblem(s: RatingScale): string | undefined {
  if (![s.min, s.max, s.step].every(Number.isFinite)) return 'minimum, maximum and step must be numbers';
  if (!(s.max > s.min)) return 'the maximum must be greater than the minimum';
  if (s.step < 0) return 'the step cannot be negative (0 means any value)';
  if (s.step > s.max - s.min) return 'the step cannot be larger than the whole range';
  if (Math.abs(s.min) > 1e15 || Math.abs(s.max) > 1e15) return 'the scale limits must lie within ±1e15';
  return undefined;
}

export function valuesOutside(m: RatingMatrix, s: RatingScale): OutsideValue[] {
  const out: OutsideValue[] = [];
  const cols = m.colLabels.length;
  for (let k = 0; k < m.values.length; k++) {
    const v = m.values[k];
    if (!Number.isNaN(v) && (v < s.min || v > s.max)) out.push({ row: Math.floor(k / cols), col: k % cols, value: v });
  }
  return out;
}

/** The matrix under the new scale, with the listed outside values cleared. */
export function applyScale(m: RatingMatrix, s: RatingScale): { matrix: RatingMatrix; cleared: number } {
  const values = new Float64Array(m.values);
  let cleared = 0;
  for (let k = 0; k < values.length; k++) {
    const v = values[k];
    if (!Number.isNaN(v) && (v < s.min || v > s.max)) {
      values[k] = NaN;
      cleared++;
    }
  }
  return {
    matrix: { rowLabels: m.rowLabels.slice(), colLabels: m.colLabels.slice(), values, scale: { ...s } },
    cleared,
  };
}
