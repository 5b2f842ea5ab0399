/**
 * A rectangular cell selection of our own (the community grid has no range
 * selection): a click or plain arrow sets one corner (the anchor); Shift+click
 * or Shift+arrow moves the other corner. Selected cells carry the rf-selected
 * class. Copy, cut, paste, Delete and the row/column commands act on it.
 */
import { colIndexOf, colIdFor, type RatingGrid } from '../grid/ratingGrid';
import type { DocumentStore } from '../state/documentStore';

export interface CellRect {
  r0: number;
  c0: number;
  r1: number;
  c1: number;
}

export class CellSelection {
  anchor: { row: number; col: number } | null = null;
  end: { row: number; col: number } | null = null;
  private shiftHeld = false;
  private readonly listeners = new Set<() => void>();

  constructor(
    private readonly grid: RatingGrid,
    private readonly store: DocumentStore,
    host: HTMLElement,
  ) {
    grid.setSelectionTest((i, j) => this.contains(i, j));
    host.addEventListener('mousedown', (e) => (this.shiftHeld = e.shiftKey), true);
    host.addEventListener('keydown', (e) => this.onKey(e), true);
    grid.api.addEventListener('cellFocused', (e) => {
      const j = colIndexOf(typeof e.column === 'string' ? e.column : e.column?.getColId());
      if (e.rowIndex === null || e.rowIndex === undefined || e.rowPinned || j < 0) return;
      const cell = { row: e.rowIndex, col: j };
      if (this.shiftHeld && this.anchor) this.end = cell;
      else this.anchor = this.end = cell;
      this.shiftHeld = false;
      this.changed();
    });
    store.subscribe((e) => {
      if (e.type === 'shape' || e.type === 'replaced') this.clamp();
    });
  }

  onChange(l: () => void): void {
    this.listeners.add(l);
  }

  /** Normalised rectangle, or null when nothing is selected. */
  get rect(): CellRect | null {
    if (!this.anchor || !this.end) return null;
    return {
      r0: Math.min(this.anchor.row, this.end.row),
      r1: Math.max(this.anchor.row, this.end.row),
      c0: Math.min(this.anchor.col, this.end.col),
      c1: Math.max(this.anchor.col, this.end.col),
    };
  }

  get size(): number {
    const r = this.rect;
    return r ? (r.r1 - r.r0 + 1) * (r.c1 - r.c0 + 1) : 0;
  }

  contains(i: number, j: number): boolean {
    const r = this.rect;
    return !!r && this.size > 1 && i >= r.r0 && i <= r.r1 && j >= r.c0 && j <= r.c1;
  }

  /** Select one cell (and focus it in the grid). */
  select(row: number, col: number, extendTo?: { row: number; col: number }): void {
    this.anchor = { row, col };
    this.end = extendTo ?? { row, col };
    this.grid.focusCell(row, col);
    this.changed();
  }

  private clamp(): void {
    const m = this.store.current;
    const fix = (p: { row: number; col: number } | null) =>
      p && m.rowLabels.length && m.colLabels.length
        ? { row: Math.min(p.row, m.rowLabels.length - 1), col: Math.min(p.col, m.colLabels.length - 1) }
        : null;
    this.anchor = fix(this.anchor);
    this.end = fix(this.end);
    this.changed();
  }

  private onKey(e: KeyboardEvent): void {
    if (!e.shiftKey || e.ctrlKey || e.metaKey || e.altKey) return;
    const d = { ArrowUp: [-1, 0], ArrowDown: [1, 0], ArrowLeft: [0, -1], ArrowRight: [0, 1] }[e.key];
    if (!d || !this.anchor || !this.end || this.grid.api.getEditingCells().length > 0) return;
    const m = this.store.current;
    const row = Math.max(0, Math.min(m.rowLabels.length - 1, this.end.row + d[0]));
    const col = Math.max(0, Math.min(m.colLabels.length - 1, this.end.col + d[1]));
    this.end = { row, col };
    this.grid.api.ensureIndexVisible(row);
    this.grid.api.ensureColumnVisible(colIdFor(col));
    e.preventDefault();
    e.stopPropagation();
    this.changed();
  }

  private changed(): void {
    this.grid.api.refreshCells({ force: true });
    for (const l of this.listeners) l();
  }
}
