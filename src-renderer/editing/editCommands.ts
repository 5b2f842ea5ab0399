/**
 * The editing commands behind the edit bar, the keyboard and the Electron menu:
 * undo/redo, rows and columns (add, delete, rename, move, sort), transposition
 * and the scale. Each change is one undoable entry in the document store.
 */
import { confirmDialog, promptDialog } from '../dialogs/modal';
import { scaleDialog } from '../dialogs/scaleDialog';
import { describeScale } from '../grid/cellText';
import type { Notice } from '../panels/notice';
import type { DocumentStore } from '../state/documentStore';
import type { CellSelection } from './cellSelection';
import {
  deleteColumns,
  deleteRows,
  freshLabel,
  insertColumn,
  insertRow,
  labelProblem,
  moveColumn,
  moveRow,
  renameColumn,
  renameRow,
  sortRows,
  transpose,
  type OpResult,
} from './matrixOps';
import { applyScale } from './scaleChange';

export interface EditDeps {
  store: DocumentStore;
  selection: CellSelection;
  notice: Notice;
}

export class EditCommands {
  constructor(private readonly d: EditDeps) {}

  private get m() {
    return this.d.store.current;
  }

  /** The focused row/column (top-left of the selection), or the first cell. */
  private here(): { row: number; col: number; r1: number; c1: number } {
    const r = this.d.selection.rect;
    return r ? { row: r.r0, col: r.c0, r1: r.r1, c1: r.c1 } : { row: 0, col: 0, r1: 0, c1: 0 };
  }

  /** `keepsCells`: the change leaves every cell at its row and column (a rename). */
  private commit(label: string, r: OpResult, after?: () => void, keepsCells = false): boolean {
    if (!r.ok) {
      this.d.notice.show(`${label}: ${r.message}.`, 'error');
      return false;
    }
    this.d.store.swapMatrix(label, r.matrix, { keepsCells });
    after?.();
    return true;
  }

  undo(): void {
    const label = this.d.store.undoLabel();
    if (this.d.store.undo()) this.d.notice.show(`Took back: ${label}`, 'info', 2500);
  }

  redo(): void {
    const label = this.d.store.redoLabel();
    if (this.d.store.redo()) this.d.notice.show(`Brought back: ${label}`, 'info', 2500);
  }

  addRow(): void {
    const h = this.here();
    const at = this.m.rowLabels.length ? h.r1 + 1 : 0;
    this.commit('Add row', insertRow(this.m, at, freshLabel(this.m.rowLabels, 'Row')), () =>
      this.d.selection.select(at, h.col),
    );
  }

  addColumn(): void {
    const h = this.here();
    const at = this.m.colLabels.length ? h.c1 + 1 : 0;
    this.commit('Add column', insertColumn(this.m, at, freshLabel(this.m.colLabels, 'Item')), () =>
      this.d.selection.select(h.row, at),
    );
  }

  async deleteRows(): Promise<void> {
    const h = this.here();
    const idx = Array.from({ length: h.r1 - h.row + 1 }, (_, k) => h.row + k);
    const names = idx.map((i) => this.m.rowLabels[i]);
    const ok = await confirmDialog(
      'Delete rows',
      `Delete ${idx.length === 1 ? `the row “${names[0]}”` : `${idx.length} rows (${names[0]} … ${names[names.length - 1]})`} and its ratings? Undo brings it back.`,
      'Delete',
    );
    if (ok) this.commit(idx.length === 1 ? 'Delete row' : `Delete ${idx.length} rows`, deleteRows(this.m, idx));
  }

  async deleteColumns(): Promise<void> {
    const h = this.here();
    const idx = Array.from({ length: h.c1 - h.col + 1 }, (_, k) => h.col + k);
    const names = idx.map((j) => this.m.colLabels[j]);
    const ok = await confirmDialog(
      'Delete columns',
      `Delete ${idx.length === 1 ? `the column “${names[0]}”` : `${idx.length} columns (${names[0]} … ${names[names.length - 1]})`} and its ratings? Undo brings it back.`,
      'Delete',
    );
    if (ok)
      this.commit(idx.length === 1 ? 'Delete column' : `Delete ${idx.length} columns`, deleteColumns(this.m, idx));
  }

  async renameRow(): Promise<void> {
    const { row } = this.here();
    const old = this.m.rowLabels[row];
    if (old === undefined) return;
    const name = await promptDialog({
      title: 'Rename row',
      label: `New label for “${old}”`,
      initial: old,
      confirmLabel: 'Rename',
      check: (v) =>
        labelProblem(
          v,
          this.m.rowLabels.filter((_, i) => i !== row),
          'row',
        ),
    });
    if (name !== null && name.trim() !== old)
      this.commit(`Rename row “${old}”`, renameRow(this.m, row, name), undefined, true);
  }

  async renameColumn(): Promise<void> {
    const { col } = this.here();
    const old = this.m.colLabels[col];
    if (old === undefined) return;
    const name = await promptDialog({
      title: 'Rename column',
      label: `New label for “${old}”`,
      initial: old,
      confirmLabel: 'Rename',
      check: (v) =>
        labelProblem(
          v,
          this.m.colLabels.filter((_, j) => j !== col),
          'column',
        ),
    });
    if (name !== null && name.trim() !== old)
      this.commit(`Rename column “${old}”`, renameColumn(this.m, col, name), undefined, true);
  }

  moveRow(delta: number): void {
    const { row, col } = this.here();
    this.commit(delta < 0 ? 'Move row up' : 'Move row down', moveRow(this.m, row, delta), () =>
      this.d.selection.select(row + delta, col),
    );
  }

  moveColumn(delta: number): void {
    const { row, col } = this.here();
    this.commit(delta < 0 ? 'Move column left' : 'Move column right', moveColumn(this.m, col, delta), () =>
      this.d.selection.select(row, col + delta),
    );
  }

  sortByLabel(direction: 'asc' | 'desc'): void {
    this.commit(`Sort rows by label (${direction === 'asc' ? 'A→Z' : 'Z→A'})`, {
      ok: true,
      matrix: sortRows(this.m, { by: 'label' }, direction),
    });
  }

  sortByColumn(direction: 'asc' | 'desc'): void {
    const { col } = this.here();
    const name = this.m.colLabels[col];
    if (name === undefined) return;
    this.commit(`Sort rows by “${name}” (${direction === 'asc' ? 'low→high' : 'high→low'})`, {
      ok: true,
      matrix: sortRows(this.m, { by: 'column', col }, direction),
    });
  }

  transpose(): void {
    this.commit('Swap rows and columns', { ok: true, matrix: transpose(this.m) }, () => this.d.selection.select(0, 0));
  }

  async editScale(): Promise<void> {
    const next = await scaleDialog(this.m);
    if (!next) return;
    const { matrix, cleared } = applyScale(this.m, next);
    this.d.store.swapMatrix(`Change scale to ${describeScale(next)}${cleared ? ` (${cleared} cleared)` : ''}`, matrix, {
      keepsCells: true,
    });
    this.d.notice.show(
      `Scale is now ${describeScale(next)}${cleared ? `; ${cleared} value${cleared === 1 ? '' : 's'} outside it cleared (Undo brings them back)` : ''}.`,
      'info',
    );
  }
}
