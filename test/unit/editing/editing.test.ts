import { describe, expect, it } from 'vitest';
import type { RatingMatrix } from '../../../src-shared/matrix/ratingMatrix';
import {
  deleteColumns,
  deleteRows,
  freshLabel,
  insertColumn,
  insertRow,
  moveColumn,
  moveRow,
  renameColumn,
  renameRow,
  sortRows,
  transpose,
} from '../../../src-renderer/editing/matrixOps';
import { planPaste } from '../../../src-renderer/editing/pastePlan';
import { applyScale, scaleProblem, valuesOutside } from '../../../src-renderer/editing/scaleChange';
import { formatTabBlock, parseTabBlock } from '../../../src-renderer/editing/tabText';

const N = NaN;
/** 3 × 2 matrix, 1–5 scale:  a: 1 _ / b: 5 2 / c: _ 4 */
function sample(): RatingMatrix {
  return {
    rowLabels: ['a', 'b', 'c'],
    colLabels: ['x', 'y'],
    values: Float64Array.from([1, N, 5, 2, N, 4]),
    scale: { min: 1, max: 5, step: 1 },
  };
}
const vals = (m: RatingMatrix) => Array.from(m.values, (v) => (Number.isNaN(v) ? null : v));
function ok<T extends { ok: boolean }>(r: T): Extract<T, { ok: true }> {
  if (!r.ok) throw new Error(JSON.stringify(r));
  return r as Extract<T, { ok: true }>;
}

describe('tab-separated clipboard text', () => {
  // Source: the text/plain clipboard form spreadsheets write (cells split by TAB, rows by CR LF or LF,
  // quoting as in RFC 4180 for cells holding tabs, line breaks or quotes) — common practice.
  it('splits rows and cells; a final line break is not an extra row', () => {
    expect(parseTabBlock('1\t2\r\n3\t\n')).toEqual([
      ['1', '2'],
      ['3', ''],
    ]);
    expect(parseTabBlock('4')).toEqual([['4']]);
    expect(parseTabBlock('')).toEqual([]);
  });
  it('reads quoted cells holding tabs, line breaks and doubled quotes', () => {
    expect(parseTabBlock('"a\tb"\t"say ""hi"""\n"two\nlines"\tz\n')).toEqual([
      ['a\tb', 'say "hi"'],
      ['two\nlines', 'z'],
    ]);
  });
  it('format then parse returns the same cells', () => {
    const rows = [
      ['plain', 'with\ttab', ''],
      ['quote "q"', 'line\nbreak', '3.5'],
    ];
    expect(parseTabBlock(formatTabBlock(rows))).toEqual(rows);
  });
});

describe('paste plan', () => {
  it('sets a block at the anchor and counts observed values overwritten', () => {
    const m = sample();
    const plan = ok(planPaste(m, '3\t4\n\t5\n', 0, 0));
    expect(plan.rows).toBe(2);
    expect(plan.cols).toBe(2);
    expect(Array.from(plan.indices)).toEqual([0, 1, 2, 3]);
    expect(Array.from(plan.values, (v) => (Number.isNaN(v) ? null : v))).toEqual([3, 4, null, 5]);
    // (0,0) 1→3, (0,1) blank→4, (1,0) 5→blank, (1,1) 2→5: 4 changes, 3 of them hit observed values.
    expect(plan.changes).toBe(4);
    expect(plan.overwrites).toBe(3);
  });
  it('counts no overwrite when pasting the same values or into blanks', () => {
    const plan = ok(planPaste(sample(), '5\t2\n\t4', 1, 0));
    expect(plan.changes).toBe(0);
    expect(plan.overwrites).toBe(0);
  });
  it('refuses the whole paste and lists every entry outside the scale or not a number', () => {
    const r = planPaste(sample(), '3\t9\nabc\t2', 0, 0);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.refused.map((e) => [e.row, e.col, e.text])).toEqual([
      [0, 1, '9'],
      [1, 0, 'abc'],
    ]);
    expect(r.refused[0].reason).toContain('1–5');
  });
  it('refuses a block that runs past the edge instead of dropping cells', () => {
    const r = planPaste(sample(), '1\t2\t3', 0, 0);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toContain('1 × 3');
  });
});

describe('row and column operations', () => {
  it('inserts a blank row and column at the given place', () => {
    const m = ok(insertRow(sample(), 1, 'new')).matrix;
    expect(m.rowLabels).toEqual(['a', 'new', 'b', 'c']);
    expect(vals(m)).toEqual([1, null, null, null, 5, 2, null, 4]);
    const m2 = ok(insertColumn(sample(), 2, 'z')).matrix;
    expect(m2.colLabels).toEqual(['x', 'y', 'z']);
    expect(vals(m2)).toEqual([1, null, null, 5, 2, null, null, 4, null]);
  });
  it('refuses duplicate and empty labels with a message', () => {
    const r = insertRow(sample(), 0, 'b');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toContain('already a row labelled “b”');
    expect(renameColumn(sample(), 0, 'y').ok).toBe(false);
    expect(renameColumn(sample(), 0, '   ').ok).toBe(false);
    // Renaming to its own name is allowed.
    expect(ok(renameColumn(sample(), 0, 'x')).matrix.colLabels).toEqual(['x', 'y']);
  });
  it('renames without touching values', () => {
    const m = ok(renameRow(sample(), 2, ' gamma ')).matrix;
    expect(m.rowLabels).toEqual(['a', 'b', 'gamma']);
    expect(vals(m)).toEqual(vals(sample()));
  });
  it('deletes rows and columns but keeps at least one of each', () => {
    const m = ok(deleteRows(sample(), [0, 2])).matrix;
    expect(m.rowLabels).toEqual(['b']);
    expect(vals(m)).toEqual([5, 2]);
    const m2 = ok(deleteColumns(sample(), [0])).matrix;
    expect(vals(m2)).toEqual([null, 2, 4]);
    expect(deleteRows(sample(), [0, 1, 2]).ok).toBe(false);
  });
  it('moves rows and columns with their values', () => {
    const m = ok(moveRow(sample(), 2, -2)).matrix;
    expect(m.rowLabels).toEqual(['c', 'a', 'b']);
    expect(vals(m)).toEqual([null, 4, 1, null, 5, 2]);
    const m2 = ok(moveColumn(sample(), 0, 1)).matrix;
    expect(m2.colLabels).toEqual(['y', 'x']);
    expect(vals(m2)).toEqual([null, 1, 2, 5, 4, null]);
    expect(moveRow(sample(), 0, -1).ok).toBe(false);
  });
  it('sorts rows by label in natural order and by a column with blanks last', () => {
    const m: RatingMatrix = {
      rowLabels: ['Row 10', 'Row 2', 'row 1'],
      colLabels: ['v'],
      values: Float64Array.from([3, N, 1]),
      scale: { min: 1, max: 5, step: 1 },
    };
    // Source: natural ("numeric") collation as in Intl.Collator with numeric: true (ECMA-402).
    expect(sortRows(m, { by: 'label' }).rowLabels).toEqual(['row 1', 'Row 2', 'Row 10']);
    expect(sortRows(m, { by: 'label' }, 'desc').rowLabels).toEqual(['Row 10', 'Row 2', 'row 1']);
    const byV = sortRows(m, { by: 'column', col: 0 });
    expect(byV.rowLabels).toEqual(['row 1', 'Row 10', 'Row 2']);
    expect(vals(byV)).toEqual([1, 3, null]);
    expect(sortRows(m, { by: 'column', col: 0 }, 'desc').rowLabels).toEqual(['Row 10', 'row 1', 'Row 2']);
  });
  it('transposes: (i, j) moves to (j, i), and twice gives the original', () => {
    // Source: definition of the matrix transpose, (Aᵀ)ᵢⱼ = Aⱼᵢ and (Aᵀ)ᵀ = A.
    const t = transpose(sample());
    expect(t.rowLabels).toEqual(['x', 'y']);
    expect(t.colLabels).toEqual(['a', 'b', 'c']);
    expect(vals(t)).toEqual([1, 5, null, null, 2, 4]);
    const back = transpose(t);
    expect(back.rowLabels).toEqual(['a', 'b', 'c']);
    expect(vals(back)).toEqual(vals(sample()));
  });
  it('fresh labels skip names in use', () => {
    expect(freshLabel(['Row 4', 'Row 5'], 'Row')).toBe('Row 3');
    expect(freshLabel(['Row 3'], 'Row', 3)).toBe('Row 4');
  });
});

describe('scale change', () => {
  it('lists values outside the new scale and clears exactly those', () => {
    const s = { min: 2, max: 4, step: 0.5 };
    expect(valuesOutside(sample(), s)).toEqual([
      { row: 0, col: 0, value: 1 },
      { row: 1, col: 0, value: 5 },
    ]);
    const r = applyScale(sample(), s);
    expect(r.cleared).toBe(2);
    expect(vals(r.matrix)).toEqual([null, null, null, 2, null, 4]);
    expect(r.matrix.scale).toEqual(s);
  });
  it('a wider scale changes no value', () => {
    expect(valuesOutside(sample(), { min: 0, max: 10, step: 0.1 })).toEqual([]);
    expect(vals(applyScale(sample(), { min: 0, max: 10, step: 0.1 }).matrix)).toEqual(vals(sample()));
  });
  it('refuses impossible scales', () => {
    expect(scaleProblem({ min: 5, max: 1, step: 1 })).toContain('greater');
    expect(scaleProblem({ min: 1, max: 5, step: -1 })).toContain('negative');
    expect(scaleProblem({ min: 0.5, max: 5, step: 0.5 })).toBeUndefined();
  });
});
