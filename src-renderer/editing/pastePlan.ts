/**
 * What pasting a tab-separated block at a cell would do: the cells it sets, how
 * many observed values it would overwrite with a different value, and every
 * entry refused by the scale. Nothing is applied here; the caller asks the user
 * when `overwrites > 0` and applies `indices`/`values` as one undoable change.
 */
import type { RatingMatrix } from '../../src-shared/matrix/ratingMatrix';
import { parseEntry } from '../grid/cellText';
import { parseTabBlock } from './tabText';

export interface RefusedEntry {
  row: number;
  col: number;
  text: string;
  reason: string;
}

export type PastePlan =
  | {
      ok: true;
      rows: number;
      cols: number;
      indices: Int32Array;
      values: Float64Array;
      /** Cells whose value actually changes. */
      changes: number;
      /** Observed cells that would get a different value or become blank. */
      overwrites: number;
    }
  | { ok: false; message: string; refused: RefusedEntry[] };

export function planPaste(m: RatingMatrix, text: string, anchorRow: number, anchorCol: number): PastePlan {
  const block = parseTabBlock(text);
  const rows = block.length;
  const cols = block.reduce((n, r) => Math.max(n, r.length), 0);
  if (rows === 0 || cols === 0) return { ok: false, message: 'the clipboard holds no cells to paste', refused: [] };
  const nr = m.rowLabels.length;
  const nc = m.colLabels.length;
  if (anchorRow < 0 || anchorCol < 0 || anchorRow >= nr || anchorCol >= nc) {
    return { ok: false, message: 'choose a cell to paste at first', refused: [] };
  }
  if (anchorRow + rows > nr || anchorCol + cols > nc) {
    return {
      ok: false,
      message: `the pasted block is ${rows} × ${cols} but from ${m.rowLabels[anchorRow]} × ${m.colLabels[anchorCol]} only ${nr - anchorRow} rows and ${nc - anchorCol} columns remain; add rows or columns first`,
      refused: [],
    };
  }
  const indices = new Int32Array(rows * cols);
  const values = new Float64Array(rows * cols);
  const refused: RefusedEntry[] = [];
  let changes = 0;
  let overwrites = 0;
  let k = 0;
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const i = anchorRow + r;
      const j = anchorCol + c;
      const cellText = block[r][c] ?? '';
      const entry = parseEntry(cellText, m.scale);
      const idx = i * nc + j;
      if (entry.kind === 'refused') {
        refused.push({ row: i, col: j, text: cellText, reason: entry.reason });
        continue;
      }
      const v = entry.kind === 'missing' ? NaN : entry.value;
      const old = m.values[idx];
      if (!Object.is(old, v)) {
        changes++;
        if (!Number.isNaN(old)) overwrites++;
      }
      indices[k] = idx;
      values[k] = v;
      k++;
    }
  }
  if (refused.length > 0) {
    return {
      ok: false,
      message: `${refused.length} pasted ${refused.length === 1 ? 'entry was' : 'entries were'} refused; nothing was pasted`,
      refused,
    };
  }
  return { ok: true, rows, cols, indices, values, changes, overwrites };
}

/** One line per refused entry: "Row × Column: reason". */
export function describeRefused(m: RatingMatrix, refused: readonly RefusedEntry[], limit = 20): string[] {
  const lines = refused.slice(0, limit).map((r) => `${m.rowLabels[r.row]} × ${m.colLabels[r.col]}: ${r.reason}`);
  if (refused.length > limit) lines.push(`and ${refused.length - limit} more`);
  return lines;
}
