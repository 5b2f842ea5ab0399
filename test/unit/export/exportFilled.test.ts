import { createHash } from 'node:crypto';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { fitModel } from '../../../src-shared/engine/fitModel';
import {
  buildExport,
  buildSidecar,
  exportedEstimate,
  matrixFingerprintText,
} from '../../../src-shared/io/exportFilled';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';

const matrix: RatingMatrix = {
  rowLabels: ['Ann, the taster', 'Bo "B"', 'Cy'],
  colLabels: ['x', 'y', 'z', 'w'],
  values: Float64Array.from([5, NaN, 3.5, 1, NaN, 4, 4, NaN, 2, 2.5, NaN, 5]),
  scale: { min: 1, max: 5, step: 0.5 },
};
const result = fitModel(matrix, { ...defaultLowRankSettings(), rank: 1, centering: 'row' });

// Parsed back with papaparse (a general-purpose RFC 4180 reader), not with our own parser.
const parse = (text: string, delimiter = ',') => Papa.parse<string[]>(text.trimEnd(), { delimiter }).data;

describe('exports of the filled matrix', () => {
  it('wide: observed cells unchanged, blanks filled, corner cell says they are estimates', () => {
    const rows = parse(
      buildExport(matrix, result, undefined, {
        kind: 'filled-wide',
        roundToStep: false,
        decimals: null,
        delimiter: ',',
      }),
    );
    expect(rows[0][0]).toContain('model estimates');
    expect(rows[0].slice(1)).toEqual(['x', 'y', 'z', 'w']);
    expect(rows.map((r) => r[0]).slice(1)).toEqual(matrix.rowLabels);
    for (let i = 0; i < 3; i++)
      for (let j = 0; j < 4; j++) {
        const y = matrix.values[i * 4 + j];
        const cell = Number(rows[i + 1][j + 1]);
        if (Number.isNaN(y)) expect(cell).toBeCloseTo(result.predictions[i * 4 + j], 12);
        else expect(cell).toBe(y);
      }
  });

  it('estimates only: observed cells are blank', () => {
    const rows = parse(
      buildExport(matrix, result, undefined, {
        kind: 'estimates-wide',
        roundToStep: true,
        decimals: null,
        delimiter: ';',
      }),
      ';',
    );
    expect(rows[1][1]).toBe('');
    expect(rows[1][2]).not.toBe('');
    // Rounded to the 0.5 step.
    expect((Number(rows[1][2]) * 2) % 1).toBe(0);
  });

  it('long: every cell with its source, baseline and spread; filled cells never unmarked', () => {
    const spread = new Float64Array(12).fill(0.25);
    const rows = parse(
      buildExport(matrix, result, spread, { kind: 'long', roundToStep: false, decimals: 2, delimiter: '\t' }),
      '\t',
    );
    expect(rows[0]).toEqual(['row', 'column', 'value', 'source', 'baseline', 'spread']);
    expect(rows.length - 1).toBe(12);
    const filled = rows.slice(1).filter((r) => r[3] === 'filled');
    expect(filled.length).toBe(4);
    const bo = rows.find((r) => r[0] === 'Bo "B"' && r[1] === 'y')!;
    expect(bo[3]).toBe('observed');
    expect(bo[2]).toBe('4');
    // Decimals apply to filled values only.
    for (const r of filled) expect(r[2]).toMatch(/^-?\d+(\.\d{1,2})?$/);
  });

  it('rounding to the step stays on the scale', () => {
    expect(exportedEstimate(4.8, matrix, { roundToStep: true, decimals: null })).toBe(5);
    expect(exportedEstimate(0.2, matrix, { roundToStep: true, decimals: null })).toBe(1);
    expect(exportedEstimate(3.26, matrix, { roundToStep: false, decimals: 1 })).toBe(3.3);
  });

  it('the sidecar records settings, metrics, the caution and a SHA-256 of the input', () => {
    const sha = createHash('sha256').update(matrixFingerprintText(matrix)).digest('hex');
    const text = buildSidecar({
      app: { name: 'Rankfill', version: '0.1.0' },
      exportedAt: new Date('2026-01-02T03:04:05Z'),
      file: '/tmp/out.csv',
      options: { kind: 'long', roundToStep: false, decimals: null, delimiter: ',' },
      document: { title: 't', rows: 3, cols: 4, observed: 8, filled: 4 },
      settings: result.settings,
      run: { iterations: result.iterations, converged: result.converged, finalObjective: 1, refitsAfterEdits: 0 },
      metrics: null,
      inputSha256: sha,
    });
    const j = JSON.parse(text);
    expect(j.caution).toMatch(/model estimates/);
    expect(j.input.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(j.model.family).toBe('lowrank');
    expect(j.exportedAt).toBe('2026-01-02T03:04:05.000Z');
    // The fingerprint changes when one value changes.
    const other = { ...matrix, values: Float64Array.from(matrix.values) };
    other.values[0] = 4.5;
    expect(matrixFingerprintText(other)).not.toBe(matrixFingerprintText(matrix));
  });
});
