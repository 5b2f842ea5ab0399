/**
 * The open document in the page: the observed matrix, its title and source,
 * and the history of changes for undo/redo. Model output is never stored here
 * (see state/runStore.ts); a fit reads a snapshot of this matrix.
 *
 * History entries are either a patch of cells (typing, clearing, pasting:
 * cheap, stores only the touched cells) or a whole-matrix swap (row/column
 * operations, transposition, scale changes: the matrices are small).
 */
import type { FitSettings } from '../../src-shared/engine/types';
import { cloneMatrix, type RatingMatrix } from '../../src-shared/matrix/ratingMatrix';
import { newProjectDocument, type ProjectDocument, type SavedRun } from '../../src-shared/project/projectDocument';

/**
 * The parts of a project file that are not the matrix (model settings, saved
 * runs, notes). Other panels (the model and runs panels) read and write these;
 * `contribute` hooks let them fill in their current state just before a save
 * and take it back after an open.
 */
export interface ProjectParts {
  settings: FitSettings | null;
  runs: SavedRun[];
  notes: string;
  createdAt: string;
}

export interface ProjectContributor {
  /** Called before a save or recovery snapshot: write your state into `parts`. */
  collect?(parts: ProjectParts): void;
  /** Called after a project was opened or restored. */
  load?(parts: Readonly<ProjectParts>): void;
}

interface CellPatch {
  kind: 'cells';
  label: string;
  indices: Int32Array;
  before: Float64Array;
  after: Float64Array;
}

interface MatrixSwap {
  kind: 'matrix';
  label: string;
  before: RatingMatrix;
  after: RatingMatrix;
  /** Layout ids before and after (equal when the swap keeps every cell where it was). */
  beforeLayout: number;
  afterLayout: number;
}

export type Change = CellPatch | MatrixSwap;

export type DocumentEvent =
  { type: 'replaced' } | { type: 'cells'; indices: Int32Array } | { type: 'shape' } | { type: 'history' };

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
  /** Bumped when another data set is opened (sample, import, project, restore). */
  dataSet = 0;
  /**
   * Which arrangement of cells the matrix has: a new id when another data set is
   * opened or rows/columns are added, deleted, moved, sorted or swapped; undo and
   * redo bring the earlier id back. Cell edits, renames and scale changes keep it.
   * A run is drawn only on the layout it was computed on (runs/runMatch.ts).
   */
  layout = 0;
  private layoutSeq = 0;
  title = 'Untitled';
  source: DocumentSource = { kind: 'new', name: '' };
  /** Revision at the last save (or open); differs from `revision` when there are unsaved changes. */
  savedRevision = 0;
  /** The project file this document was opened from or last saved to; null when never saved. */
  filePath: string | null = null;
  /** Settings, saved runs and notes that travel with the project file. */
  parts: ProjectParts = { settings: null, runs: [], notes: '', createdAt: new Date().toISOString() };
  private readonly contributors = new Set<ProjectContributor>();
  private readonly seqOf = new WeakMap<Change, number>();
  private nextSeq = 1;
  private savedSeq = 0;
  private forcedDirty = false;

  constructor(matrix: RatingMatrix) {
    this.matrix = matrix;
  }

  get current(): RatingMatrix {
    return this.matrix;
  }

  /** Unsaved changes: the history position differs from the one saved (undoing back to it makes the document clean again). */
  get dirty(): boolean {
    return this.forcedDirty || this.topSeq() !== this.savedSeq;
  }

  private topSeq(): number {
    return this.undoStack.length ? (this.seqOf.get(this.undoStack[this.undoStack.length - 1]) ?? -1) : 0;
  }

  subscribe(listener: (e: DocumentEvent) => void): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  private emit(e: DocumentEvent): void {
    for (const l of this.listeners) l(e);
  }

  /** Open a different document: history starts afresh. */
  replace(
    matrix: RatingMatrix,
    title: string,
    source: DocumentSource,
    filePath: string | null = null,
    parts?: ProjectParts,
  ): void {
    this.matrix = matrix;
    this.filePath = filePath;
    this.parts = parts ?? { settings: null, runs: [], notes: '', createdAt: new Date().toISOString() };
    for (const c of this.contributors) c.load?.(this.parts);
    this.title = title;
    this.source = source;
    this.undoStack = [];
    this.redoStack = [];
    this.dataSet++;
    this.layout = ++this.layoutSeq;
    this.revision++;
    this.savedRevision = this.revision;
    this.savedSeq = 0;
    this.forcedDirty = false;
    this.emit({ type: 'replaced' });
    this.emit({ type: 'history' });
  }

  /** After a save: the document is clean; the undo/redo history stays (it survives a save). */
  markSaved(filePath?: string): void {
    if (filePath !== undefined) this.filePath = filePath;
    this.savedRevision = this.revision;
    this.savedSeq = this.topSeq();
    this.forcedDirty = false;
    this.emit({ type: 'history' });
  }

  /** Mark the document as changed without an undoable edit (e.g. restored from a recovery file). */
  markUnsaved(): void {
    this.forcedDirty = true;
    if (this.savedRevision === this.revision) this.savedRevision = -1;
    this.emit({ type: 'history' });
  }

  addContributor(c: ProjectContributor): () => void {
    this.contributors.add(c);
    return () => this.contributors.delete(c);
  }

  /** Open a project document: matrix, settings, runs and notes; history starts afresh. */
  replaceProject(doc: ProjectDocument, title: string, source: DocumentSource, filePath: string | null): void {
    const parts = { settings: doc.settings, runs: doc.runs.slice(), notes: doc.notes, createdAt: doc.createdAt };
    this.replace(cloneMatrix(doc.matrix), title, source, filePath, parts);
  }

  /** The current document as a project (a copy), after every contributor has added its state. */
  toProject(now: Date = new Date()): ProjectDocument {
    const parts: ProjectParts = { ...this.parts, runs: this.parts.runs.slice() };
    for (const c of this.contributors) c.collect?.(parts);
    this.parts = parts;
    const doc = newProjectDocument(cloneMatrix(this.matrix), now);
    return { ...doc, settings: parts.settings, runs: parts.runs, notes: parts.notes, createdAt: parts.createdAt };
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

  /**
   * Replace the whole matrix (shape or labels change) as one undoable change.
   * `keepsCells`: every cell stays at its row and column (renames, scale changes).
   */
  swapMatrix(label: string, next: RatingMatrix, opts: { keepsCells?: boolean } = {}): void {
    const afterLayout = opts.keepsCells ? this.layout : ++this.layoutSeq;
    this.apply({
      kind: 'matrix',
      label,
      before: cloneMatrix(this.matrix),
      after: cloneMatrix(next),
      beforeLayout: this.layout,
      afterLayout,
    });
  }

  private apply(change: Change): void {
    this.seqOf.set(change, this.nextSeq++);
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
      this.layout = c.afterLayout;
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
      this.layout = c.beforeLayout;
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
