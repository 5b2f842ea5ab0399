import { describe, expect, it } from 'vitest';
import { countChartSvg, shortLabel } from '../../../src-shared/report/countChartSvg';
import { esc, niceTicks } from '../../../src-shared/report/html';
import { levelOf, patternMapSvg } from '../../../src-shared/report/patternMapSvg';

const titles = (svg: string) => [...svg.matchAll(/<rect [^>]*><title>([^<]*)<\/title><\/rect>/g)].map((m) => m[1]);

describe('report charts', () => {
  it('draws one bar per row up to 80 rows, with each count in its tooltip and thin rows marked', () => {
    const counts = Int32Array.from([3, 0, 5, 1]);
    const svg = countChartSvg(counts, ['a', 'b', 'c', 'd'], 'row', 6, 2, 't');
    expect(titles(svg)).toEqual([
      'a: 3 of 6 observed',
      'b: 0 of 6 observed (thin)',
      'c: 5 of 6 observed',
      'd: 1 of 6 observed (thin)',
    ]);
  });

  it('above 80 rows draws a histogram of the counts (each bin counted directly, common practice, no source)', () => {
    const counts = Int32Array.from({ length: 100 }, (_, i) => i % 5);
    const svg = countChartSvg(counts, [], 'row', 10, 1, 't');
    expect(titles(svg)).toEqual([
      '20 rows with 0 observed cells (thin)',
      '20 rows with 1 observed cells',
      '20 rows with 2 observed cells',
      '20 rows with 3 observed cells',
      '20 rows with 4 observed cells',
    ]);
    // Counts up to 99 are grouped 3 to a bin (at most 40 bins).
    const wide = countChartSvg(
      Int32Array.from({ length: 90 }, (_, i) => i + 10),
      [],
      'column',
      200,
      1,
      't',
    );
    expect(titles(wide)[3]).toBe('2 columns with 9–11 observed cells'); // 10 and 11
    expect(titles(wide)[4]).toBe('3 columns with 12–14 observed cells');
  });

  it('shortens long labels keeping both ends', () => {
    expect(shortLabel('Submission 12')).toBe('Submi…ion 12');
    expect(shortLabel('Short')).toBe('Short');
  });

  it('shades a block as soon as one cell in it is observed', () => {
    expect([0, 0.01, 0.1, 0.5, 1].map(levelOf)).toEqual([0, 1, 1, 3, 5]);
    const svg = patternMapSvg(
      { blockRows: 1, blockCols: 3, rowsPerBlock: 1, colsPerBlock: 1, share: Float64Array.from([1, 1, 0]) },
      1,
      3,
      't',
    );
    // The two observed neighbours become one rectangle two cells wide.
    expect(svg.match(/<rect x="6" y="6" width="36" height="18"/g)?.length).toBe(1);
  });

  it('escapes markup and picks round ticks', () => {
    expect(esc(`<a href="x">&'`)).toBe('&lt;a href=&quot;x&quot;&gt;&amp;&#39;');
    expect(niceTicks(0, 10, 4)).toEqual([0, 5, 10]); // step 2.5 rounds up to 5 (steps are 1, 2 or 5 × 10^k)
    expect(niceTicks(0.83, 1.27, 4)).toEqual([1, 1.2]);
    expect(niceTicks(0.83, 1.27, 8)).toEqual([0.9, 1, 1.1, 1.2]); // step 0.055 rounds up to 0.1
  });
});
