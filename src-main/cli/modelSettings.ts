/** Model settings from command-line options, on top of the engine defaults. */
import type { RatingMatrix } from '../../src-shared/matrix/ratingMatrix';
import type { FitSettings, GaussianSettings, LowRankSettings } from '../../src-shared/engine/types';
import { defaultLowRankSettings } from '../../src-shared/engine/defaults';
import { defaultGaussianSettings } from '../../src-shared/engine/gaussian/settings';
import type { CliOptions } from './args';

export function settingsFromOptions(o: CliOptions): LowRankSettings {
  const s = defaultLowRankSettings();
  if (o.rank !== undefined) s.rank = o.rank;
  if (o.lambda !== undefined) s.lambda = o.lambda;
  if (o.centering !== undefined) s.centering = o.centering;
  if (o.iterations !== undefined) s.maxIterations = o.iterations;
  if (o.tolerance !== undefined) s.tolerance = o.tolerance;
  if (o.seed !== undefined) s.seed = o.seed;
  // A step given with --scale asks for predictions on the scale's steps.
  if (o.scale?.step !== undefined) s.snapToStep = true;
  return s;
}

export function gaussianSettingsFromOptions(o: CliOptions): GaussianSettings {
  const s = defaultGaussianSettings();
  if (o.shrinkage !== undefined) s.shrinkage = o.shrinkage;
  s.transpose = o.transpose;
  if (o.iterations !== undefined) s.maxIterations = o.iterations;
  if (o.tolerance !== undefined) s.tolerance = o.tolerance;
  if (o.seed !== undefined) s.seed = o.seed;
  if (o.scale?.step !== undefined) s.snapToStep = true;
  return s;
}

/** fill / evaluate: the settings of the family chosen with --model. */
export function fitSettingsFromOptions(o: CliOptions): FitSettings {
  return o.model === 'gaussian' ? gaussianSettingsFromOptions(o) : settingsFromOptions(o);
}

/** The matrix with the scale from --scale, or the observed min and max (step as detected). */
export function withScale<T extends Pick<RatingMatrix, 'scale'>>(m: T, o: CliOptions): T {
  if (!o.scale) return m;
  return { ...m, scale: { min: o.scale.min, max: o.scale.max, step: o.scale.step ?? 0 } };
}
