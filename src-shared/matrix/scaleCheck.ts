/**
 * Whether a rating may be stored on a scale, and if not, why. A rating is stored exactly
 * as entered; one that lies outside [min, max] or between two steps is refused, never
 * rounded. With step s > 0 the allowed values are min + k·s (k = 0, 1, …) up to max; a
 * value counts as on a step when (x − min)/s is within 1e-9 (relative) of a whole number,
 * so that decimal entries such as 0.3 on a 0.1 step are accepted despite binary rounding.
 */
import { scaleDecimals, type RatingScale } from './ratingMatrix';

export function describeScale(scale: RatingScale): string {
  return scale.step > 0 ? `${scale.min}–${scale.max} in steps of ${scale.step}` : `${scale.min}–${scale.max}`;
}

function formatStep(x: number, scale: RatingScale): string {
  return String(Number(x.toFixed(scaleDecimals(scale))));
}

/** Nearest allowed values below and above x (the same value twice when x is on a step). */
export function neighbouringSteps(x: number, scale: RatingScale): [number, number] {
  const { min, max, step } = scale;
  if (!(step > 0)) return [Math.min(max, Math.max(min, x)), Math.min(max, Math.max(min, x))];
  const q = (x - min) / step;
  const k = Math.round(q);
  if (Math.abs(q - k) <= 1e-9 * Math.max(1, Math.abs(q))) {
    const v = min + k * step;
    return [v, v];
  }
  const lo = Math.max(min, min + Math.floor(q) * step);
  const hi = Math.min(max, min + Math.ceil(q) * step);
  return [lo, hi];
}

export function isOnStep(x: number, scale: RatingScale): boolean {
  if (!(scale.step > 0)) return true;
  const [lo, hi] = neighbouringSteps(x, scale);
  return lo === hi;
}

/**
 * Undefined when x may be stored on this scale; otherwise the reason, naming the allowed
 * range or the nearest allowed values (`text` is the entry as the user gave it).
 */
export function scaleRefusal(x: number, scale: RatingScale, text: string = String(x)): string | undefined {
  if (x < scale.min || x > scale.max) return `${text} lies outside the scale ${describeScale(scale)}`;
  if (isOnStep(x, scale)) return undefined;
  const [lo, hi] = neighbouringSteps(x, scale);
  return `${text} lies between the allowed values ${formatStep(lo, scale)} and ${formatStep(hi, scale)} (scale ${describeScale(scale)}); enter one of them or change the scale's step`;
}
