/**
 * Row and column operations on a rating matrix. Each returns a NEW matrix (the
 * caller records it as one undoable change) or a refusal with a message for the
 * user; the input is never modified. Labels stay unique and non-empty.
 */
import type { RatingMatrix } from '../../src-shared/matrix/ratingMatrix';

export type OpResult = { ok: true; matrix: RatingMatrix } | { ok: false; message: string };

const refuse = (message: string): OpResult => ({ ok: false, message });

/** A label not yet used: `${base} ${n}` with the smallest n ≥ start. */
export function freshLabel(existing: readonly string[], base: string, start = existing.length + 1): string {
  const used = new Set(existing);
  for (let n = Math.max(1, start); ; n++) {
    const candidate = `${base} ${n}`;
    if (!used.has(candidate)) return candidate;
  }
}

/** Why a label cannot be used (empty, too long or a duplicate), or undefined when it can. */
export function labelProblem(label: string, others: readonly string[], what: 'row' | 'column'): string | undefined {
  const t = label.trim();
  if (t === '') return `a ${what} label cannot be empty`;
  if (t.length > 200) return `a ${what} label can have at most 200 characters`;
  if (others.includes(t)) return `there is already a ${what} labelled “${t}”; labels must be unique`;
  return undefined;
}

function build(
  m: RatingMatrix,
  rowLabels: string[],
  colLabels: string[],
  get: (i: number, j: number) => number,
): RatingMatrix {
  const rows = rowLabels.length;
  const cols = colLabels.length;
  const values = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) values[i * cols + j] = get(i, j);
  return { rowLabels, colLabels, values, scale: { ...m.scale } };
}

const at = (m: RatingMatrix, i: number, j: number) => m.values[i * m.colLabels.length + j];

/** Insert a blank row before index `at` (at = rows appends). */
export function insertRow(m: RatingMatrix, index: number, label: string): OpResult {
  const problem = labelProblem(label, m.rowLabels, 'row');
  if (problem) return refuse(problem);
  if (index < 0 || index > m.rowLabels.length) return refuse('no such row position');
  const rowLabels = [...m.rowLabels.slice(0, index), label.trim(), ...m.rowLabels.slice(index)];
  return {
    ok: true,
    matrix: build(m, rowLabels, m.colLabels.slice(), (i, j) =>
      i < index ? at(m, i, j) : i === index ? NaN : at(m, i - 1, j),
    ),
  };
}

/** Insert a blank column before index `at` (at = cols appends). */
export function insertColumn(m: RatingMatrix, index: number, label: string): OpResult {
  const problem = labelProblem(label, m.colLabels, 'column');
  if (problem) return refuse(problem);
  if (index < 0 || index > m.colLabels.length) return refuse('no such column position');
  const colLabels = [...m.colLabels.slice(0, index), label.trim(), ...m.colLabels.slice(index)];
  return {
    ok: true,
    matrix: build(m, m.rowLabels.slice(), colLabels, (i, j) =>
      j < index ? at(m, i, j) : j === index ? NaN : at(m, i, j - 1),
    ),
  };
}

export function deleteRows(m: RatingMatrix, indices: readonly number[]): OpResult {
  const drop = new Set(indices.filter((i) => i >= 0 && i < m.rowLabels.length));
  if (drop.size === 0) return refuse('no rows chosen');
  if (drop.size >= m.rowLabels.length) return refuse('a project keeps at least one row');
  const keep = m.rowLabels.map((_, i) => i).filter((i) => !drop.has(i));
  return {
    ok: true,
    matrix: build(
      m,
      keep.map((i) => m.rowLabels[i]),
      m.colLabels.slice(),
      (i, j) => at(m, keep[i], j),
    ),
  };
}

export function deleteColumns(m: RatingMatrix, indices: readonly number[]): OpResult {
  const drop = new Set(indices.filter((j) => j >= 0 && j < m.colLabels.length));
  if (drop.size === 0) return refuse('no columns chosen');
  if (drop.size >= m.colLabels.length) return refuse('a project keeps at least one column');
  const keep = m.colLabels.map((_, j) => j).filter((j) => !drop.has(j));
  return {
    ok: true,
    matrix: build(
      m,
      m.rowLabels.slice(),
      keep.map((j) => m.colLabels[j]),
      (i, j) => at(m, i, keep[j]),
    ),
  };
}

export function renameRow(m: RatingMatrix, index: number, label: string): OpResult {
  if (index < 0 || index >= m.rowLabels.length) return refuse('no such row');
  const problem = labelProblem(
    label,
    m.rowLabels.filter((_, i) => i !== index),
    'row',
  );
  if (problem) return refuse(problem);
  const rowLabels = m.rowLabels.slice();
  rowLabels[index] = label.trim();
  return {
    ok: true,
    matrix: { rowLabels, colLabels: m.colLabels.slice(), values: new Float64Array(m.values), scale: { ...m.scale } },
  };
}

export function renameColumn(m: RatingMatrix, index: number, label: string): OpResult {
  if (index < 0 || index >= m.colLabels.length) return refuse('no such column');
  const problem = labelProblem(
    label,
    m.colLabels.filter((_, j) => j !== index),
    'column',
  );
  if (problem) return refuse(problem);
  const colLabels = m.colLabels.slice();
  colLabels[index] = label.trim();
  return {
    ok: true,
    matrix: { rowLabels: m.rowLabels.slice(), colLabels, values: new Float64Array(m.values), scale: { ...m.scale } },
  };
}

/** Rows in a new order: `order[k]` is the old index of the row placed at k (a permutation). */
function reorderRows(m: RatingMatrix, order: readonly number[]): RatingMatrix {
  return build(
    m,
    order.map((i) => m.rowLabels[i]),
    m.colLabels.slice(),
    (i, j) => at(m, order[i], j),
  );
}

function reorderColumns(m: RatingMatrix, order: readonly number[]): RatingMatrix {
  return build(
    m,
    m.rowLabels.slice(),
    order.map((j) => m.colLabels[j]),
    (i, j) => at(m, i, order[j]),
  );
}

function moveOrder(n: number, index: number, delta: number): number[] | undefined {
  const to = index + delta;
  if (index < 0 || index >= n || to < 0 || to >= n || delta === 0) return undefined;
  const order = Array.from({ length: n }, (_, k) => k);
  order.splice(index, 1);
  order.splice(to, 0, index);
  return order;
}

/** Move row `index` by `delta` places (−1 = up). */
export function moveRow(m: RatingMatrix, index: number, delta: number): OpResult {
  const order = moveOrder(m.rowLabels.length, index, delta);
  return order
    ? { ok: true, matrix: reorderRows(m, order) }
    : refuse(delta < 0 ? 'this row is already at the top' : 'this row is already at the bottom');
}

export function moveColumn(m: RatingMatrix, index: number, delta: number): OpResult {
  const order = moveOrder(m.colLabels.length, index, delta);
  return order
    ? { ok: true, matrix: reorderColumns(m, order) }
    : refuse(delta < 0 ? 'this column is already first' : 'this column is already last');
}

export type RowSortKey = { by: 'label' } | { by: 'column'; col: number };

const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

/**
 * Rows sorted by label (natural order: "Row 2" before "Row 10") or by one
 * column's values. Stable; blank cells always sort last, whatever the direction.
 */
export function sortRows(m: RatingMatrix, key: RowSortKey, direction: 'asc' | 'desc' = 'asc'): RatingMatrix {
  const sign = direction === 'asc' ? 1 : -1;
  const order = m.rowLabels.map((_, i) => i);
  if (key.by === 'label') {
    order.sort((a, b) => sign * collator.compare(m.rowLabels[a], m.rowLabels[b]) || a - b);
  } else {
    const j = key.col;
    order.sort((a, b) => {
      const va = at(m, a, j);
      const vb = at(m, b, j);
      const na = Number.isNaN(va);
      const nb = Number.isNaN(vb);
      if (na || nb) return na === nb ? a - b : na ? 1 : -1;
      return sign * (va - vb) || a - b;
    });
  }
  return reorderRows(m, order);
}

/** Rows become columns: value (i, j) moves to (j, i); labels swap sides. */
export function transpose(m: RatingMatrix): RatingMatrix {
  return build(m, m.colLabels.slice(), m.rowLabels.slice(), (i, j) => at(m, j, i));
}
