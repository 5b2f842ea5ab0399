/**
 * Every command of the workbench, by id: what the Electron menu sends (as the
 * `menu.command` event), what the keyboard shortcuts and the edit bar run.
 * The page has exactly one handler per id (src-renderer/commands/); a unit
 * test enumerates them. Shortcuts are written once here, in Electron's
 * accelerator notation, and read by both the menu and the page.
 */

export const COMMAND_IDS = [
  'file.openSample',
  'file.import',
  'file.openProject',
  'file.openRecent',
  'file.clearRecent',
  'file.save',
  'file.saveAs',
  'file.export',
  'file.report',
  'edit.undo',
  'edit.redo',
  'edit.addRow',
  'edit.addColumn',
  'edit.renameRow',
  'edit.renameColumn',
  'edit.deleteRows',
  'edit.deleteColumns',
  'edit.moveRowUp',
  'edit.moveRowDown',
  'edit.moveColumnLeft',
  'edit.moveColumnRight',
  'edit.sortByLabelAsc',
  'edit.sortByLabelDesc',
  'edit.sortByColumnAsc',
  'edit.sortByColumnDesc',
  'edit.transpose',
  'edit.scale',
  'view.toggleOverlay',
  'view.toggleSidePanel',
  'model.fill',
  'model.compareCentering',
  'model.tune',
  'help.guide',
  'app.closeRequested',
] as const;

export type CommandId = (typeof COMMAND_IDS)[number];

/** A command as sent over the wire: its id, and for `file.openRecent` the list position (`file.openRecent.3`). */
export type CommandWire = Exclude<CommandId, 'file.openRecent'> | `file.openRecent.${number}`;

export interface ParsedCommand {
  id: CommandId;
  /** The recent-file index for `file.openRecent`. */
  index?: number;
}

const KNOWN = new Set<string>(COMMAND_IDS);

/** Read a command string from the menu; undefined for anything that is not one of ours. */
export function parseCommand(text: string): ParsedCommand | undefined {
  const recent = /^file\.openRecent\.(\d{1,3})$/.exec(text);
  if (recent) return { id: 'file.openRecent', index: Number(recent[1]) };
  if (text === 'file.openRecent' || !KNOWN.has(text)) return undefined;
  return { id: text as CommandId };
}

export function commandWire(id: Exclude<CommandId, 'file.openRecent'>): CommandWire;
export function commandWire(id: 'file.openRecent', index: number): CommandWire;
export function commandWire(id: CommandId, index?: number): CommandWire {
  return (id === 'file.openRecent' ? `file.openRecent.${index ?? 0}` : id) as CommandWire;
}

/**
 * Shortcuts in accelerator notation (CmdOrCtrl = Cmd on macOS, Ctrl elsewhere).
 * The first one of a command is the one the menu shows.
 */
export const COMMAND_SHORTCUTS: Partial<Record<CommandId, readonly string[]>> = {
  'file.import': ['CmdOrCtrl+O'],
  'file.openProject': ['CmdOrCtrl+Shift+O'],
  'file.save': ['CmdOrCtrl+S'],
  'file.saveAs': ['CmdOrCtrl+Shift+S'],
  'file.export': ['CmdOrCtrl+E'],
  'edit.undo': ['CmdOrCtrl+Z'],
  'edit.redo': ['CmdOrCtrl+Shift+Z', 'CmdOrCtrl+Y'],
  'view.toggleOverlay': ['CmdOrCtrl+H'],
  'view.toggleSidePanel': ['CmdOrCtrl+B'],
  'model.fill': ['CmdOrCtrl+Enter'],
  'help.guide': ['F1'],
};

export interface KeyChord {
  key: string;
  ctrlOrCmd: boolean;
  shift: boolean;
  alt: boolean;
}

/** Split an accelerator into the parts a keyboard event is matched on. */
export function parseAccelerator(acc: string): KeyChord {
  const parts = acc.split('+');
  const key = parts[parts.length - 1];
  const mods = new Set(parts.slice(0, -1));
  return {
    key: key.length === 1 ? key.toLowerCase() : key,
    ctrlOrCmd: mods.has('CmdOrCtrl'),
    shift: mods.has('Shift'),
    alt: mods.has('Alt'),
  };
}

/** The command a key press runs, if any (`key` as KeyboardEvent.key). */
export function commandForKey(e: {
  key: string;
  ctrlOrCmd: boolean;
  shift: boolean;
  alt: boolean;
}): CommandId | undefined {
  const key = e.key.length === 1 ? e.key.toLowerCase() : e.key;
  for (const [id, accs] of Object.entries(COMMAND_SHORTCUTS) as [CommandId, readonly string[]][]) {
    for (const acc of accs) {
      const c = parseAccelerator(acc);
      if (c.key === key && c.ctrlOrCmd === e.ctrlOrCmd && c.shift === e.shift && c.alt === e.alt) return id;
    }
  }
  return undefined;
}
