/**
 * How a rating is shown in a cell and read back from what the user typed.
 * Missing is an empty cell, never 0 and never "NaN".
 */
import type { RatingScale } from '../../src-shared/matrix/ratingMatrix';

export function formatRating(value: number | null | undefined, decimals: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '';
  return value.toFixed(decimals);
}

export type ParsedEntry = { kind: 'missing' } | { kind: 'value'; value: number } | { kind: 'refused'; reason: string };

export function describeScale(scale: RatingScale): string {
  return scale.step > 0 ? `${scale.min}–${scale.max} in steps of ${scale.step}` : `${scale.min}–${scale.max}`;
}

/** Read typed text: blank = missing; a decimal comma is accepted; outside the scale is refused. */
export function parseEntry(text: unknown, scale: RatingScale): ParsedEntry {
  const raw = text === null || text === undefined ? '' : String(text).trim();
  if (raw === '') return { kind: 'missing' };
  const normal = /^[+-]?\d+,\d+$/.test(raw) ? raw.replace(',', '.') : raw;
  const value = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(normal) ? Number(normal) : NaN;
  if (!Number.isFinite(value)) {
    return { kind: 'refused', reason: `“${raw.slice(0, 40)}” is not a number; this scale runs ${describeScale(scale)}` };
  }
  if (value < scale.min || value > scale.max) {
    return { kind: 'refused', reason: `${raw} lies outside the scale ${describeScale(scale)}` };
  }
  return { kind: 'value', value };
}
