/**
 * The one command registry: every command id has a handler that reaches its
 * target, the menu sends only known ids, and the shortcuts the menu shows are
 * the ones the page answers. Expected mappings are our own design (common
 * practice, no source).
 */
import type { MenuItemConstructorOptions } from 'electron';
import { describe, expect, it } from 'vitest';
import { appMenuTemplate } from '../../../src-main/hosts/electron/appMenu';
import { commandHandlers, type CommandTargets } from '../../../src-renderer/commands/commandHandlers';
import { CommandRegistry } from '../../../src-renderer/commands/commandRegistry';
import {
  COMMAND_IDS,
  COMMAND_SHORTCUTS,
  commandForKey,
  parseAccelerator,
  parseCommand,
  type CommandId,
} from '../../../src-shared/commands';

/** Targets that record which function was called with what. */
function recordingTargets(calls: string[]): CommandTargets {
  const rec =
    (name: string) =>
    (...args: unknown[]) => {
      calls.push(args.length ? `${name}(${args.join(',')})` : name);
    };
  const group = <K extends string>(prefix: string, names: readonly K[]) =>
    Object.fromEntries(names.map((n) => [n, rec(`${prefix}.${n}`)])) as Record<K, () => void>;
  return {
    edit: group('edit', [
      'undo',
      'redo',
      'addRow',
      'addColumn',
      'renameRow',
      'renameColumn',
      'deleteRows',
      'deleteColumns',
      'moveRow',
      'moveColumn',
      'sortByLabel',
      'sortByColumn',
      'transpose',
      'editScale',
    ] as const),
    files: group('files', ['save', 'saveAs', 'open', 'openRecent', 'clearRecent', 'closeRequested'] as const),
    chooseSample: rec('chooseSample'),
    chooseImportFile: rec('chooseImportFile'),
    openExport: rec('openExport'),
    openReport: rec('openReport'),
    toggleOverlay: rec('toggleOverlay'),
    toggleSidePanel: rec('toggleSidePanel'),
    fill: rec('fill'),
    showTab: rec('showTab'),
    showGuide: rec('showGuide'),
  };
}

const flatten = (items: MenuItemConstructorOptions[]): MenuItemConstructorOptions[] =>
  items.flatMap((i) => [i, ...(Array.isArray(i.submenu) ? flatten(i.submenu) : [])]);

describe('command registry', () => {
  it('every command id has a handler, and each reaches a different target', () => {
    const calls: string[] = [];
    const handlers = commandHandlers(recordingTargets(calls));
    expect(Object.keys(handlers).sort()).toEqual([...COMMAND_IDS].sort());
    const reached = new Map<CommandId, string>();
    for (const id of COMMAND_IDS) {
      calls.length = 0;
      handlers[id](id === 'file.openRecent' ? 3 : undefined);
      expect(calls, id).toHaveLength(1);
      reached.set(id, calls[0]);
    }
    expect(new Set(reached.values()).size).toBe(COMMAND_IDS.length);
    expect(reached.get('file.openSample')).toBe('chooseSample');
    expect(reached.get('help.guide')).toBe('showGuide');
    expect(reached.get('file.openRecent')).toBe('files.openRecent(3)');
    expect(reached.get('edit.moveRowUp')).toBe('edit.moveRow(-1)');
    expect(reached.get('edit.sortByColumnDesc')).toBe('edit.sortByColumn(desc)');
    expect(reached.get('model.tune')).toBe('showTab(tuning)');
  });

  it('runs menu strings, refuses unknown ones, and reports a failing command', async () => {
    const calls: string[] = [];
    const errors: string[] = [];
    const targets = recordingTargets(calls);
    targets.files.save = () => Promise.reject(new Error('disk full'));
    const reg = new CommandRegistry(commandHandlers(targets), (id, err) =>
      errors.push(`${id}: ${(err as Error).message}`),
    );
    expect(reg.runWire('file.openRecent.2')).toBe(true);
    expect(reg.runWire('file.openRecent')).toBe(false);
    expect(reg.runWire('file.format-disk')).toBe(false);
    reg.run('file.save');
    await Promise.resolve();
    await Promise.resolve();
    expect(calls).toEqual(['files.openRecent(2)']);
    expect(errors).toEqual(['file.save: disk full']);
  });
});

describe('menu and shortcuts', () => {
  it('the menu sends only known command ids, including Open a Sample Set and the F1 guide', () => {
    const sent: string[] = [];
    const items = flatten(appMenuTemplate((c) => sent.push(c), false, ['/tmp/a.rankfill']));
    for (const it of items) if (typeof it.click === 'function' && !it.role) (it.click as () => void)();
    expect(sent.length).toBeGreaterThan(15);
    for (const c of sent) expect(parseCommand(c), c).toBeDefined();
    expect(sent).toContain('file.openSample');
    expect(sent).toContain('file.openRecent.0');
    const guide = items.find((i) => i.label === 'How Rankfill Fills Cells');
    expect(guide?.accelerator).toBe('F1');
  });

  it('every shortcut the menu shows is the one the page answers', () => {
    const items = flatten(appMenuTemplate(() => undefined, false));
    const shown = items.filter((i) => i.accelerator).map((i) => i.accelerator as string);
    expect(shown).toContain('CmdOrCtrl+Enter');
    for (const [id, accs] of Object.entries(COMMAND_SHORTCUTS)) {
      for (const acc of accs ?? []) {
        const c = parseAccelerator(acc);
        expect(commandForKey({ key: c.key, ctrlOrCmd: c.ctrlOrCmd, shift: c.shift, alt: c.alt }), acc).toBe(id);
      }
    }
    // A capital letter with Shift (as the browser reports it) is the same key.
    expect(commandForKey({ key: 'S', ctrlOrCmd: true, shift: true, alt: false })).toBe('file.saveAs');
    expect(commandForKey({ key: 's', ctrlOrCmd: false, shift: false, alt: false })).toBeUndefined();
  });
});
