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
