/**
 * When to write a recovery snapshot: once edits pause for `pauseMs`, and at
 * the latest `maxMs` after the first unsaved change (so continuous typing is
 * still captured). Writes never overlap; each waits for the one before. The
 * page (editing/projectFiles.ts, through the API) and the main side
 * (services/autosave.ts, straight to the recovery folder) both use this one
 * schedule with these timings.
 */

/** Autosave waits for a pause of this long after a change ... */
const AUTOSAVE_PAUSE_MS = 1500;
/** ... but never longer than this after the first unsaved change. */
const AUTOSAVE_MAX_MS = 4000;

/** The host's timer functions (src-shared has no runtime of its own): pass setTimeout and clearTimeout. */
export interface Timers {
  set(fn: () => void, ms: number): unknown;
  clear(handle: unknown): void;
}

export class AutosaveSchedule {
  private timer: unknown;
  private firstPendingAt = 0;
  private pending = false;
  private writing: Promise<void> = Promise.resolve();

  constructor(
    /** Writes one snapshot; its failures are the caller's to report (a rejection is swallowed here). */
    private readonly write: () => Promise<void>,
    private readonly timers: Timers,
    private readonly pauseMs = AUTOSAVE_PAUSE_MS,
    private readonly maxMs = AUTOSAVE_MAX_MS,
  ) {}

  /** Call after every change. */
  changed(): void {
    const now = Date.now();
    if (!this.pending) this.firstPendingAt = now;
    this.pending = true;
    this.timers.clear(this.timer);
    const wait = Math.max(0, Math.min(this.pauseMs, this.firstPendingAt + this.maxMs - now));
    this.timer = this.timers.set(() => void this.flush(), wait);
  }

  /** Write now if a change is pending; resolves when every write so far has finished. */
  flush(): Promise<void> {
    const due = this.pending;
    this.cancel();
    if (!due) return this.writing;
    this.writing = this.writing.then(() => this.write().catch(() => undefined));
    return this.writing;
  }

  /** Drop a pending write (after a save, or when the document is left). */
  cancel(): void {
    this.timers.clear(this.timer);
    this.timer = undefined;
    this.pending = false;
  }

  /** Resolves when the write in progress, if any, has finished. */
  idle(): Promise<void> {
    return this.writing;
  }
}
