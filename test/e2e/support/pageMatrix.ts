/** The page's open rating matrix, read back into this process (NaN travels as null). */
import type { Page } from 'playwright-core';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';
import type { PageWithApp } from './apiCall';

export async function readPageMatrix(page: Page): Promise<RatingMatrix> {
  const m = await page.evaluate(() => {
    const cur = (window as unknown as PageWithApp).rankfillApp.store.current;
    return {
      rowLabels: cur.rowLabels,
      colLabels: cur.colLabels,
      values: Array.from(cur.values, (x) => (Number.isNaN(x) ? null : x)),
      scale: cur.scale,
    };
  });
  return { ...m, values: Float64Array.from(m.values, (x) => (x === null ? NaN : x)) };
}
