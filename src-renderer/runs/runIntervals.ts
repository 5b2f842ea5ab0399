/**
 * A run's intervals at the level chosen in the page. The calibration (held-out cells
 * and σ̂ per cell) came with the run's trust; the bounds for a level are computed here,
 * in one pass, and kept until the run's trust or the level changes.
 */
import { intervalsAtLevel, type IntervalsAtLevel } from '../../src-shared/engine/cellIntervals';
import type { RatingScale } from '../../src-shared/matrix/ratingMatrix';
import type { Run } from './runStore';

const cache = new WeakMap<
  object,
  { level: number; predictions: Float64Array; scale: RatingScale; value: IntervalsAtLevel }
>();

export function intervalsOfRun(run: Run | undefined, scale: RatingScale, level: number): IntervalsAtLevel | undefined {
  const cal = run?.trust?.intervals;
  if (!run || !cal || cal.errorScale.length !== run.result.predictions.length) return undefined;
  const hit = cache.get(cal);
  if (
    hit &&
    hit.level === level &&
    hit.predictions === run.result.predictions &&
    hit.scale.min === scale.min &&
    hit.scale.max === scale.max
  )
    return hit.value;
  const value = intervalsAtLevel(cal, run.result.predictions, scale, level);
  cache.set(cal, { level, predictions: run.result.predictions, scale, value });
  return value;
}

/** "80 %" */
export function levelText(level: number): string {
  return `${Math.round(level * 100)} %`;
}
