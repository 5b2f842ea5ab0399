/**
 * The scaffolding shared by the panels that evaluate a list of settings on the
 * same folds (centering comparison, tuning): Run and Stop buttons, a progress
 * bar and line, an error box, the results area, and a note when the results
 * no longer belong to the data (another data set opened, or edits since).
 * A run still going when another data set is opened is stopped.
 */
import type { TunePayload } from '../../src-shared/api';
import type { FitSettings } from '../../src-shared/engine/types';
import { JobEndedError } from '../bridge/jobTracker';
import { el } from './dom';
import type { GridKind } from '../report/studyRecord';
import type { PanelContext } from './panelContext';

export interface GridRunPlan {
  settingsList: FitSettings[];
  folds: number;
  seed: number;
}

export interface GridRunSpec<P extends GridRunPlan> {
  /** testid prefix: `${prefix}-run`, `-stop`, `-progress`, `-progress-text`, `-error`, `-stale`, `-results`. */
  prefix: string;
  runLabel: string;
  idleText: string;
  /** What to evaluate, or a message saying why not. */
  plan(): P | { error: string };
  startText(plan: P): string;
  doneText(plan: P, reply: TunePayload): string;
  failedText: string;
  errorPrefix: string;
  staleText: { replaced: string; edited: string };
  render(reply: TunePayload, plan: P): void;
  /** Keep the result for the study report under this name (with the data revision it was computed on). */
  recordAs?: GridKind;
}

export class GridRunPanel<P extends GridRunPlan> {
  readonly runButton: HTMLButtonElement;
  readonly stopButton: HTMLButtonElement;
  readonly bar: HTMLProgressElement;
  readonly progressText: HTMLElement;
  readonly error: HTMLElement;
  readonly stale: HTMLElement;
  /** The panel fills this; it is shown once a run has finished. */
  readonly results: HTMLElement;
  private jobId: string | null = null;
  private running = false;
  private stopRequested = false;
  private runToken = 0;
  private dataChanged: 'replaced' | 'edited' | null = null;

  constructor(
    private readonly ctx: PanelContext,
    private readonly spec: GridRunSpec<P>,
  ) {
    const p = spec.prefix;
    this.runButton = el('button', { className: 'rf-button rf-primary', testid: `${p}-run` }, [spec.runLabel]);
    this.stopButton = el('button', { className: 'rf-button', testid: `${p}-stop`, disabled: true }, ['Stop']);
    this.bar = el('progress', { testid: `${p}-progress`, hidden: true });
    this.bar.max = 1;
    this.bar.value = 0;
    this.progressText = el('div', { className: 'rf-hint', testid: `${p}-progress-text` }, [spec.idleText]);
    this.error = el('div', { className: 'rf-panel-error', testid: `${p}-error`, hidden: true });
    this.stale = el('p', { className: 'rf-stale', testid: `${p}-stale`, hidden: true });
    this.results = el('div', { testid: `${p}-results`, hidden: true });
    this.runButton.addEventListener('click', () => void this.run());
    this.stopButton.addEventListener('click', () => this.stop('Stopping…'));
    ctx.store.subscribe((e) => {
      if (e.type === 'replaced') {
        if (this.running) {
          // The job is computing on the previous data: stop it and say why.
          this.runToken++;
          this.stop('Stopped: another data set was opened.');
          this.setRunning(false);
        }
        this.dataChanged = 'replaced';
        this.renderStale();
      } else if ((e.type === 'cells' || e.type === 'shape') && this.dataChanged === null && !this.results.hidden) {
        this.dataChanged = 'edited';
        this.renderStale();
      }
    });
  }

  /** Run / Stop, progress, errors and results, in display order. */
  controls(): HTMLElement[] {
    return [
      el('div', { className: 'rf-row' }, [this.runButton, this.stopButton]),
      this.bar,
      this.progressText,
      this.error,
      this.stale,
      this.results,
    ];
  }

  showError(message: string | null): void {
    this.error.hidden = message === null;
    this.error.textContent = message ?? '';
  }

  private setRunning(on: boolean): void {
    this.running = on;
    this.runButton.disabled = on;
    this.stopButton.disabled = !on;
    this.bar.hidden = !on;
  }

  private stop(text: string): void {
    this.stopRequested = true;
    this.progressText.textContent = text;
    if (this.jobId) void this.ctx.controller.cancelJob(this.jobId);
  }

  private renderStale(): void {
    this.stale.hidden = this.dataChanged === null || this.results.hidden;
    this.stale.textContent =
      this.dataChanged === 'replaced' ? this.spec.staleText.replaced : this.spec.staleText.edited;
  }

  private async run(): Promise<void> {
    if (this.running) return;
    this.showError(null);
    const plan = this.spec.plan();
    if ('error' in plan) {
      this.showError(plan.error);
      return;
    }
    if (this.ctx.store.current.rowLabels.length === 0) {
      this.showError('Open a data set first.');
      return;
    }
    const token = ++this.runToken;
    const revision = this.ctx.store.revision;
    this.stopRequested = false;
    this.jobId = null;
    this.setRunning(true);
    this.bar.value = 0;
    this.progressText.textContent = this.spec.startText(plan);
    try {
      const reply = await this.ctx.controller.evaluateGrid(
        plan.settingsList,
        plan.folds,
        plan.seed,
        (done, total) => {
          if (token !== this.runToken) return;
          this.bar.max = Math.max(1, total);
          this.bar.value = done;
          this.progressText.textContent = `Fitting fold models: ${done} of ${total} done.`;
        },
        (id) => {
          this.jobId = id;
          if (this.stopRequested) void this.ctx.controller.cancelJob(id);
        },
      );
      if (token !== this.runToken) return;
      this.dataChanged = null;
      this.progressText.textContent = this.spec.doneText(plan, reply);
      this.spec.render(reply, plan);
      if (this.spec.recordAs) this.ctx.record.setGrid(this.spec.recordAs, reply, revision);
      this.results.hidden = false;
    } catch (err) {
      if (token !== this.runToken) return;
      if (err instanceof JobEndedError && err.cancelled)
        this.progressText.textContent = 'Stopped. Earlier results, if any, stay shown.';
      else {
        this.progressText.textContent = this.spec.failedText;
        this.showError(`${this.spec.errorPrefix}: ${err instanceof Error ? err.message : String(err)}`);
      }
    } finally {
      if (token === this.runToken) {
        this.setRunning(false);
        this.jobId = null;
        this.renderStale();
      }
    }
  }
}
