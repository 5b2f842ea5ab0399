import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseLongSparse } from '../../../src-shared/io/parseLongSparse';
import { parseDelimited } from '../../../src-shared/io/parseDelimited';
import { denseValues } from '../../../src-shared/matrix/sparseRatings';

const fixtures = join(__dirname, '..', '..', 'fixtures');

// The fast long reader must agree with the full parser wherever it answers (same labels in
// order of first appearance, same values, same scale), and leave everything else to it.
// Reference: parseDelimited with layout 'long' (this project's documented import rules).
function agree(text: string, name: string): 'fast' | 'fallback' {
  const fast = parseLongSparse(text, name, 1e7);
  if (fast === undefined) return 'fallback';
  const full = parseDelimited(text, { fileName: name, layout: 'long' });
  expect(fast.ok).toBe(true);
  expect(full.ok).toBe(true);
  if (!fast.ok || !full.ok) return 'fast';
  expect(fast.matrix.rowLabels).toEqual(full.matrix.rowLabels);
  expect(fast.matrix.colLabels).toEqual(full.matrix.colLabels);
  expect(fast.matrix.scale).toEqual(full.matrix.scale);
  expect(Array.from(denseValues(fast.matrix.data))).toEqual(Array.from(full.matrix.values));
  return 'fast';
}

describe('parseLongSparse', () => {
  it('reads plain long files exactly as the full parser does', () => {
    expect(agree('row,col,value\na,x,4\na,y,3.5\nb,x,NA\nb,z,1\n', 'h.csv')).toBe('fast');
    expect(agree('a,x,4\r\na,y,2\r\n\r\nc,y,-0\r\n', 'crlf.csv')).toBe('fast');
    expect(agree('r\tc\tv\nq\tw\t1e1\nq\te\t.5\n', 't.tsv')).toBe('fast');
    expect(agree('\uFEFFr,c,v\nA,B,5\nA,C,5\n', 'bom.csv')).toBe('fast');
    expect(agree(readFileSync(join(fixtures, 'good', 'long.csv'), 'utf8'), 'long.csv')).toBe('fast');
  });

  it('leaves quotes, extra fields, duplicates, bad values and empty labels to the full parser', () => {
    expect(agree('r,c,v\n"a",x,1\n', 'q.csv')).toBe('fallback');
    expect(agree('r,c,v,w\na,x,1,0\n', 'x.csv')).toBe('fallback');
    expect(agree('r,c,v\na,x,1\na,x,2\n', 'd.csv')).toBe('fallback');
    expect(agree('r,c,v\na,x,one\n', 'n.csv')).toBe('fallback');
    expect(agree('r,c,v\n,x,1\n', 'e.csv')).toBe('fallback');
    expect(agree('r;c;v\na;x;1,5\n', 'dc.csv')).toBe('fallback');
    for (const f of readdirSync(join(fixtures, 'bad')).filter((x) => x.startsWith('long-'))) {
      expect(agree(readFileSync(join(fixtures, 'bad', f), 'utf8'), f)).toBe('fallback');
    }
  });

  it('stops at the first rating over the limit and names its line', () => {
    // common practice, no source: a limit is reported where it is crossed, not after reading everything.
    const r = parseLongSparse('r,c,v\na,x,1\na,y,2\nb,x,NA\nb,y,3\nc,x,4\n', 'big.csv', 2);
    expect(r).toEqual({
      ok: false,
      problems: [
        {
          file: 'big.csv',
          line: 5,
          column: 3,
          message: 'more than 2 observed ratings; the command line holds at most 2',
        },
      ],
    });
  });
});
