/**
 * Copies of the engine's sparse storage and fold labels into SharedArrayBuffers, made once
 * per job: every task message then shares the same memory with the pool's workers.
 */
import type { SparseMatrix, SparseRatings } from '../../src-shared/matrix/sparseRatings';
import type { Folds } from '../../src-shared/engine/crossValidation';

function sharedInt(a: Int32Array): Int32Array {
  const out = new Int32Array(new SharedArrayBuffer(Math.max(a.byteLength, 4)), 0, a.length);
  out.set(a);
  return out;
}

function sharedFloat(a: Float64Array): Float64Array {
  const out = new Float64Array(new SharedArrayBuffer(Math.max(a.byteLength, 8)), 0, a.length);
  out.set(a);
  return out;
}

export function shareSparse(m: SparseMatrix): SparseMatrix {
  const d = m.data;
  const data: SparseRatings = {
    rows: d.rows,
    cols: d.cols,
    n: d.n,
    rowPtr: sharedInt(d.rowPtr),
    rowCol: sharedInt(d.rowCol),
    rowVal: sharedFloat(d.rowVal),
    colPtr: sharedInt(d.colPtr),
    colRow: sharedInt(d.colRow),
    colVal: sharedFloat(d.colVal),
    colEntry: sharedInt(d.colEntry),
  };
  return { rowLabels: m.rowLabels, colLabels: m.colLabels, scale: m.scale, data };
}

export function shareFolds(f: Folds): Folds {
  return { k: f.k, seed: f.seed, sizes: f.sizes.slice(), foldOf: sharedInt(f.foldOf) };
}
