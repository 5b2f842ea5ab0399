/**
 * Autosave of unsaved changes to a recovery snapshot: after each change, a
 * snapshot is written once edits pause for `delayMs` (default 1.5 s), and at the
 * latest `maxDelayMs` (default 5 s) after the first unsaved change, so continuous
 * typing is still captured. Writes never overlap; a failed write is reported to
 * `onError` and retried on the next change.
 */
import type { ProjectDocument } from '../../src-shared/project/projectDocument';
import type { RecoveryStore } from './recovery';

export interface AutosaveOptions {
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
  private timer: ReturnType<typeof setTimeout> | undefined;
  private firstPendingAt = 0;
  private pending: AutosaveSource | undefined;
  private writing: Promise<void> = Promise.resolve();
  private readonly delayMs: number;
  private readonly maxDelayMs: number;

  constructor(
    private readonly store: RecoveryStore,
    readonly id: string,
    private readonly opts: AutosaveOptions = {},
  ) {
    this.delayMs = opts.delayMs ?? 1500;
    this.maxDelayMs = opts.maxDelayMs ?? 5000;
  }

  /** Call after every edit; `source.doc` is read when the snapshot is written. */
  changed(source: AutosaveSource): void {
    const now = Date.now();
    if (!this.pending) this.firstPendingAt = now;
    this.pending = source;
    if (this.timer) clearTimeout(this.timer);
    const wait = Math.max(0, Math.min(this.delayMs, this.firstPendingAt + this.maxDelayMs - now));
    this.timer = setTimeout(() => void this.flush(), wait);
  }

  /** Writes any pending snapshot now. */
  flush(): Promise<void> {
    if (this.timer) clearTimeout(this.timer);
    this.timer = undefined;
    const src = this.pending;
    this.pending = undefined;
    if (!src) return this.writing;
    this.writing = this.writing.then(async () => {
      try {
        const entry = await this.store.writeSnapshot(this.id, src.doc(), { title: src.title, sourcePath: src.sourcePath });
        this.opts.onSaved?.(entry.file);
      } catch (err) {
        this.opts.onError?.(err);
      }
    });
    return this.writing;
  }

  /** After a normal save: drop pending work and remove the snapshot. */
  async saved(): Promise<void> {
    if (this.timer) clearTimeout(this.timer);
    this.timer = undefined;
    this.pending = undefined;
    await this.writing;
    await this.store.discard(this.id);
  }

  /** Stops the timer without writing (e.g. when the window closes after the user chose to discard). */
  dispose(): void {
    if (this.timer) clearTimeout(this.timer);
    this.timer = undefined;
    this.pending = undefined;
  }
}
