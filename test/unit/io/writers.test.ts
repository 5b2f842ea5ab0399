import { describe, expect, it } from 'vitest';
import { detectScale } from '../../../src-shared/io/detectScale';
import {
  formatNumber,
  quoteField,
  writeFilledLongCsv,
  writeLongCsv,
  writeWideCsv,
} from '../../../src-shared/io/writeDelimited';

const m = {
  rowLabels: ['ann', 'b,o"b'],
  colLabels: ['alpha', 'beta'],
  values: new Float64Array([4, NaN, 2.5, 1]),
  scale: { min: 1, max: 5, step: 0.5 },
};

describe('writers', () => {
  it('quotes per RFC 4180 and leaves blanks for missing', () => {
    // Source: RFC 4180 section 2 (rules 6 and 7: quote fields with delimiters/quotes, double inner quotes).
    expect(writeWideCsv(m)).toBe('row,alpha,beta\r\nann,4,\r\n"b,o""b",2.5,1\r\n');
    expect(quoteField(' x', ',')).toBe('" x"');
    expect(quoteField('a;b', ',')).toBe('a;b');
    expect(quoteField('a;b', ';')).toBe('"a;b"');
  });

  it('formats numbers shortest-round-trip by default, fixed decimals on request', () => {
    // Source: ECMAScript Number::toString (shortest round-trip digits).
    expect(formatNumber(0.1 + 0.2)).toBe('0.30000000000000004');
    expect(formatNumber(0.1 + 0.2, { decimals: 2 })).toBe('0.30');
    expect(formatNumber(-0)).toBe('0');
    expect(formatNumber(2.5, { delimiter: ';', decimalComma: true })).toBe('2,5');
    expect(formatNumber(NaN)).toBe('');
  });

  it('long form skips blanks unless asked, and a layer replaces the value source', () => {
    expect(writeLongCsv(m, { lineEnding: '\n' })).toBe(
      'row,column,value\nann,alpha,4\n"b,o""b",alpha,2.5\n"b,o""b",beta,1\n',
    );
    const filled = writeWideCsv(m, { layer: (i, j) => i * 10 + j, decimals: 1, lineEnding: '\n' });
    expect(filled).toBe('row,alpha,beta\nann,0.0,1.0\n"b,o""b",10.0,11.0\n');
  });

  it('extended long form marks observed and filled cells', () => {
    const text = writeFilledLongCsv(
      m,
      { predictions: [4.2, 3.1, 2.4, 1.2], baseline: [3, 3, 2, 2], spread: [0.1, NaN, 0.2, 0.3] },
      { lineEnding: '\n' },
    );
    expect(text.split('\n')).toEqual([
      'row,column,value,source,baseline,spread',
      'ann,alpha,4,observed,3,0.1',
      'ann,beta,3.1,filled,3,',
      '"b,o""b",alpha,2.5,observed,2,0.2',
      '"b,o""b",beta,1,observed,2,0.3',
      '',
    ]);
  });

  it('detects the largest dividing step', () => {
    // Source: arithmetic (divisibility of each value by the step).
    expect(detectScale([1, 2, 5])).toEqual({ min: 1, max: 5, step: 1 });
    expect(detectScale([0.5, 4.5, NaN])).toEqual({ min: 0.5, max: 4.5, step: 0.5 });
    expect(detectScale([0.25, 1])).toEqual({ min: 0.25, max: 1, step: 0.25 });
    expect(detectScale([0.3, 7.1])).toEqual({ min: 0.3, max: 7.1, step: 0.1 });
    expect(detectScale([0.25, 0.3])).toEqual({ min: 0.25, max: 0.3, step: 0.01 });
    expect(detectScale([Math.PI])).toEqual({ min: Math.PI, max: Math.PI, step: 0 });
    expect(detectScale([NaN])).toBeUndefined();
  });
});
