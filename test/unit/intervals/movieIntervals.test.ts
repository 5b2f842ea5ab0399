import { describe, expect, it } from 'vitest';
import { loadMovieRatings, movieRatingsAvailable, movieRatingsPath } from '../../../bench/datasets';
import { checkHiddenCells } from '../../../bench/intervalCheck';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';

const available = movieRatingsAvailable();
if (!available) console.warn(`skipping open-data interval checks: ${movieRatingsPath} is absent`);

// Open data: GroupLens movie-ratings-small (Harper & Konstan, 2015). 20 % of the ratings are
// hidden by a seed; the rest is filled (full fit + 5 fold fits) and the hidden ratings judge
// the intervals. Sources: Vovk, Gammerman & Shafer (2005), Algorithmic Learning in a Random
// World (conformal coverage); Lei, G'Sell, Rinaldo, Tibshirani & Wasserman (2018), JASA
// (split conformal, locally weighted/normalized scores); Barber, Candès, Ramdas & Tibshirani
// (2021), Annals of Statistics (jackknife+/CV+: cross-validation residuals).
describe.skipIf(!available)('intervals on movie-ratings-small, 20 % hidden', () => {
  it('80 % and 90 % intervals cover the hidden ratings within ±3 points; normalized ones are narrower than constant-width', () => {
    const m = loadMovieRatings();
    const settings = { ...defaultLowRankSettings(), maxIterations: 15, tolerance: 1e-4 };
    const { checks } = checkHiddenCells(m, settings, [0.8, 0.9], { share: 0.2, seed: 13 });
    for (const c of checks) {
      console.log(
        `level ${c.level}: normalized coverage ${c.normalized.coverage.toFixed(4)} mean width ${c.normalized.meanWidth.toFixed(3)}; ` +
          `constant coverage ${c.constant.coverage.toFixed(4)} mean width ${c.constant.meanWidth.toFixed(3)}`,
      );
      expect(Math.abs(c.normalized.coverage - c.level)).toBeLessThan(0.03);
      expect(Math.abs(c.constant.coverage - c.level)).toBeLessThan(0.03);
      // The held-out folds measured the same coverage before any hidden rating was seen.
      expect(Math.abs(c.normalized.foldCoverage - c.level)).toBeLessThan(0.01);
      expect(c.normalized.meanWidth).toBeLessThan(c.constant.meanWidth);
    }
  }, 120_000);
});
