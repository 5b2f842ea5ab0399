/**
 * The application menu, in our own words. Items that act on the document are
 * forwarded to the page as `menu.command` events; the page owns the document.
 */
import type { MenuItemConstructorOptions } from 'electron';

export type MenuCommand =
  | 'file.openSample'
  | 'file.import'
  | 'file.save'
  | 'file.saveAs'
  | 'file.export'
  | 'file.report'
  | 'edit.undo'
  | 'edit.redo'
  | 'view.toggleOverlay'
  | 'model.fill'
  | 'model.compareCentering'
  | 'model.tune'
  | 'help.guide'
  // documents and projects (issue 4)
  | 'file.openProject'
  | `file.openRecent.${number}`
  | 'file.clearRecent'
  | 'edit.addRow'
  | 'edit.addColumn'
  | 'edit.transpose'
  | 'edit.scale'
  | 'app.closeRequested';

export function appMenuTemplate(
  send: (command: MenuCommand) => void,
  isMac: boolean,
  recentProjects: readonly string[] = [],
  editLabels: { undo?: string | null; redo?: string | null } = {},
): MenuItemConstructorOptions[] {
  const item = (label: string, command: MenuCommand, accelerator?: string): MenuItemConstructorOptions => ({
    label,
    accelerator,
    click: () => send(command),
  });
  return [
    {
      label: '&File',
      submenu: [
        item('Open a Sample Set…', 'file.openSample'),
        item('Bring In Ratings File…', 'file.import', 'CmdOrCtrl+O'),
        item('Open Project…', 'file.openProject', 'CmdOrCtrl+Shift+O'),
        {
          label: 'Recent Projects',
          submenu: [
            ...(recentProjects.length === 0
              ? [{ label: '(none yet)', enabled: false } as MenuItemConstructorOptions]
              : recentProjects.slice(0, 10).map((p, i) => item(p, `file.openRecent.${i}`))),
            { type: 'separator' },
            { ...item('Forget Recent Projects', 'file.clearRecent'), enabled: recentProjects.length > 0 },
          ],
        },
        { type: 'separator' },
        item('Keep Project', 'file.save', 'CmdOrCtrl+S'),
        item('Keep Project As…', 'file.saveAs', 'CmdOrCtrl+Shift+S'),
        item('Write Out Filled Matrix…', 'file.export', 'CmdOrCtrl+E'),
        item('Write Study Report…', 'file.report'),
        { type: 'separator' },
        isMac ? { role: 'close', label: 'Close Window' } : { role: 'quit', label: 'Leave Rankfill' },
      ],
    },
    {
      label: '&Edit',
      submenu: [
        item(editLabels.undo ? `Take Back: ${editLabels.undo}` : 'Take Back', 'edit.undo', 'CmdOrCtrl+Z'),
        item(editLabels.redo ? `Bring Back: ${editLabels.redo}` : 'Bring Back', 'edit.redo', 'CmdOrCtrl+Shift+Z'),
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
        item('Show or Hide Estimates', 'view.toggleOverlay', 'CmdOrCtrl+H'),
        { type: 'separator' },
        { role: 'resetZoom', label: 'Actual Size' },
        { role: 'zoomIn', label: 'Larger Text' },
        { role: 'zoomOut', label: 'Smaller Text' },
      ],
    },
    {
      label: '&Model',
      submenu: [
        item('Fill Blank Cells', 'model.fill', 'CmdOrCtrl+Enter'),
        item('Weigh Centering Choices', 'model.compareCentering'),
        item('Search Rank and Regularization…', 'model.tune'),
      ],
    },
    {
      label: '&Help',
      submenu: [item('How Rankfill Fills Cells', 'help.guide', 'F1')],
    },
  ];
}
