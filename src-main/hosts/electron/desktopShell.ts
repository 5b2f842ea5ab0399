/**
 * The Electron side of DesktopShell (see services/documentHandlers.ts): native
 * open/save dialogs for project files, closing the window once the page has
 * asked about unsaved work, and the recent-projects submenu.
 */
import { dialog, type BrowserWindow } from 'electron';
import type { DesktopShell } from '../../services/documentHandlers';

export interface ElectronShellDeps {
  window: () => BrowserWindow | null;
  /** Called once the page agreed to close (lets the 'close' handler pass). */
  allowClose: () => void;
  rebuildMenu: (recent: string[], edit: { undo: string | null; redo: string | null }) => void;
}

const projectFilters = [{ name: 'Rankfill project', extensions: ['rankfill'] }];

export function electronShell(deps: ElectronShellDeps): DesktopShell {
  let recent: string[] = [];
  let edit: { undo: string | null; redo: string | null } = { undo: null, redo: null };
  return {
    async chooseOpenPath() {
      const win = deps.window();
      const opts = { properties: ['openFile' as const], filters: projectFilters };
      const r = win ? await dialog.showOpenDialog(win, opts) : await dialog.showOpenDialog(opts);
      return r.canceled || r.filePaths.length === 0 ? null : r.filePaths[0];
    },
    async chooseSavePath(suggestedName: string) {
      const win = deps.window();
      const opts = { defaultPath: suggestedName, filters: projectFilters };
      const r = win ? await dialog.showSaveDialog(win, opts) : await dialog.showSaveDialog(opts);
      return r.canceled || !r.filePath ? null : r.filePath;
    },
    closeWindow() {
      deps.allowClose();
      deps.window()?.close();
    },
    recentChanged(paths: string[]) {
      recent = paths;
      deps.rebuildMenu(recent, edit);
    },
    editLabelsChanged(undo: string | null, redo: string | null) {
      edit = { undo, redo };
      deps.rebuildMenu(recent, edit);
    },
  };
}
