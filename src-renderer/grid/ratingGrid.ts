/**
 * The spreadsheet-style grid of observed ratings (ag-grid, community edition).
 *
 * Rows are plain `{ i }` records; every cell reads the document's Float64Array
 * through a value getter, so the grid never holds a copy of the data. Row
 * labels are pinned left; column virtualization stays on so that a
 * 1000 × 1000 matrix opens and scrolls.
 *
 * Model output is a separate layer (`GridLayers`): estimates are drawn into
 * blank cells only, baselines sit in a pinned right column and a pinned bottom
 * row, weak rows/columns are marked. None of it is ever written into the
 * document; typing into a filled cell makes it an observed value.
 */
import {
  AllCommunityModule,
  ModuleRegistry,
  createGrid,
  type CellClassParams,
  type CellKeyDownEvent,
  type ColDef,
  type GridApi,
  type ValueGetterParams,
  type ValueSetterParams,
} from 'ag-grid-community';
import { scaleDecimals } from '../../src-shared/matrix/ratingMatrix';
import type { DocumentStore } from '../state/documentStore';
import { formatObserved, formatRating, parseEntry } from './cellText';
import { gridLocaleText, rankfillGridTheme } from './gridTheme';
import { diffColour, estimateTint, type GridLayers } from './overlayLayer';

ModuleRegistry.registerModules([AllCommunityModule]);

/** A data row (i ≥ 0) or the pinned bottom row of column baselines (i = -1). */
export interface RowRecord {
  i: number;
}

export interface RatingGridOptions {
  store: DocumentStore;
  styleNonce: string;
  /** Shown when an entry is refused; the cell keeps its previous value. */
  onRefused: (message: string) => void;
  onCellFocused?: (row: number, col: number) => void;
}

const LABEL_COL_ID = 'rowLabel';
const BASELINE_COL_ID = 'rowBaseline';
const COUNT_COL_ID = 'rowCount';
export const colIdFor = (j: number) => `c${j}`;
export const colIndexOf = (colId: string | undefined): number =>
  colId && /^c\d+$/.test(colId) ? Number(colId.slice(1)) : -1;
const BASELINE_ROW = -1;
const NO_TINT = { backgroundColor: '' };
/** Narrow enough that 8 data columns fit beside the side panel at 1024 px. */
const LABEL_WIDTH = 136;
const VALUE_WIDTH = 68;
/** Below this grid width the baseline and count columns scroll with the data instead of being pinned. */
const COMPACT_BELOW_PX = 900;

function weakKey(m: Map<number, string> | undefined): string {
  return m ? [...m.keys()].join(',') : '';
}

export class RatingGrid {
  readonly api: GridApi<RowRecord>;
  private layers: GridLayers = { overlay: null, overlayVisible: true, diff: null, baselines: null, weak: null };
  /** The editing selection (editing/cellSelection.ts) marks its cells with rf-selected. */
  private selectionTest: ((row: number, col: number) => boolean) | null = null;
  /** A narrow grid: nothing pinned on the right (see COMPACT_BELOW_PX). */
  private compact = false;

  constructor(
    private readonly host: HTMLElement,
    private readonly opts: RatingGridOptions,
  ) {
    this.api = createGrid<RowRecord>(host, {
      theme: rankfillGridTheme,
      localeText: gridLocaleText,
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
      tooltipShowDelay: 300,
      // Tab and Shift+Tab leave the grid (arrow keys move inside it), so the page's other controls stay one key away.
      tabToNextCell: () => false,
      tabToNextHeader: () => false,
      defaultColDef: { sortable: false, resizable: true, suppressMovable: true },
      onCellKeyDown: (e) => {
        if ('column' in e) this.onKeyDown(e);
      },
      onCellFocused: (e) => {
        const j = colIndexOf(typeof e.column === 'string' ? e.column : e.column?.getColId());
        if (e.rowIndex !== null && e.rowIndex !== undefined && e.rowPinned == null && j >= 0)
          opts.onCellFocused?.(e.rowIndex, j);
      },
    });
    opts.store.subscribe((e) => {
      if (e.type === 'replaced' || e.type === 'shape') this.rebuild();
      else if (e.type === 'cells') this.refreshCells(e.indices);
    });
    this.rebuild();
    // Pin the side columns only when there is room for them beside the data.
    new ResizeObserver(() => {
      const compact = host.clientWidth > 0 && host.clientWidth < COMPACT_BELOW_PX;
      if (compact === this.compact) return;
      this.compact = compact;
      if (this.layers.baselines) this.rebuild();
    }).observe(host);
  }

  private get doc() {
    return this.opts.store.current;
  }

  /** Column definitions and row records for the current shape. */
  private rebuild(): void {
    const m = this.doc;
    const decimals = scaleDecimals(m.scale);
    const labelCol: ColDef<RowRecord> = {
      colId: LABEL_COL_ID,
      // The row-label column keeps the title the imported file gave it (e.g. "Wine").
      headerName: m.rowHeader ?? '',
      headerTooltip: m.rowHeader ? `Row labels (${m.rowHeader})` : 'Row labels',
      pinned: 'left',
      lockPinned: true,
      width: LABEL_WIDTH,
      editable: false,
      valueGetter: (p: ValueGetterParams<RowRecord>) => {
        if (!p.data) return '';
        return p.data.i === BASELINE_ROW ? this.baselineRowLabel() : this.doc.rowLabels[p.data.i];
      },
      cellClass: (p: CellClassParams<RowRecord>) => {
        if (p.data?.i === BASELINE_ROW) return 'rf-row-label rf-baseline-label';
        return p.data && this.layers.weak?.rows.has(p.data.i) ? 'rf-row-label rf-weak' : 'rf-row-label';
      },
      tooltipValueGetter: (p) => {
        if (p.data?.i === BASELINE_ROW) return this.layers.baselines?.colTooltip || undefined;
        return p.data && p.data.i >= 0 ? this.layers.weak?.rows.get(p.data.i) : undefined;
      },
    };
    const valueCols: ColDef<RowRecord>[] = m.colLabels.map((label, j) => ({
      colId: colIdFor(j),
      headerName: label,
      headerTooltip: label,
      headerClass: () =>
        this.layers.weak?.cols.has(j) ? 'ag-right-aligned-header rf-weak-col' : 'ag-right-aligned-header',
      headerTooltipValueGetter: () => this.layers.weak?.cols.get(j) ?? label,
      width: VALUE_WIDTH,
      editable: (p) => p.data?.i !== BASELINE_ROW,
      type: 'rightAligned',
      cellDataType: false,
      valueGetter: (p: ValueGetterParams<RowRecord>) => {
        if (!p.data) return null;
        if (p.data.i === BASELINE_ROW) return null;
        const v = this.doc.values[p.data.i * this.doc.colLabels.length + j];
        return Number.isNaN(v) ? null : v;
      },
      valueFormatter: (p) => {
        if (!p.data) return '';
        if (p.data.i === BASELINE_ROW) return formatRating(this.layers.baselines?.col?.[j], 2);
        if (p.value !== null && p.value !== undefined) return formatObserved(p.value as number, this.doc.scale);
        const diff = this.diffAt(p.data.i, j);
        if (diff !== undefined) return (diff > 0 ? '+' : '') + formatRating(diff, Math.max(2, decimals));
        const est = this.estimateAt(p.data.i, j);
        return est === undefined ? '' : formatRating(est, Math.max(1, decimals));
      },
      valueSetter: (p: ValueSetterParams<RowRecord>) => this.commitEdit(p, j),
      cellClassRules: { 'rf-selected': (p) => !!p.data && p.data.i >= 0 && !!this.selectionTest?.(p.data.i, j) },
      cellClass: (p: CellClassParams<RowRecord>) => {
        const base = 'ag-right-aligned-cell';
        if (!p.data) return base;
        if (p.data.i === BASELINE_ROW) return `${base} rf-baseline-cell`;
        if (p.value !== null && p.value !== undefined) return base;
        if (this.diffAt(p.data.i, j) !== undefined) return `${base} rf-diff`;
        return this.estimateAt(p.data.i, j) !== undefined ? `${base} rf-filled` : base;
      },
      // The grid only ever adds inline styles (a null style leaves the previous one in place),
      // so every cell states its background: '' removes a tint left by an earlier run or data set.
      cellStyle: (p) => {
        if (!p.data || p.data.i === BASELINE_ROW || (p.value !== null && p.value !== undefined)) return NO_TINT;
        const diff = this.diffAt(p.data.i, j);
        if (diff !== undefined && this.layers.diff)
          return { backgroundColor: diffColour(diff, this.layers.diff.maxAbs) };
        const tint =
          this.estimateAt(p.data.i, j) !== undefined
            ? estimateTint(this.layers.overlay!, p.data.i * this.doc.colLabels.length + j)
            : undefined;
        return tint === undefined ? NO_TINT : { backgroundColor: tint };
      },
    }));
    const showRowBaseline = !!this.layers.baselines?.row;
    const sideCols: ColDef<RowRecord>[] = this.layers.baselines
      ? [
          {
            colId: BASELINE_COL_ID,
            hide: !showRowBaseline,
            headerName: this.layers.baselines.rowLabel ?? 'Baseline',
            headerTooltip:
              this.layers.baselines.rowTooltip ?? 'The row’s part of the baseline under the run’s centering',
            pinned: this.compact ? null : 'right',
            width: 84,
            editable: false,
            type: 'rightAligned',
            cellClass: 'ag-right-aligned-cell rf-baseline-cell',
            valueGetter: (p) => (p.data && p.data.i >= 0 ? (this.layers.baselines?.row?.[p.data.i] ?? null) : null),
            valueFormatter: (p) => formatRating(p.value as number | null, 2),
          },
          {
            colId: COUNT_COL_ID,
            headerName: 'Observed',
            headerTooltip: 'How many cells of the row are observed',
            pinned: this.compact ? null : 'right',
            width: 80,
            editable: false,
            type: 'rightAligned',
            cellClass: 'ag-right-aligned-cell rf-baseline-cell',
            valueGetter: (p) => (p.data && p.data.i >= 0 ? this.rowObservedCount(p.data.i) : null),
          },
        ]
      : [];
    this.api.setGridOption('columnDefs', [labelCol, ...valueCols, ...sideCols]);
    this.api.setGridOption(
      'rowData',
      m.rowLabels.map((_, i) => ({ i })),
    );
    this.updatePinnedRows();
  }

  private baselineRowLabel(): string {
    return this.layers.baselines?.colLabel ?? 'Column baseline';
  }

  private updatePinnedRows(): void {
    const show = !!this.layers.baselines?.col && this.layers.baselines.col.length === this.doc.colLabels.length;
    this.api.setGridOption('pinnedBottomRowData', show ? [{ i: BASELINE_ROW }] : []);
  }

  private rowObservedCount(i: number): number {
    const cols = this.doc.colLabels.length;
    let n = 0;
    for (let j = 0; j < cols; j++) if (!Number.isNaN(this.doc.values[i * cols + j])) n++;
    return n;
  }

  private refreshCells(indices: Int32Array): void {
    const cols = this.doc.colLabels.length;
    if (indices.length > 200) {
      this.api.refreshCells({ force: true });
      return;
    }
    const rowNodes = [];
    const columns = new Set<string>(this.layers.baselines ? [COUNT_COL_ID] : []);
    for (const idx of indices) {
      const node = this.api.getRowNode(String(Math.floor(idx / cols)));
      if (node) rowNodes.push(node);
      columns.add(colIdFor(idx % cols));
    }
    this.api.refreshCells({ rowNodes, columns: [...columns], force: true });
  }

  private commitEdit(p: ValueSetterParams<RowRecord>, j: number): boolean {
    const doc = this.doc;
    const entry = parseEntry(p.newValue, doc.scale);
    if (entry.kind === 'refused') {
      this.opts.onRefused(
        `${doc.rowLabels[p.data.i]} × ${doc.colLabels[j]}: ${entry.reason}. The cell keeps its previous value.`,
      );
      return false;
    }
    const value = entry.kind === 'missing' ? NaN : entry.value;
    this.opts.store.setCells(
      entry.kind === 'missing' ? 'Clear cell' : 'Enter rating',
      [p.data.i * doc.colLabels.length + j],
      [value],
    );
    // The store's change event refreshes the cell; tell the grid nothing changed on its side.
    return false;
  }

  private onKeyDown(e: CellKeyDownEvent<RowRecord>): void {
    const ev = e.event as KeyboardEvent | null | undefined;
    if (!ev || (ev.key !== 'Delete' && ev.key !== 'Backspace')) return;
    if (this.api.getEditingCells().length > 0) return;
    const j = colIndexOf(e.column.getColId());
    if (j < 0 || !e.data || e.data.i < 0) return;
    const doc = this.doc;
    this.opts.store.setCells('Clear cell', [e.data.i * doc.colLabels.length + j], [NaN]);
    ev.preventDefault();
  }

  /** Which cells the editing selection covers (redrawn by the caller with api.refreshCells). */
  setSelectionTest(test: ((row: number, col: number) => boolean) | null): void {
    this.selectionTest = test;
  }

  // ----- model layers ---------------------------------------------------------------

  /** Replace some of the model layers; columns are rebuilt only when the side column appears or goes. */
  setLayers(patch: Partial<GridLayers>): void {
    const before = this.layers;
    const hadSide = !!before.baselines;
    const hadRowBaseline = !!before.baselines?.row;
    this.layers = { ...before, ...patch };
    if (
      hadSide !== !!this.layers.baselines ||
      hadRowBaseline !== !!this.layers.baselines?.row ||
      before.baselines?.rowLabel !== this.layers.baselines?.rowLabel
    ) {
      this.rebuild();
      return;
    }
    const hadBottom = !!before.baselines?.col;
    if (hadBottom !== !!this.layers.baselines?.col || before.baselines?.colLabel !== this.layers.baselines?.colLabel)
      this.updatePinnedRows();
    // Headers only carry the weak-column marks: redraw them only when those change.
    if (weakKey(before.weak?.cols) !== weakKey(this.layers.weak?.cols)) this.api.refreshHeader();
    this.api.refreshCells({ force: true });
  }

  get currentLayers(): Readonly<GridLayers> {
    return this.layers;
  }

  private overlayOn(): boolean {
    const o = this.layers.overlay;
    return !!o && this.layers.overlayVisible && o.predictions.length === this.doc.values.length;
  }

  private estimateAt(i: number, j: number): number | undefined {
    if (!this.overlayOn()) return undefined;
    const v = this.layers.overlay!.predictions[i * this.doc.colLabels.length + j];
    return Number.isFinite(v) ? v : undefined;
  }

  private diffAt(i: number, j: number): number | undefined {
    const d = this.layers.diff;
    if (!d || d.values.length !== this.doc.values.length) return undefined;
    const v = d.values[i * this.doc.colLabels.length + j];
    return Number.isFinite(v) ? v : undefined;
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
