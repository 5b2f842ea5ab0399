/**
 * Keyboard shortcuts of the page (the Electron menu sends the same commands):
 *   Ctrl+Z undo · Ctrl+Shift+Z or Ctrl+Y redo · Ctrl+S keep · Ctrl+Shift+S keep as ·
 *   Ctrl+Shift+O open project.  (Cmd instead of Ctrl on macOS.)
 * While a cell is being edited, Ctrl+Z belongs to the text field; while a dialog
 * is open, shortcuts stand aside.
 */
import { modalOpen } from '../dialogs/modal';
import type { EditCommands } from './editCommands';
import type { ProjectFiles } from './projectFiles';

export function installShortcuts(deps: { commands: EditCommands; files: ProjectFiles; isEditing: () => boolean }): void {
  window.addEventListener('keydown', (e) => {
    if (modalOpen() || !(e.ctrlKey || e.metaKey) || e.altKey) return;
    const inField = e.target instanceof HTMLInputElement || e.target instanceof HTMLTextAreaElement || e.target instanceof HTMLSelectElement;
    const key = e.key.toLowerCase();
    if ((key === 'z' || key === 'y') && (deps.isEditing() || inField)) return;
    let run: (() => void) | undefined;
    if (key === 'z' && !e.shiftKey) run = () => deps.commands.undo();
    else if ((key === 'z' && e.shiftKey) || (key === 'y' && !e.shiftKey)) run = () => deps.commands.redo();
    else if (key === 's' && !e.shiftKey) run = () => void deps.files.save();
    else if (key === 's' && e.shiftKey) run = () => void deps.files.saveAs();
    else if (key === 'o' && e.shiftKey) run = () => void deps.files.open();
    if (!run) return;
    e.preventDefault();
    e.stopPropagation();
    run();
  });
}
