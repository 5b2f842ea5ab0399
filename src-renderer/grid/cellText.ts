/**
 * How a rating is shown in a cell and read back from what the user typed.
 * Missing is an empty cell, never 0 and never "NaN".
 */
import { scaleDecimals, type RatingScale } from '../../src-shared/matrix/ratingMatrix';
import { describeScale, scaleRefusal } from '../../src-shared/matrix/scaleCheck';

export { describeScale };

export function formatRating(value: number | null | undefined, decimals: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '';
  return value.toFixed(decimals);
}

export type ParsedEntry = { kind: 'missing' } | { kind: 'value'; value: number } | { kind: 'refused'; reason: string };

/**
 * An observed rating as shown: exactly as stored. On a stepped scale the step's decimals
 * show it exactly; on a continuous scale the shortest form that reads back the same.
 */
export function formatObserved(value: number | null | undefined, scale: RatingScale): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '';
  if (scale.step > 0) {
    const text = value.toFixed(scaleDecimals(scale));
    // An older value off the step (kept from before a scale change) is shown in full.
    return Number(text) === value ? text : String(value);
  }
  return String(value);
}

/** Read typed text: blank = missing; a decimal comma is accepted; outside the scale or between its steps is refused. */
export function parseEntry(text: unknown, scale: RatingScale): ParsedEntry {
  const raw = text === null || text === undefined ? '' : String(text).trim();
  if (raw === '') return { kind: 'missing' };
  const normal = /^[+-]?\d+,\d+$/.test(raw) ? raw.replace(',', '.') : raw;
  const value = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(normal) ? Number(normal) : NaN;
  if (!Number.isFinite(value)) {
    return {
      kind: 'refused',
      reason: `“${raw.slice(0, 40)}” is not a number; this scale runs ${describeScale(scale)}`,
    };
  }
  const refusal = scaleRefusal(value, scale, raw);
  if (refusal !== undefined) return { kind: 'refused', reason: refusal };
  return { kind: 'value', value: value === 0 ? 0 : value };
}
