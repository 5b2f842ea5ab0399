/**
 * Property: export then import gives back the same matrix — labels, values and
 * blanks — for random labels (delimiters, quotes, line breaks, unicode, edge
 * spaces) and values. Source for the quoting rules: RFC 4180 section 2; for the
 * number text: ECMAScript Number::toString gives the shortest string that reads
 * back to the same double.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { formatProblem } from '../../../src-shared/io/problem';
import { parseDelimited, type ParseOptions } from '../../../src-shared/io/parseDelimited';
import { writeLongCsv, writeWideCsv } from '../../../src-shared/io/writeDelimited';

// Exact round trip is the writers' promise with the formula guard off (the guard adds an
// apostrophe to labels a spreadsheet would run; see test/unit/export/formulaGuard.test.ts).
const RAW = { formulaGuard: false } as const;
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';

const awkward = fc.constantFrom(
  ',',
  ';',
  '\t',
  '"',
  '\n',
  '\r\n',
  '\r',
  ' ',
  'é',
  '名',
  '😀',
  'NA',
  '-',
  '.',
  '1',
  "'",
  '=',
);
const labelChar = fc.oneof(fc.string({ unit: 'grapheme', minLength: 1, maxLength: 1 }), awkward);
const label = fc
  .array(labelChar, { minLength: 1, maxLength: 8 })
  .map((parts) => parts.join(''))
  .filter((s) => s !== '' && !s.includes('\u0000') && !s.includes('\uFFFD'));

const value = fc.oneof(
  { weight: 2, arbitrary: fc.constant(NaN) },
  { weight: 3, arbitrary: fc.integer({ min: -10, max: 10 }) },
  { weight: 3, arbitrary: fc.double({ min: -1e15, max: 1e15, noNaN: true, noDefaultInfinity: true }) },
  { weight: 1, arbitrary: fc.constantFrom(0.1, 0.5, 4.75, 1e-9, 123456.789) },
);

const matrixArb = fc
  .record({ rows: fc.integer({ min: 1, max: 6 }), cols: fc.integer({ min: 1, max: 6 }) })
  .chain(({ rows, cols }) =>
    fc.record({
      rowLabels: fc.uniqueArray(label, { minLength: rows, maxLength: rows }),
      colLabels: fc.uniqueArray(label, { minLength: cols, maxLength: cols }),
      values: fc.array(value, { minLength: rows * cols, maxLength: rows * cols }),
      anchor: fc.integer({ min: 0, max: rows * cols - 1 }),
      anchorValue: fc.integer({ min: 1, max: 5 }),
    }),
  )
  .map(({ rowLabels, colLabels, values, anchor, anchorValue }): RatingMatrix => {
    const v = Float64Array.from(values, (x) => (Object.is(x, -0) ? 0 : x));
    v[anchor] = anchorValue; // at least one observed value, or the import is refused by design
    return { rowLabels, colLabels, values: v, scale: { min: 1, max: 5, step: 1 } };
  });

function expectSame(text: string, m: RatingMatrix, opts: ParseOptions): void {
  const r = parseDelimited(text, opts);
  if (!r.ok)
    throw new Error(`refused:\n${r.problems.map(formatProblem).join('\n')}\n--- text ---\n${JSON.stringify(text)}`);
  expect(r.matrix.rowLabels).toEqual(m.rowLabels);
  expect(r.matrix.colLabels).toEqual(m.colLabels);
  expect(Array.from(r.matrix.values)).toEqual(Array.from(m.values));
}

describe('CSV round trip (fast-check)', () => {
  it('wide CSV with automatic delimiter and layout detection', () => {
    fc.assert(
      fc.property(matrixArb, (m) => expectSame(writeWideCsv(m, RAW), m, { fileName: 'rt.csv' })),
      { numRuns: 300, seed: 20260101 },
    );
  });

  it('wide TSV and semicolon text with decimal comma', () => {
    fc.assert(
      fc.property(matrixArb, fc.constantFrom('\t' as const, ';' as const), (m, d) =>
        expectSame(writeWideCsv(m, { ...RAW, delimiter: d, decimalComma: true }), m, {
          fileName: 'rt.txt',
          delimiter: d,
          decimalComma: true,
        }),
      ),
      { numRuns: 200, seed: 20260102 },
    );
  });

  it('long CSV including blank cells, so empty rows and columns survive', () => {
    fc.assert(
      fc.property(matrixArb, (m) =>
        expectSame(writeLongCsv(m, { ...RAW, includeMissing: true }), m, { fileName: 'rt-long.csv', layout: 'long' }),
      ),
      { numRuns: 200, seed: 20260103 },
    );
  });
});
