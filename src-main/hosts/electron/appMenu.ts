/**
 * The application menu, in our own words. Items that act on the document are
 * forwarded to the page as `menu.command` events; the page owns the document.
 */
import type { MenuItemConstructorOptions } from 'electron';
import { COMMAND_SHORTCUTS, commandWire, parseCommand, type CommandWire } from '../../../src-shared/commands';

/** What a menu item sends: one of the command ids in src-shared/commands.ts. */
export type MenuCommand = CommandWire;

export function appMenuTemplate(
  send: (command: MenuCommand) => void,
  isMac: boolean,
  recentProjects: readonly string[] = [],
  editLabels: { undo?: string | null; redo?: string | null } = {},
): MenuItemConstructorOptions[] {
  // The shortcut shown is the command's first one in src-shared/commands.ts (the page reads the same list).
  const item = (label: string, command: MenuCommand): MenuItemConstructorOptions => ({
    label,
    accelerator: COMMAND_SHORTCUTS[parseCommand(command)?.id ?? 'file.openRecent']?.[0],
    click: () => send(command),
  });
  return [
    {
      label: '&File',
      submenu: [
        item('Open a Sample Set…', 'file.openSample'),
        item('Bring In Ratings File…', 'file.import'),
        item('Open Project…', 'file.openProject'),
        {
          label: 'Recent Projects',
          submenu: [
            ...(recentProjects.length === 0
              ? [{ label: '(none yet)', enabled: false } as MenuItemConstructorOptions]
              : recentProjects.slice(0, 10).map((p, i) => item(p, commandWire('file.openRecent', i)))),
            { type: 'separator' },
            { ...item('Forget Recent Projects', 'file.clearRecent'), enabled: recentProjects.length > 0 },
          ],
        },
        { type: 'separator' },
        item('Keep Project', 'file.save'),
        item('Keep Project As…', 'file.saveAs'),
        item('Write Out Filled Matrix…', 'file.export'),
        item('Write Study Report…', 'file.report'),
        { type: 'separator' },
        isMac ? { role: 'close', label: 'Close Window' } : { role: 'quit', label: 'Leave Rankfill' },
      ],
    },
    {
      label: '&Edit',
      submenu: [
        item(editLabels.undo ? `Take Back: ${editLabels.undo}` : 'Take Back', 'edit.undo'),
        item(editLabels.redo ? `Bring Back: ${editLabels.redo}` : 'Bring Back', 'edit.redo'),
        { type: 'separator' },
        { role: 'cut', label: 'Cut Cells' },
        { role: 'copy', label: 'Copy Cells' },
        { role: 'paste', label: 'Paste Cells' },
        { type: 'separator' },
        item('Add Row', 'edit.addRow'),
        item('Add Column', 'edit.addColumn'),
        item('Swap Rows and Columns', 'edit.transpose'),
        item('Rating Scale…', 'edit.scale'),
      ],
    },
    {
      label: '&View',
      submenu: [
        item('Show or Hide Estimates', 'view.toggleOverlay'),
        item('Show or Hide the Side Panel', 'view.toggleSidePanel'),
        { type: 'separator' },
        { role: 'resetZoom', label: 'Actual Size' },
        { role: 'zoomIn', label: 'Larger Text' },
        { role: 'zoomOut', label: 'Smaller Text' },
      ],
    },
    {
      label: '&Model',
      submenu: [
        item('Fill Blank Cells', 'model.fill'),
        item('Weigh Centering Choices', 'model.compareCentering'),
        item('Search Rank and Regularization…', 'model.tune'),
      ],
    },
    {
      label: '&Help',
      submenu: [item('How Rankfill Fills Cells', 'help.guide')],
    },
  ];
}
