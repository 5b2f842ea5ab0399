/** Plain-words names for model settings: run history, tables, exports and the study report. */
import type { Centering, FitSettings } from '../engine/types';

const CENTERING_WORDS: Record<Centering, string> = {
  none: 'no centering',
  row: 'centred by row',
  column: 'centred by column',
  both: 'centred by row and column',
};

export const CENTERING_SHORT: Record<Centering, string> = {
  none: 'none',
  row: 'by row',
  column: 'by column',
  both: 'both',
};

export function describeSettings(s: FitSettings): string {
  if (s.model === 'gaussian')
    return `Gaussian model · shrinkage ${s.shrinkage}${s.transpose ? ' · variables are rows' : ''}`;
  return `rank ${s.rank} · λ ${s.lambda} · ${CENTERING_WORDS[s.centering]}`;
}
