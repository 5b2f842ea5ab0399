/**
 * Sets up the editing and project-file half of the workbench on a started page:
 * selection, clipboard, edit bar, import with preview, project files and
 * autosave. Returns what app.ts needs from it (the commands behind the menu,
 * shortcuts and edit bar are in commands/).
 */
import type { DocumentPayload } from '../../src-shared/api';
import type { CommandId } from '../../src-shared/commands';
import { DEFAULT_MAX_BYTES, formatBytes } from '../../src-shared/io/parseDelimited';
import type { HostBridge } from '../bridge/hostBridge';
import { importPreviewDialog } from '../dialogs/importPreview';
import type { RatingGrid } from '../grid/ratingGrid';
import type { Notice } from '../panels/notice';
import type { DocumentStore } from '../state/documentStore';
import { CellSelection } from './cellSelection';
import { installClipboard, pasteText, selectionText } from './clipboard';
import { mountEditBar } from './editBar';
import { EditCommands } from './editCommands';
import { ProjectFiles } from './projectFiles';

export interface EditingDeps {
  bridge: HostBridge;
  store: DocumentStore;
  grid: RatingGrid;
  notice: Notice;
  gridHost: HTMLElement;
  editBar: HTMLElement;
  importInput: HTMLInputElement;
  openDocument: (doc: DocumentPayload) => void;
  /** Runs a command through the page's registry (the edit bar's buttons use it). */
  runCommand: (id: CommandId, index?: number) => void;
}

export interface Editing {
  selection: CellSelection;
  commands: EditCommands;
  files: ProjectFiles;
  /** Ask about unsaved work before replacing the document; true to go ahead. */
  confirmLeave(doing: string): Promise<boolean>;
  /** Import a file's text through the preview dialog (also used by tests). */
  importWithPreview(fileName: string, text: string, bytes: number): Promise<boolean>;
  /** For tests and menus: paste text at the selection; copy the selection as text. */
  paste(text: string): Promise<boolean>;
  copyText(): string | null;
  /** A cell editor is open in the grid. */
  isEditing(): boolean;
}

export function installEditing(d: EditingDeps): Editing {
  const isEditing = () => d.grid.api.getEditingCells().length > 0;
  const selection = new CellSelection(d.grid, d.store, d.gridHost);
  const clipDeps = { store: d.store, selection, notice: d.notice, gridHost: d.gridHost, isEditing };
  installClipboard(clipDeps);
  const commands = new EditCommands({ store: d.store, selection, notice: d.notice });
  const files = new ProjectFiles(d.bridge, d.store, d.notice);
  mountEditBar(d.editBar, { store: d.store, bridge: d.bridge, run: d.runCommand });

  const importWithPreview = async (fileName: string, text: string, bytes: number): Promise<boolean> => {
    const doc = await importPreviewDialog(fileName, text, bytes, (req) => d.bridge.call('document.previewImport', req));
    if (!doc) return false;
    if (!(await files.confirmLeave('Opening the imported file'))) return false;
    d.openDocument(doc);
    return true;
  };

  d.importInput.addEventListener('change', () => {
    const file = d.importInput.files?.[0];
    d.importInput.value = '';
    if (!file) return;
    // The same limit the main side checks (src-shared/io/parseDelimited.ts).
    if (file.size > DEFAULT_MAX_BYTES) {
      d.notice.show(
        `${file.name} is too large to import (${formatBytes(file.size)}; the limit is ${formatBytes(DEFAULT_MAX_BYTES)}). Nothing was opened.`,
        'error',
        0,
      );
      return;
    }
    void file
      .text()
      .then((text) => importWithPreview(file.name, text, file.size))
      .catch((err: unknown) =>
        d.notice.show(`${file.name} could not be read: ${err instanceof Error ? err.message : String(err)}`, 'error'),
      );
  });

  // The desktop Edit menu names what Undo and Redo would do.
  if (d.bridge.kind === 'electron') {
    let timer: ReturnType<typeof setTimeout> | undefined;
    d.store.subscribe((e) => {
      if (e.type !== 'history') return;
      clearTimeout(timer);
      timer = setTimeout(() => {
        void d.bridge
          .call('app.setEditLabels', { undo: d.store.undoLabel() ?? null, redo: d.store.redoLabel() ?? null })
          .catch(() => undefined);
      }, 150);
    });
  }

  return {
    selection,
    commands,
    files,
    isEditing,
    confirmLeave: (doing) => files.confirmLeave(doing),
    importWithPreview,
    paste: (text) => pasteText(clipDeps, text),
    copyText: () => selectionText(clipDeps),
  };
}
