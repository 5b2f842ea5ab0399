import { describe, expect, it } from 'vitest';
import { formatProblem, parseDelimited, writeLongCsv, writeWideCsv } from '../../../src-shared/io';

function ok(text: string, opts: Parameters<typeof parseDelimited>[1] = { fileName: 't.csv' }) {
  const r = parseDelimited(text, opts);
  if (!r.ok) throw new Error(r.problems.map(formatProblem).join('\n'));
  return r;
}

describe('parseDelimited: valid input', () => {
  it('reads a wide CSV with BOM and missing tokens', () => {
    const r = ok('\uFEFFname,a,b\r\nx,1,2\r\ny,NA,4.5\r\n');
    expect(r.matrix.rowLabels).toEqual(['x', 'y']);
    expect(r.matrix.colLabels).toEqual(['a', 'b']);
    expect(Array.from(r.matrix.values)).toEqual([1, 2, NaN, 4.5]);
    expect(r.info.hadBom).toBe(true);
    expect(r.info.observed).toBe(3);
    // Source: arithmetic — 0.5 is the largest candidate step dividing 1, 2 and 4.5.
    expect(r.info.detectedScale).toEqual({ min: 1, max: 4.5, step: 0.5 });
  });

  it('detects semicolon and decimal comma', () => {
    const r = ok('name;a;b\nx;1,5;2\ny;;4,5\n');
    expect(r.info.delimiter).toBe(';');
    expect(r.info.decimalComma).toBe(true);
    expect(Array.from(r.matrix.values)).toEqual([1.5, 2, NaN, 4.5]);
  });

  it('reads RFC 4180 quoting: embedded delimiter, doubled quotes, line breaks', () => {
    // Source: RFC 4180 section 2, rules 5–7.
    const r = ok('"na,me","a ""q""","b\nc"\r\n"x y",1,2\r\n');
    expect(r.matrix.colLabels).toEqual(['a "q"', 'b\nc']);
    expect(r.matrix.rowLabels).toEqual(['x y']);
    expect(r.info.lines).toBe(3);
  });

  it('pivots long layout and resolves duplicates by policy', () => {
    const text = 'user,item,rating\nu1,i1,3\nu1,i2,4\nu2,i1,5\nu1,i1,2\n';
    const refused = parseDelimited(text, { fileName: 'l.csv' });
    expect(refused.ok).toBe(false);
    if (!refused.ok)
      expect(formatProblem(refused.problems[0])).toMatch(
        /^l\.csv:5:1: duplicate pair \(row "u1", column "i1"\): first given on line 2/,
      );
    const avg = ok(text, { fileName: 'l.csv', duplicates: 'average' });
    expect(avg.info.layout).toBe('long');
    expect(Array.from(avg.matrix.values)).toEqual([2.5, 4, 5, NaN]); // (3 + 2) / 2
    const last = ok(text, { fileName: 'l.csv', duplicates: 'last' });
    expect(last.matrix.values[0]).toBe(2);
    expect(last.warnings).toHaveLength(1);
  });

  it('round-trips a small matrix through the wide and long writers', () => {
    const m = {
      rowLabels: ['a,b', 'c"d', 'e\nf'],
      colLabels: ['x', ' y '],
      values: new Float64Array([1, NaN, 0.1 + 0.2, 4, NaN, NaN]),
      scale: { min: 0, max: 5, step: 0 },
    };
    for (const text of [writeWideCsv(m), writeLongCsv(m, { includeMissing: true })]) {
      const r = ok(text, { fileName: 'rt.csv', layout: text.startsWith('row,column,value') ? 'long' : 'wide' });
      expect(r.matrix.rowLabels).toEqual(m.rowLabels);
      expect(r.matrix.colLabels).toEqual(m.colLabels);
      expect(Array.from(r.matrix.values)).toEqual(Array.from(m.values));
    }
  });
});

describe('parseDelimited: bad input', () => {
  it('reports every problem with line and field, in file order', () => {
    const r = parseDelimited('name,a,b\nx,1,2\ny;3;4\nz,1e308,-inf\nw,abc,1,3\nx,,\n,1,2\n', { fileName: 'm.csv' });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.map(formatProblem)).toEqual([
      'm.csv:3:2: too few fields: found 1, the header has 3 (this line seems to use semicolon as the delimiter instead of comma)',
      'm.csv:4:2: "1e308" is implausible as a rating (allowed magnitude up to 1e15)',
      'm.csv:4:3: "-inf" is not a finite number; ratings must be finite',
      'm.csv:5:2: "abc" is not a number',
      'm.csv:5:4: too many fields: found 4, the header has 3',
      'm.csv:6:1: duplicate row label "x" (first on line 2)',
      'm.csv:7:1: empty row label',
    ]);
  });
});
