/**
 * The page's keyboard shortcuts, read from src-shared/commands.ts (the same
 * list the Electron menu shows) and run through the command registry.
 * While a cell or a text field is being edited, Ctrl+Z and Ctrl+Y belong to the
 * field; while a dialog is open, shortcuts stand aside. Cmd instead of Ctrl on macOS.
 */
import { commandForKey } from '../../src-shared/commands';
import { modalOpen } from '../dialogs/modal';
import type { CommandRegistry } from './commandRegistry';

export function installShortcuts(registry: CommandRegistry, isEditing: () => boolean): void {
  // Capture phase: the grid would otherwise take Ctrl+Enter as "start editing".
  window.addEventListener(
    'keydown',
    (e) => {
      if (modalOpen()) return;
      const id = commandForKey({ key: e.key, ctrlOrCmd: e.ctrlKey || e.metaKey, shift: e.shiftKey, alt: e.altKey });
      if (!id) return;
      const inField =
        e.target instanceof HTMLInputElement ||
        e.target instanceof HTMLTextAreaElement ||
        e.target instanceof HTMLSelectElement;
      if ((id === 'edit.undo' || id === 'edit.redo') && (isEditing() || inField)) return;
      if (id === 'model.fill' && isEditing()) return;
      e.preventDefault();
      e.stopPropagation();
      registry.run(id);
    },
    true,
  );
}
