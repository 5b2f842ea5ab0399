/** The two project versions the crash test alternates between (different sizes on purpose). */
import type { ProjectDocument } from '../../../../src-shared/project/projectDocument';

export function crashTestVersion(which: 0 | 1 | number): ProjectDocument {
  const rows = which === 0 ? 40 : 120;
  const cols = 30;
  const values = new Float64Array(rows * cols);
  for (let k = 0; k < values.length; k++) values[k] = k % 7 === 0 ? NaN : ((k * (which + 3)) % 9) * 0.5 + 0.5;
  return {
    matrix: {
      rowLabels: Array.from({ length: rows }, (_, i) => `rater ${which}-${i}`),
      colLabels: Array.from({ length: cols }, (_, j) => `item ${j}`),
      values,
      scale: { min: 0.5, max: 5, step: 0.5 },
    },
    settings: null,
    runs: [],
    notes: `version ${which}`,
    createdAt: '2026-01-01T00:00:00.000Z',
    modifiedAt: '2026-01-01T00:00:00.000Z',
  };
}

/** The two export texts the crash test alternates between (a header line naming the version; different sizes). */
export function crashExportText(which: 0 | 1 | number): string {
  const lines = [`row,version ${which}`];
  for (let i = 0; i < (which === 0 ? 3000 : 9000); i++) lines.push(`r${i},${(i * (which + 3)) % 9}`);
  return lines.join('\r\n') + '\r\n';
}

/** The two CLI inputs (wide CSV): their fills differ in every row. */
export function crashCliInput(which: 0 | 1 | number): string {
  const rows = which === 0 ? 40 : 120;
  const lines = ['row,a,b,c,d'];
  for (let i = 0; i < rows; i++)
    lines.push(`r${i},${1 + (i % 5)},${1 + ((i + which) % 5)},${i % 3 === 0 ? '' : 2 + which},${1 + ((i * 7) % 5)}`);
  return lines.join('\n') + '\n';
}
