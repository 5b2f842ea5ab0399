/**
 * One handler per command id (src-shared/commands.ts). The menu, the keyboard
 * shortcuts and the edit bar all run commands through the registry built from
 * this table, so a command does the same thing wherever it is started.
 * `Record<CommandId, …>` makes TypeScript refuse a missing handler; a unit test
 * enumerates them as well.
 */
import type { CommandId } from '../../src-shared/commands';

type CommandHandler = (index?: number) => unknown;
export type CommandHandlers = Record<CommandId, CommandHandler>;

/** What the handlers act on; each is a narrow function so the table is testable without a page. */
export interface CommandTargets {
  edit: {
    undo(): void;
    redo(): void;
    addRow(): void;
    addColumn(): void;
    renameRow(): unknown;
    renameColumn(): unknown;
    deleteRows(): unknown;
    deleteColumns(): unknown;
    moveRow(delta: number): void;
    moveColumn(delta: number): void;
    sortByLabel(direction: 'asc' | 'desc'): void;
    sortByColumn(direction: 'asc' | 'desc'): void;
    transpose(): void;
    editScale(): unknown;
  };
  files: {
    save(): unknown;
    saveAs(): unknown;
    open(): unknown;
    openRecent(index: number): unknown;
    clearRecent(): unknown;
    closeRequested(): unknown;
  };
  chooseSample(): unknown;
  chooseImportFile(): void;
  openExport(): unknown;
  openReport(): unknown;
  toggleOverlay(): void;
  toggleSidePanel(): void;
  fill(): unknown;
  showTab(tab: 'centering' | 'tuning'): void;
  showGuide(): unknown;
}

export function commandHandlers(t: CommandTargets): CommandHandlers {
  const e = t.edit;
  return {
    'file.openSample': () => t.chooseSample(),
    'file.import': () => t.chooseImportFile(),
    'file.openProject': () => t.files.open(),
    'file.openRecent': (index) => t.files.openRecent(index ?? 0),
    'file.clearRecent': () => t.files.clearRecent(),
    'file.save': () => t.files.save(),
    'file.saveAs': () => t.files.saveAs(),
    'file.export': () => t.openExport(),
    'file.report': () => t.openReport(),
    'edit.undo': () => e.undo(),
    'edit.redo': () => e.redo(),
    'edit.addRow': () => e.addRow(),
    'edit.addColumn': () => e.addColumn(),
    'edit.renameRow': () => e.renameRow(),
    'edit.renameColumn': () => e.renameColumn(),
    'edit.deleteRows': () => e.deleteRows(),
    'edit.deleteColumns': () => e.deleteColumns(),
    'edit.moveRowUp': () => e.moveRow(-1),
    'edit.moveRowDown': () => e.moveRow(1),
    'edit.moveColumnLeft': () => e.moveColumn(-1),
    'edit.moveColumnRight': () => e.moveColumn(1),
    'edit.sortByLabelAsc': () => e.sortByLabel('asc'),
    'edit.sortByLabelDesc': () => e.sortByLabel('desc'),
    'edit.sortByColumnAsc': () => e.sortByColumn('asc'),
    'edit.sortByColumnDesc': () => e.sortByColumn('desc'),
    'edit.transpose': () => e.transpose(),
    'edit.scale': () => e.editScale(),
    'view.toggleOverlay': () => t.toggleOverlay(),
    'view.toggleSidePanel': () => t.toggleSidePanel(),
    'model.fill': () => t.fill(),
    'model.compareCentering': () => t.showTab('centering'),
    'model.tune': () => t.showTab('tuning'),
    'help.guide': () => t.showGuide(),
    'app.closeRequested': () => t.files.closeRequested(),
  };
}
