import type { RatingScale } from '../matrix/ratingMatrix';

/** Candidate steps, largest first. */
const STEP_CANDIDATES: readonly number[] = [1, 0.5, 0.25, 0.1, 0.01];

function isMultiple(x: number, step: number): boolean {
  const q = x / step;
  return Math.abs(q - Math.round(q)) <= 1e-9 * Math.max(1, Math.abs(q));
}

/**
 * Scale guessed from observed values: min and max as observed, and the largest
 * step among 1, 0.5, 0.25, 0.1, 0.01 that divides every value (0 = continuous
 * when none does). Missing (NaN) values are skipped. Undefined when nothing is observed.
 */
export function detectScale(values: ArrayLike<number>): RatingScale | undefined {
  let min = Infinity;
  let max = -Infinity;
  let alive = STEP_CANDIDATES.slice();
  for (let i = 0; i < values.length; i++) {
    const x = values[i];
    if (x !== x) continue;
    if (x < min) min = x;
    if (x > max) max = x;
    // When the largest surviving step divides x, so do all smaller survivors
    // (any set of survivors is a chain under divisibility), so re-filter only on failure.
    if (alive.length > 0 && !isMultiple(x, alive[0])) alive = alive.filter((s) => isMultiple(x, s));
  }
  if (!(min <= max)) return undefined;
  return { min, max, step: alive.length > 0 ? alive[0] : 0 };
}
