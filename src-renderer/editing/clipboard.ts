/**
 * Copy, cut and paste of cell blocks as tab-separated text (what spreadsheets
 * exchange). Copy writes the selection's observed values (blank for missing);
 * paste puts a block at the selection's top-left cell, refuses it whole with a
 * list of offending cells when any entry is off the scale, and asks first when
 * it would overwrite observed values. Each paste or cut is one undoable change.
 */
import { confirmDialog, listBlock, modalOpen } from '../dialogs/modal';
import { el } from '../panels/dom';
import { formatObserved } from '../grid/cellText';
import type { Notice } from '../panels/notice';
import type { DocumentStore } from '../state/documentStore';
import type { CellSelection } from './cellSelection';
import { describeRefused, planPaste } from './pastePlan';
import { formatTabBlock } from './tabText';

export interface ClipboardDeps {
  store: DocumentStore;
  selection: CellSelection;
  notice: Notice;
  gridHost: HTMLElement;
  isEditing: () => boolean;
}

/** The selection (or focused cell) as tab-separated text. */
export function selectionText(deps: ClipboardDeps): string | null {
  const r = deps.selection.rect;
  if (!r) return null;
  const m = deps.store.current;
  const cols = m.colLabels.length;
  const rows: string[][] = [];
  for (let i = r.r0; i <= r.r1; i++) {
    const row: string[] = [];
    for (let j = r.c0; j <= r.c1; j++) row.push(formatObserved(m.values[i * cols + j], m.scale));
    rows.push(row);
  }
  return formatTabBlock(rows);
}

/** Apply pasted text at the selection's top-left cell (asks before overwriting observed values). */
export async function pasteText(deps: ClipboardDeps, text: string): Promise<boolean> {
  const r = deps.selection.rect;
  const m = deps.store.current;
  if (!r) {
    deps.notice.show('Click a cell first: the pasted block starts there.', 'error');
    return false;
  }
  const plan = planPaste(m, text, r.r0, r.c0);
  if (!plan.ok) {
    const lines = describeRefused(m, plan.refused);
    deps.notice.show([`Paste refused: ${plan.message}.`, ...lines].join('\n'), 'error', 0);
    return false;
  }
  if (plan.changes === 0) {
    deps.notice.show('The pasted block equals what is already there; nothing changed.', 'info');
    return false;
  }
  if (plan.overwrites > 0) {
    const body = el('div', {}, [
      el('p', {
        text: `Pasting this ${plan.rows} × ${plan.cols} block changes ${plan.changes} cell${plan.changes === 1 ? '' : 's'}, and ${plan.overwrites} of them already hold an observed rating that would be replaced or cleared.`,
      }),
      listBlock(
        [
          `from ${m.rowLabels[r.r0]} × ${m.colLabels[r.c0]} to ${m.rowLabels[r.r0 + plan.rows - 1]} × ${m.colLabels[r.c0 + plan.cols - 1]}`,
        ],
        'paste-range',
      ),
    ]);
    const ok = await confirmDialog(
      'Replace observed ratings?',
      body,
      `Paste and change ${plan.changes} cells`,
      'Cancel',
      'paste-confirm-dialog',
    );
    if (!ok) return false;
  }
  deps.store.setCells(`Paste ${plan.rows} × ${plan.cols} block`, plan.indices, plan.values);
  deps.selection.select(r.r0, r.c0, { row: r.r0 + plan.rows - 1, col: r.c0 + plan.cols - 1 });
  deps.notice.show(
    `Pasted ${plan.rows} × ${plan.cols} block: ${plan.changes} cell${plan.changes === 1 ? '' : 's'} changed.`,
    'info',
  );
  return true;
}

/** Blank every selected cell as one change. */
function clearSelection(deps: ClipboardDeps, label = 'Clear cells'): boolean {
  const r = deps.selection.rect;
  if (!r) return false;
  const cols = deps.store.current.colLabels.length;
  const idx: number[] = [];
  for (let i = r.r0; i <= r.r1; i++) for (let j = r.c0; j <= r.c1; j++) idx.push(i * cols + j);
  return deps.store.setCells(
    idx.length === 1 ? 'Clear cell' : `${label} (${idx.length})`,
    idx,
    new Float64Array(idx.length).fill(NaN),
  );
}

export function installClipboard(deps: ClipboardDeps): void {
  const ours = (e: Event) =>
    !modalOpen() &&
    !deps.isEditing() &&
    (deps.gridHost.contains(document.activeElement) || document.activeElement === document.body) &&
    !(e.target instanceof HTMLInputElement || e.target instanceof HTMLTextAreaElement);
  document.addEventListener('copy', (e) => {
    if (!ours(e)) return;
    const text = selectionText(deps);
    if (text === null) return;
    e.clipboardData?.setData('text/plain', text);
    e.preventDefault();
  });
  document.addEventListener('cut', (e) => {
    if (!ours(e)) return;
    const text = selectionText(deps);
    if (text === null) return;
    e.clipboardData?.setData('text/plain', text);
    e.preventDefault();
    clearSelection(deps, 'Cut cells');
  });
  document.addEventListener('paste', (e) => {
    if (!ours(e)) return;
    const text = e.clipboardData?.getData('text/plain') ?? '';
    e.preventDefault();
    void pasteText(deps, text);
  });
  // Delete/Backspace on a multi-cell selection clears it all as one change (a single cell: the grid does it).
  deps.gridHost.addEventListener(
    'keydown',
    (e) => {
      if ((e.key !== 'Delete' && e.key !== 'Backspace') || deps.isEditing() || deps.selection.size <= 1) return;
      clearSelection(deps);
      e.preventDefault();
      e.stopPropagation();
    },
    true,
  );
}
