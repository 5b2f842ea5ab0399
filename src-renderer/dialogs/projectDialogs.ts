/**
 * Questions about files: unsaved changes, restoring after a crash, and the
 * path dialog the browser host uses where Electron shows a native one.
 */
import type { RecoveryEntryPayload } from '../../src-shared/api';
import { listBlock, promptDialog, showModal } from './modal';
import { el } from '../panels/dom';

export type UnsavedChoice = 'save' | 'discard' | 'stay';

/** "You have unsaved changes": keep them first, throw them away, or stay. */
export function unsavedChangesDialog(title: string, doing: string): Promise<UnsavedChoice> {
  return showModal<UnsavedChoice>({
    title: 'Unsaved changes',
    body: `“${title}” has changes that are not kept in a project file. ${doing} would leave them behind.`,
    testId: 'unsaved-dialog',
    cancelValue: 'stay',
    buttons: [
      { label: 'Stay here', value: 'stay', testId: 'dialog-cancel' },
      { label: 'Leave them', value: 'discard', danger: true, testId: 'unsaved-discard' },
      { label: 'Keep project first', value: 'save', primary: true, testId: 'unsaved-save' },
    ],
  });
}

export type RestoreChoice = { action: 'restore'; id: string } | { action: 'discard-all' } | { action: 'later' };

/** Work left behind by a session that ended without saving: offer to bring it back. */
export function restoreDialog(entries: readonly RecoveryEntryPayload[]): Promise<RestoreChoice> {
  const newest = entries[0];
  const when = (iso: string) => new Date(iso).toLocaleString('en-GB');
  const body = el('div', {}, [
    el('p', { text: 'Rankfill found unsaved work from a session that did not close normally.' }),
    listBlock(
      entries
        .slice(0, 8)
        .map((e) => `${e.title}${e.sourcePath ? ` (${e.sourcePath})` : ' (never kept)'} — ${when(e.savedAt)}`),
      'restore-list',
    ),
    el('p', {
      className: 'rf-hint',
      text: entries.length > 1 ? 'Restore brings back the newest; the others stay offered next time.' : '',
    }),
  ]);
  return showModal<RestoreChoice>({
    title: 'Bring back unsaved work?',
    body,
    testId: 'restore-dialog',
    cancelValue: { action: 'later' },
    buttons: [
      { label: 'Not now', value: { action: 'later' }, testId: 'dialog-cancel' },
      { label: 'Throw it away', value: { action: 'discard-all' }, danger: true, testId: 'restore-discard' },
      {
        label: `Restore “${newest.title}”`,
        value: { action: 'restore', id: newest.id },
        primary: true,
        testId: 'restore-accept',
      },
    ],
  });
}

/** The browser host's own path dialog (the host runs on the user's machine, loopback only). */
export async function pathDialog(opts: {
  purpose: 'open' | 'save';
  initial: string;
  folder: string;
  recent: readonly string[];
  check?: (path: string) => string | undefined;
}): Promise<string | null> {
  const extra = el('div');
  if (opts.recent.length) {
    const list = el('div', { className: 'rf-path-recent', testid: 'path-recent' }, [
      el('span', { className: 'rf-hint', text: 'Recent:' }),
    ]);
    for (const p of opts.recent.slice(0, 6)) {
      const b = el('button', { className: 'rf-linklike', text: p, attrs: { type: 'button' } });
      b.addEventListener('click', () => {
        const input = b.closest('dialog')?.querySelector<HTMLInputElement>('[data-testid="prompt-input"]');
        if (input) input.value = p;
      });
      list.append(b);
    }
    extra.append(list);
  }
  const value = await promptDialog({
    title: opts.purpose === 'open' ? 'Open project' : 'Keep project as',
    label: 'Path of the project file on this computer',
    initial: opts.initial,
    confirmLabel: opts.purpose === 'open' ? 'Open' : 'Keep',
    hint: `Rankfill project files end in .rankfill. A relative path (or ~/…) starts from ${opts.folder}.`,
    testId: 'path-dialog',
    extra,
    check: (v) => (v.trim() === '' ? 'type a path' : opts.check?.(v.trim())),
  });
  return value === null ? null : value.trim();
}
