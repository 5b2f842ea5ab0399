/**
 * Valid variants in test/fixtures/good/: each opens with the expected labels,
 * values (NaN = blank) and detected settings. Expected values are read by hand
 * from each fixture's bytes.
 */
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { formatProblem } from '../../../src-shared/io/problem';
import { importDelimitedFile } from '../../../src-main/services/projectStore';

const GOOD = path.resolve(__dirname, '../../fixtures/good');

interface Case {
  file: string;
  rows: string[];
  cols: string[];
  values: number[];
  delimiter: string;
  layout: 'wide' | 'long';
  decimalComma?: boolean;
  hadBom?: boolean;
  warnings?: string[];
  scale: { min: number; max: number; step: number };
}

const CASES: Case[] = [
  {
    file: 'bom.csv',
    rows: ['ann', 'bob'],
    cols: ['alpha', 'beta'],
    values: [4, 3, NaN, 1],
    delimiter: ',',
    layout: 'wide',
    hadBom: true,
    scale: { min: 1, max: 4, step: 1 },
  },
  {
    file: 'tabs.tsv',
    rows: ['ann', 'bob'],
    cols: ['alpha', 'beta', 'gamma'],
    values: [4, NaN, 5, 2, 1, NaN],
    delimiter: '\t',
    layout: 'wide',
    scale: { min: 1, max: 5, step: 1 },
  },
  {
    file: 'semicolon-decimal-comma.csv',
    rows: ['ann', 'bob'],
    cols: ['alpha', 'beta'],
    values: [4.5, 3, NaN, 1.5],
    delimiter: ';',
    layout: 'wide',
    decimalComma: true,
    scale: { min: 1.5, max: 4.5, step: 0.5 },
  },
  {
    file: 'long.csv',
    rows: ['ann', 'bob', 'cid'],
    cols: ['alpha', 'beta'],
    values: [4, 3, 2, NaN, NaN, NaN],
    delimiter: ',',
    layout: 'long',
    scale: { min: 2, max: 4, step: 1 },
  },
  {
    file: 'quoted-labels.csv',
    rows: ['ann, jr', ' bob '],
    cols: ['alpha "A"', 'beta\nB'],
    values: [4, 3, NaN, 1],
    delimiter: ',',
    layout: 'wide',
    scale: { min: 1, max: 4, step: 1 },
  },
  {
    file: 'long-extra-columns.csv',
    rows: ['1', '2'],
    cols: ['10', '20'],
    values: [4, 3.5, 5, NaN],
    delimiter: ',',
    layout: 'long',
    scale: { min: 3.5, max: 5, step: 0.5 },
    warnings: [
      'long-extra-columns.csv:1:4: long layout uses the first 3 fields (row, column, value); ignored 1 more field(s) per line',
    ],
  },
  {
    file: 'trailing-delimiter.csv',
    rows: ['ann', 'bob'],
    cols: ['alpha', 'beta'],
    values: [4, 3, 2, 1],
    delimiter: ',',
    layout: 'wide',
    scale: { min: 1, max: 4, step: 1 },
    warnings: ['trailing-delimiter.csv:1:4: ignored a column with an empty label and no values'],
  },
];

describe('good fixtures', () => {
  it.each(CASES.map((c) => [c.file, c] as const))('%s opens as expected', async (_name, c) => {
    const r = await importDelimitedFile(path.join(GOOD, c.file));
    if (!r.ok) throw new Error(r.problems.map(formatProblem).join('\n'));
    expect(r.matrix.rowLabels).toEqual(c.rows);
    expect(r.matrix.colLabels).toEqual(c.cols);
    expect(Array.from(r.matrix.values)).toEqual(c.values);
    expect(r.info.delimiter).toBe(c.delimiter);
    expect(r.info.layout).toBe(c.layout);
    expect(r.info.decimalComma).toBe(c.decimalComma ?? false);
    expect(r.info.hadBom).toBe(c.hadBom ?? false);
    expect(r.info.detectedScale).toEqual(c.scale);
    expect(r.warnings.map(formatProblem)).toEqual(c.warnings ?? []);
  });
});
