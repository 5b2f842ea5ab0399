/**
 * The spreadsheet-style grid of observed ratings (ag-grid, community edition).
 *
 * Rows are plain `{ i }` records; every cell reads the document's Float64Array
 * through a value getter, so the grid never holds a copy of the data. Row
 * labels are pinned left; column virtualization stays on so that a
 * 1000 × 1000 matrix opens and scrolls. Model output is drawn from a separate
 * overlay (see setOverlay) into blank cells only; it is never written into the
 * document.
 */
import {
  AllCommunityModule,
  ModuleRegistry,
  createGrid,
  type CellKeyDownEvent,
  type ColDef,
  type GridApi,
  type ValueGetterParams,
  type ValueSetterParams,
} from 'ag-grid-community';
import { scaleDecimals } from '../../src-shared/matrix/ratingMatrix';
import type { DocumentStore } from '../state/documentStore';
import { formatRating, parseEntry } from './cellText';
import { rankfillGridTheme } from './gridTheme';

ModuleRegistry.registerModules([AllCommunityModule]);

interface RowRecord {
  i: number;
}

/** What the overlay layer offers for a blank cell. */
export interface OverlayLayer {
  /** Row-major predictions for every cell. */
  predictions: Float64Array;
  /** Row-major spread (std. dev.) per cell, when known. */
  spread?: Float64Array;
  /** Largest spread, for scaling the tint. */
  maxSpread: number;
}

export interface RatingGridOptions {
  store: DocumentStore;
  styleNonce: string;
  /** Shown when an entry is refused; the cell keeps its previous value. */
  onRefused: (message: string) => void;
  onCellFocused?: (row: number, col: number) => void;
}

export const LABEL_COL_ID = 'rowLabel';
export const colIdFor = (j: number) => `c${j}`;
const colIndexOf = (colId: string | undefined): number => (colId && colId.startsWith('c') ? Number(colId.slice(1)) : -1);

export class RatingGrid {
  readonly api: GridApi<RowRecord>;
  private overlay: OverlayLayer | null = null;
  private overlayVisible = true;

  constructor(
    private readonly host: HTMLElement,
    private readonly opts: RatingGridOptions,
  ) {
    this.api = createGrid<RowRecord>(host, {
      theme: rankfillGridTheme,
      styleNonce: opts.styleNonce,
      columnDefs: [],
      rowData: [],
      getRowId: (p) => String(p.data.i),
      suppressColumnVirtualisation: false,
      suppressFieldDotNotation: true,
      singleClickEdit: false,
      stopEditingWhenCellsLoseFocus: true,
      enterNavigatesVerticallyAfterEdit: true,
      undoRedoCellEditing: false,
      animateRows: false,
      defaultColDef: { sortable: false, resizable: true, suppressMovable: true },
      onCellKeyDown: (e) => {
        if ('column' in e) this.onKeyDown(e);
      },
      onCellFocused: (e) => {
        const j = colIndexOf(typeof e.column === 'string' ? e.column : e.column?.getColId());
        if (e.rowIndex !== null && e.rowIndex !== undefined && j >= 0) opts.onCellFocused?.(e.rowIndex, j);
      },
    });
    opts.store.subscribe((e) => {
      if (e.type === 'replaced' || e.type === 'shape') this.rebuild();
      else if (e.type === 'cells') this.refreshCells(e.indices);
    });
    this.rebuild();
  }

  /** Column definitions and row records for the current shape. */
  private rebuild(): void {
    const m = this.opts.store.current;
    const cols = m.colLabels.length;
    const decimals = scaleDecimals(m.scale);
    const labelCol: ColDef<RowRecord> = {
      colId: LABEL_COL_ID,
      headerName: '',
      pinned: 'left',
      lockPinned: true,
      width: 170,
      editable: false,
      cellClass: 'rf-row-label',
      valueGetter: (p: ValueGetterParams<RowRecord>) => (p.data ? this.opts.store.current.rowLabels[p.data.i] : ''),
    };
    const valueCols: ColDef<RowRecord>[] = m.colLabels.map((label, j) => ({
      colId: colIdFor(j),
      headerName: label,
      headerTooltip: label,
      width: 92,
      editable: true,
      type: 'rightAligned',
      cellDataType: false,
      valueGetter: (p: ValueGetterParams<RowRecord>) => {
        if (!p.data) return null;
        const doc = this.opts.store.current;
        const v = doc.values[p.data.i * doc.colLabels.length + j];
        return Number.isNaN(v) ? null : v;
      },
      valueFormatter: (p) => {
        if (p.value !== null && p.value !== undefined) return formatRating(p.value as number, decimals);
        const est = p.data ? this.estimateAt(p.data.i, j) : undefined;
        return est === undefined ? '' : formatRating(est, decimals);
      },
      valueSetter: (p: ValueSetterParams<RowRecord>) => this.commitEdit(p, j),
      cellClassRules: {
        'rf-filled': (p) => (p.value === null || p.value === undefined) && !!p.data && this.estimateAt(p.data.i, j) !== undefined,
      },
      cellStyle: (p) => {
        if (p.value !== null && p.value !== undefined) return null;
        const tint = p.data ? this.tintAt(p.data.i, j) : undefined;
        return tint === undefined ? null : { backgroundColor: `rgba(196, 122, 44, ${tint.toFixed(3)})` };
      },
    }));
    void cols;
    this.api.setGridOption('columnDefs', [labelCol, ...valueCols]);
    this.api.setGridOption(
      'rowData',
      m.rowLabels.map((_, i) => ({ i })),
    );
  }

  private refreshCells(indices: Int32Array): void {
    const cols = this.opts.store.current.colLabels.length;
    if (indices.length > 200) {
      this.api.refreshCells({ force: true });
      return;
    }
    const rowNodes = [];
    const columns = new Set<string>();
    for (const idx of indices) {
      const node = this.api.getRowNode(String(Math.floor(idx / cols)));
      if (node) rowNodes.push(node);
      columns.add(colIdFor(idx % cols));
    }
    this.api.refreshCells({ rowNodes, columns: [...columns], force: true });
  }

  private commitEdit(p: ValueSetterParams<RowRecord>, j: number): boolean {
    const doc = this.opts.store.current;
    const entry = parseEntry(p.newValue, doc.scale);
    if (entry.kind === 'refused') {
      this.opts.onRefused(`${doc.rowLabels[p.data.i]} × ${doc.colLabels[j]}: ${entry.reason}. The cell keeps its previous value.`);
      return false;
    }
    const value = entry.kind === 'missing' ? NaN : entry.value;
    this.opts.store.setCells(entry.kind === 'missing' ? 'Clear cell' : 'Enter rating', [p.data.i * doc.colLabels.length + j], [value]);
    // The store's change event refreshes the cell; tell the grid nothing changed on its side.
    return false;
  }

  private onKeyDown(e: CellKeyDownEvent<RowRecord>): void {
    const ev = e.event as KeyboardEvent | null | undefined;
    if (!ev || (ev.key !== 'Delete' && ev.key !== 'Backspace')) return;
    if (this.api.getEditingCells().length > 0) return;
    const j = colIndexOf(e.column.getColId());
    if (j < 0 || !e.data) return;
    const doc = this.opts.store.current;
    this.opts.store.setCells('Clear cell', [e.data.i * doc.colLabels.length + j], [NaN]);
    ev.preventDefault();
  }

  // ----- overlay layer ------------------------------------------------------------

  setOverlay(layer: OverlayLayer | null): void {
    this.overlay = layer;
    this.api.refreshCells({ force: true });
  }

  setOverlayVisible(visible: boolean): void {
    this.overlayVisible = visible;
    this.api.refreshCells({ force: true });
  }

  private estimateAt(i: number, j: number): number | undefined {
    if (!this.overlay || !this.overlayVisible) return undefined;
    const cols = this.opts.store.current.colLabels.length;
    const v = this.overlay.predictions[i * cols + j];
    return Number.isFinite(v) ? v : undefined;
  }

  /** Tint strength 0.06–0.42 grows with the cell's spread; undefined when no estimate. */
  private tintAt(i: number, j: number): number | undefined {
    if (this.estimateAt(i, j) === undefined || !this.overlay) return undefined;
    const cols = this.opts.store.current.colLabels.length;
    const s = this.overlay.spread?.[i * cols + j];
    if (s === undefined || !Number.isFinite(s) || !(this.overlay.maxSpread > 0)) return 0.1;
    return 0.06 + 0.36 * Math.min(1, s / this.overlay.maxSpread);
  }

  focusCell(row: number, col: number): void {
    this.api.ensureIndexVisible(row);
    this.api.ensureColumnVisible(colIdFor(col));
    this.api.setFocusedCell(row, colIdFor(col));
  }

  destroy(): void {
    this.api.destroy();
    this.host.replaceChildren();
  }
}
