/**
 * The report's intervals section from a run's intervals at one level (engine/cellIntervals.ts):
 * the method in words, its published sources (the comment at the top of engine/intervals.ts
 * names them), the held-out coverage and width, and the constant-width comparison.
 */
import type { IntervalsAtLevel } from '../engine/cellIntervals';
import type { ReportIntervals } from './reportInput';

/** The published sources of the interval method (see the comment at the top of engine/intervals.ts). */
const INTERVAL_SOURCES = [
  'Vovk, V., Gammerman, A. & Shafer, G. (2005). Algorithmic Learning in a Random World. Springer.',
  'Lei, J., G’Sell, M., Rinaldo, A., Tibshirani, R. J. & Wasserman, L. (2018). Distribution-free predictive inference for regression. Journal of the American Statistical Association, 113(523), 1094–1111.',
  'Barber, R. F., Candès, E. J., Ramdas, A. & Tibshirani, R. J. (2021). Predictive inference with the jackknife+. The Annals of Statistics, 49(1), 486–507.',
];

/** The report's intervals section from the run's intervals at one level. */
export function reportIntervals(iv: IntervalsAtLevel): ReportIntervals {
  const finite = (x: number) => (Number.isFinite(x) ? x : null);
  const cw = iv.constantWidth;
  return {
    method: `${iv.method} prediction interval`,
    sources: INTERVAL_SOURCES,
    citation: 'Vovk, Gammerman & Shafer, 2005; Lei et al., 2018; Barber et al., 2021',
    level: iv.level,
    coverage: finite(iv.heldOut.coverage),
    meanWidth: finite(iv.heldOut.meanWidth),
    note:
      `Calibrated on the held-out residuals of the 5 fold models, the width scaled to how hard each cell is (scale from the ${iv.scaleSource}); bounds inclusive and clipped to the scale. ` +
      `An interval holds the true rating in about that share of cells like the held-out ones, on average over cells, not for each cell. ` +
      `For comparison, intervals of one constant width would cover ${Number.isFinite(cw.coverage) ? `${(cw.coverage * 100).toFixed(1)} %` : 'n/a'} with a mean width of ${Number.isFinite(cw.meanWidth) ? cw.meanWidth.toFixed(2) : 'n/a'}.`,
  };
}
