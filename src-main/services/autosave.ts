/**
 * Autosave of unsaved changes straight to the recovery folder (main side; used
 * by the crash-safety test's child process), on the shared schedule in
 * src-shared/project/autosaveSchedule.ts: a snapshot once edits pause, and at
 * the latest a few seconds after the first unsaved change. A failed write is
 * reported to `onError` and retried on the next change.
 */
import { AutosaveSchedule } from '../../src-shared/project/autosaveSchedule';
import type { ProjectDocument } from '../../src-shared/project/projectDocument';
import type { RecoveryStore } from './recovery';

const hostTimers = {
  set: (fn: () => void, ms: number) => setTimeout(fn, ms),
  clear: (h: unknown) => clearTimeout(h as ReturnType<typeof setTimeout>),
};

export interface AutosaveOptions {
  /** Override the shared timings (tests only). */
  delayMs?: number;
  maxDelayMs?: number;
  onError?: (err: unknown) => void;
  /** Called after each snapshot is written. */
  onSaved?: (file: string) => void;
}

export interface AutosaveSource {
  doc: () => ProjectDocument;
  title?: string;
  sourcePath?: string | null;
}

export class Autosaver {
  private source: AutosaveSource | undefined;
  private readonly schedule: AutosaveSchedule;

  constructor(
    private readonly store: RecoveryStore,
    readonly id: string,
    private readonly opts: AutosaveOptions = {},
  ) {
    this.schedule = new AutosaveSchedule(() => this.writeNow(), hostTimers, opts.delayMs, opts.maxDelayMs);
  }

  private async writeNow(): Promise<void> {
    const src = this.source;
    if (!src) return;
    try {
      const entry = await this.store.writeSnapshot(this.id, src.doc(), {
        title: src.title,
        sourcePath: src.sourcePath,
      });
      this.opts.onSaved?.(entry.file);
    } catch (err) {
      this.opts.onError?.(err);
    }
  }

  /** Call after every edit; `source.doc` is read when the snapshot is written. */
  changed(source: AutosaveSource): void {
    this.source = source;
    this.schedule.changed();
  }

  /** Writes any pending snapshot now. */
  flush(): Promise<void> {
    return this.schedule.flush();
  }

  /** After a normal save: drop pending work and remove the snapshot. */
  async saved(): Promise<void> {
    this.schedule.cancel();
    await this.schedule.idle();
    await this.store.discard(this.id);
  }

  /** Stops the timer without writing (e.g. when the window closes after the user chose to discard). */
  dispose(): void {
    this.schedule.cancel();
  }
}
