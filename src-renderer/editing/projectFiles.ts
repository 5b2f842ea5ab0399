/**
 * Project files from the page: keep (save), keep as, open, recent files,
 * autosave to a recovery snapshot, the restore offer at start, and asking
 * before unsaved work is left behind. The main side does the disk work
 * (atomic write with .bak, validation); this module decides when and asks.
 */
import { formatProblem } from '../../src-shared/io/problem';
import { AutosaveSchedule } from '../../src-shared/project/autosaveSchedule';
import { parseProject, serializeProject } from '../../src-shared/project/projectFile';
import type { HostBridge } from '../bridge/hostBridge';
import { pathDialog, restoreDialog, unsavedChangesDialog } from '../dialogs/projectDialogs';
import type { Notice } from '../panels/notice';
import type { DocumentStore } from '../state/documentStore';

const baseName = (p: string) => p.split(/[\\/]/).pop() ?? p;
const titleOf = (p: string) => baseName(p).replace(/\.rankfill$/i, '') || 'Untitled';
const describe = (err: unknown) => (err instanceof Error ? err.message : String(err));

export class ProjectFiles {
  /** This window's recovery snapshot id. */
  recoveryId = `w${Date.now().toString(36)}${Math.random().toString(36).slice(2, 8)}`;
  /** The shared autosave schedule (src-shared/project/autosaveSchedule.ts). */
  private readonly autosave = new AutosaveSchedule(() => this.writeSnapshot(), {
    set: (fn, ms) => window.setTimeout(fn, ms),
    clear: (h) => window.clearTimeout(h as number),
  });
  private snapshotOnDisk = false;
  /** Paths typed in the browser host's path dialog start here. */
  private folder = '';

  constructor(
    private readonly bridge: HostBridge,
    private readonly store: DocumentStore,
    private readonly notice: Notice,
  ) {
    store.subscribe((e) => {
      if (e.type === 'replaced') {
        this.cancelAutosave();
        void this.discardSnapshot();
      } else if (this.store.dirty) this.scheduleAutosave();
      else if (e.type === 'history' && !this.store.dirty) {
        // Undone back to the saved state: nothing to recover.
        this.cancelAutosave();
        void this.discardSnapshot();
      }
    });
    window.addEventListener('beforeunload', (e) => {
      if (!this.store.dirty) return;
      void this.flushAutosave();
      e.preventDefault();
      e.returnValue = '';
    });
  }

  // ----- autosave --------------------------------------------------------------------

  private scheduleAutosave(): void {
    this.autosave.changed();
  }

  private cancelAutosave(): void {
    this.autosave.cancel();
  }

  /** Write the recovery snapshot now (if there are unsaved changes). */
  flushAutosave(): Promise<void> {
    if (!this.store.dirty || this.store.current.rowLabels.length === 0) {
      this.autosave.cancel();
      return this.autosave.idle();
    }
    this.autosave.changed();
    return this.autosave.flush();
  }

  private async writeSnapshot(): Promise<void> {
    if (!this.store.dirty || this.store.current.rowLabels.length === 0) return;
    const projectText = serializeProject(this.store.toProject());
    const req = { id: this.recoveryId, title: this.store.title, sourcePath: this.store.filePath, projectText };
    try {
      await this.bridge.call('recovery.write', req);
      this.snapshotOnDisk = true;
    } catch (err) {
      this.notice.show(
        `Autosave failed: ${describe(err)}. Your changes are still here; keep the project to be safe.`,
        'error',
      );
    }
  }

  private async discardSnapshot(): Promise<void> {
    await this.autosave.idle();
    if (!this.snapshotOnDisk) return;
    this.snapshotOnDisk = false;
    await this.bridge.call('recovery.discard', { id: this.recoveryId }).catch(() => undefined);
  }

  /** At start: offer work left behind by a session that ended without saving. */
  async offerRecovery(): Promise<void> {
    let entries;
    try {
      entries = (await this.bridge.call('recovery.list', {})).entries.filter((e) => e.id !== this.recoveryId);
    } catch {
      return;
    }
    if (entries.length === 0) return;
    const choice = await restoreDialog(entries);
    if (choice.action === 'later') return;
    if (choice.action === 'discard-all') {
      for (const e of entries) await this.bridge.call('recovery.discard', { id: e.id }).catch(() => undefined);
      this.notice.show('Unsaved work from the earlier session was thrown away.', 'info');
      return;
    }
    const reply = await this.bridge.call('recovery.restore', { id: choice.id });
    if (!reply.ok) {
      this.notice.show(
        ['The unsaved work could not be restored:', ...reply.problems.map(formatProblem)].join('\n'),
        'error',
        0,
      );
      return;
    }
    const parsed = parseProject(reply.projectText, reply.entry.title);
    if (!parsed.ok) {
      this.notice.show(
        ['The unsaved work could not be restored:', ...parsed.problems.map(formatProblem)].join('\n'),
        'error',
        0,
      );
      return;
    }
    const src = reply.entry.sourcePath;
    this.store.replaceProject(
      parsed.project,
      reply.entry.title,
      src ? { kind: 'file', name: src } : { kind: 'new', name: '' },
      src,
    );
    // Adopt the snapshot: the next autosave overwrites it, a save removes it.
    this.recoveryId = choice.id;
    this.snapshotOnDisk = true;
    this.store.markUnsaved();
    this.notice.show(
      `Restored unsaved work “${reply.entry.title}”. Keep the project to make it permanent.`,
      'info',
      10000,
    );
  }

  // ----- asking before leaving unsaved work -------------------------------------------

  /** True when it is fine to replace the open document (saved, discarded or clean). */
  async confirmLeave(doing: string): Promise<boolean> {
    if (!this.store.dirty) return true;
    const choice = await unsavedChangesDialog(this.store.title, doing);
    if (choice === 'stay') return false;
    if (choice === 'save') return this.save();
    this.cancelAutosave();
    await this.discardSnapshot();
    return true;
  }

  /** Electron asked to close the window. */
  async closeRequested(): Promise<void> {
    if (await this.confirmLeave('Closing the window')) {
      this.store.markSaved(); // nothing left to ask about
      await this.bridge.call('app.closeWindow', {});
    }
  }

  // ----- keep, keep as, open ----------------------------------------------------------

  private async choosePath(purpose: 'open' | 'save'): Promise<string | null> {
    const suggested = `${this.store.title || 'Untitled'}.rankfill`;
    const native = await this.bridge.call('project.choosePath', {
      purpose: purpose === 'open' ? 'open-project' : 'save-project',
      suggestedName: suggested,
    });
    if (native.supported) return native.path;
    if (!this.folder) this.folder = (await this.bridge.call('project.defaultFolder', {})).folder;
    const recent = (await this.bridge.call('recent.list', {})).files.map((f) => f.path);
    const sep = this.folder.includes('\\') && !this.folder.includes('/') ? '\\' : '/';
    const initial =
      purpose === 'save'
        ? (this.store.filePath ?? `${this.folder}${this.folder.endsWith(sep) ? '' : sep}${suggested}`)
        : (recent[0] ?? `${this.folder}${sep}`);
    return pathDialog({ purpose, initial, folder: this.folder, recent: purpose === 'open' ? recent : [] });
  }

  /** Keep the project in its file (asks for a path the first time). True when saved. */
  async save(): Promise<boolean> {
    if (!this.store.filePath) return this.saveAs();
    return this.saveTo(this.store.filePath);
  }

  async saveAs(): Promise<boolean> {
    const p = await this.choosePath('save');
    return p ? this.saveTo(p) : false;
  }

  private async saveTo(path: string): Promise<boolean> {
    const projectText = serializeProject(this.store.toProject());
    const revisionAtSave = this.store.revision;
    try {
      const reply = await this.bridge.call('project.save', { path, projectText });
      if (!reply.ok) {
        this.notice.show(['The project was not kept:', ...reply.problems.map(formatProblem)].join('\n'), 'error', 0);
        return false;
      }
      if (this.store.revision === revisionAtSave) this.store.markSaved(reply.path);
      else this.store.filePath = reply.path; // edits arrived while saving: still unsaved
      this.store.title = titleOf(reply.path);
      this.store.source = { kind: 'file', name: reply.path };
      this.cancelAutosave();
      if (!this.store.dirty) await this.discardSnapshot();
      this.notice.show(
        `Kept in ${reply.path} (${(reply.bytes / 1024).toFixed(1)} KB; the previous version, if any, is kept as ${baseName(reply.path)}.bak).`,
        'info',
      );
      return true;
    } catch (err) {
      this.notice.show(`The project was not kept: ${describe(err)}`, 'error', 0);
      return false;
    }
  }

  async open(path?: string): Promise<boolean> {
    if (!(await this.confirmLeave('Opening another project'))) return false;
    const p = path ?? (await this.choosePath('open'));
    if (!p) return false;
    try {
      const reply = await this.bridge.call('project.open', { path: p });
      if (!reply.ok) {
        this.notice.show(
          [`${baseName(p)} was not opened (the open project is unchanged):`, ...reply.problems.map(formatProblem)].join(
            '\n',
          ),
          'error',
          0,
        );
        return false;
      }
      const parsed = parseProject(reply.projectText, baseName(reply.path));
      if (!parsed.ok) {
        this.notice.show(
          [`${baseName(p)} was not opened:`, ...parsed.problems.map(formatProblem)].join('\n'),
          'error',
          0,
        );
        return false;
      }
      this.store.replaceProject(parsed.project, titleOf(reply.path), { kind: 'file', name: reply.path }, reply.path);
      this.notice.show(`Opened ${reply.path}.`, 'info');
      return true;
    } catch (err) {
      this.notice.show(`The project was not opened: ${describe(err)}`, 'error', 0);
      return false;
    }
  }

  async openRecent(index: number): Promise<void> {
    const files = (await this.bridge.call('recent.list', {})).files;
    const f = files[index];
    if (f) await this.open(f.path);
  }
}
