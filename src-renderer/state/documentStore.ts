/**
 * The open document in the page: the observed matrix, its title and source,
 * and the history of changes for undo/redo. Model output is never stored here
 * (see state/runStore.ts); a fit reads a snapshot of this matrix.
 *
 * History entries are either a patch of cells (typing, clearing, pasting:
 * cheap, stores only the touched cells) or a whole-matrix swap (row/column
 * operations, transposition, scale changes: the matrices are small).
 */
import { cloneMatrix, type RatingMatrix } from '../../src-shared/matrix/ratingMatrix';

export interface CellPatch {
  kind: 'cells';
  label: string;
  indices: Int32Array;
  before: Float64Array;
  after: Float64Array;
}

export interface MatrixSwap {
  kind: 'matrix';
  label: string;
  before: RatingMatrix;
  after: RatingMatrix;
}

export type Change = CellPatch | MatrixSwap;

export type DocumentEvent =
  | { type: 'replaced' }
  | { type: 'cells'; indices: Int32Array }
  | { type: 'shape' }
  | { type: 'history' };

export interface DocumentSource {
  kind: 'sample' | 'file' | 'upload' | 'new';
  name: string;
}

export class DocumentStore {
  private matrix: RatingMatrix;
  private undoStack: Change[] = [];
  private redoStack: Change[] = [];
  private readonly listeners = new Set<(e: DocumentEvent) => void>();
  /** Bumped on every change; lets derived views (fits, exports) tell stale from fresh. */
  revision = 0;
  title = 'Untitled';
  source: DocumentSource = { kind: 'new', name: '' };
  /** Revision at the last save (or open); differs from `revision` when there are unsaved changes. */
  savedRevision = 0;

  constructor(matrix: RatingMatrix) {
    this.matrix = matrix;
  }

  get current(): RatingMatrix {
    return this.matrix;
  }

  get dirty(): boolean {
    return this.revision !== this.savedRevision;
  }

  subscribe(listener: (e: DocumentEvent) => void): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  private emit(e: DocumentEvent): void {
    for (const l of this.listeners) l(e);
  }

  /** Open a different document: history starts afresh. */
  replace(matrix: RatingMatrix, title: string, source: DocumentSource): void {
    this.matrix = matrix;
    this.title = title;
    this.source = source;
    this.undoStack = [];
    this.redoStack = [];
    this.revision++;
    this.savedRevision = this.revision;
    this.emit({ type: 'replaced' });
    this.emit({ type: 'history' });
  }

  markSaved(): void {
    this.savedRevision = this.revision;
    this.emit({ type: 'history' });
  }

  /** Set cells (row-major indices) to new values (NaN = missing) as one undoable change. */
  setCells(label: string, indices: ArrayLike<number>, values: ArrayLike<number>): boolean {
    const idx = Int32Array.from(indices);
    const before = new Float64Array(idx.length);
    const after = Float64Array.from(values);
    let changed = false;
    for (let k = 0; k < idx.length; k++) {
      before[k] = this.matrix.values[idx[k]];
      if (!Object.is(before[k], after[k])) changed = true;
    }
    if (!changed) return false;
    this.apply({ kind: 'cells', label, indices: idx, before, after });
    return true;
  }

  /** Replace the whole matrix (shape or labels change) as one undoable change. */
  swapMatrix(label: string, next: RatingMatrix): void {
    this.apply({ kind: 'matrix', label, before: cloneMatrix(this.matrix), after: cloneMatrix(next) });
  }

  private apply(change: Change): void {
    this.redo_(change);
    this.undoStack.push(change);
    this.redoStack = [];
    this.emit({ type: 'history' });
  }

  private redo_(c: Change): void {
    if (c.kind === 'cells') {
      for (let k = 0; k < c.indices.length; k++) this.matrix.values[c.indices[k]] = c.after[k];
      this.revision++;
      this.emit({ type: 'cells', indices: c.indices });
    } else {
      this.matrix = cloneMatrix(c.after);
      this.revision++;
      this.emit({ type: 'shape' });
    }
  }

  private undo_(c: Change): void {
    if (c.kind === 'cells') {
      for (let k = 0; k < c.indices.length; k++) this.matrix.values[c.indices[k]] = c.before[k];
      this.revision++;
      this.emit({ type: 'cells', indices: c.indices });
    } else {
      this.matrix = cloneMatrix(c.before);
      this.revision++;
      this.emit({ type: 'shape' });
    }
  }

  canUndo(): boolean {
    return this.undoStack.length > 0;
  }

  canRedo(): boolean {
    return this.redoStack.length > 0;
  }

  undoLabel(): string | undefined {
    return this.undoStack[this.undoStack.length - 1]?.label;
  }

  redoLabel(): string | undefined {
    return this.redoStack[this.redoStack.length - 1]?.label;
  }

  undo(): boolean {
    const c = this.undoStack.pop();
    if (!c) return false;
    this.undo_(c);
    this.redoStack.push(c);
    this.emit({ type: 'history' });
    return true;
  }

  redo(): boolean {
    const c = this.redoStack.pop();
    if (!c) return false;
    this.redo_(c);
    this.undoStack.push(c);
    this.emit({ type: 'history' });
    return true;
  }
}
