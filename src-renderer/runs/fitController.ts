/**
 * Runs the model from the page: Fill (a fit with per-cell trust), the live
 * refit after each edit (warm-started from the shown run's factors, the older
 * live job cancelled), cross-validation of a run, and setting grids for the
 * centering comparison and the tuning panel. All heavy work happens in the
 * main side's worker; this class only sends snapshots and collects results.
 */
import { DEFAULT_FOLDS } from '../../src-shared/engine/defaults';
import type { ApiEventPayload, CrossValidationPayload, TunePayload } from '../../src-shared/api';
import { fitResultFromPayload, matrixToPayload, trustFromPayload } from '../../src-shared/apiCodec';
import type { FitSettings } from '../../src-shared/engine/types';
import type { HostBridge } from '../bridge/hostBridge';
import { JobEndedError, JobTracker } from '../bridge/jobTracker';
import type { DocumentStore } from '../state/documentStore';
import type { Run, RunStore } from './runStore';
import { runIsCurrent } from './runMatch';
import { compareSeedFits } from '../../src-shared/engine/seedStability';

/** Ensemble used for the per-cell spread: the k fold models. */
const TRUST_FOLDS = DEFAULT_FOLDS;
const EVALUATION_FOLDS = DEFAULT_FOLDS;

export type FillState =
  | { phase: 'idle' }
  | { phase: 'running'; jobId: string | null; settings: FitSettings; progress: ApiEventPayload<'fit.progress'>[] }
  | { phase: 'failed'; message: string }
  | { phase: 'cancelled' };

/** Who a run brought back from a project was. */
export interface RunIdentity {
  number: number;
  name?: string;
  createdAt: number;
}

export class FitController {
  private readonly jobs: JobTracker;
  private fillJob: string | null = null;
  private liveJob: string | null = null;
  private liveSeq = 0;
  private readonly fillListeners = new Set<(s: FillState) => void>();
  /** Refit the shown run after each edit. */
  liveRefit = true;

  constructor(
    private readonly bridge: HostBridge,
    private readonly doc: DocumentStore,
    private readonly runs: RunStore,
  ) {
    this.jobs = new JobTracker(bridge);
    doc.subscribe((e) => {
      if (e.type === 'cells') this.scheduleLiveRefit();
      else if (e.type === 'replaced') {
        // Nothing computed on the old data set may reach the new one.
        void this.cancelFill();
        void this.cancelLive();
        runs.clear();
      } else if (e.type === 'shape') this.scheduleLiveRefit();
    });
  }

  onFillState(l: (s: FillState) => void): () => void {
    this.fillListeners.add(l);
    return () => this.fillListeners.delete(l);
  }

  private setFill(s: FillState): void {
    for (const l of this.fillListeners) l(s);
  }

  get filling(): boolean {
    return this.fillJob !== null;
  }

  /**
   * Fill the blank cells with a new run. `identity` brings back a saved run as it was:
   * its number, name and the time of its Fill. Resolves with the run, or undefined when
   * cancelled or failed.
   */
  async fill(settings: FitSettings, identity?: RunIdentity): Promise<Run | undefined> {
    if (this.fillJob) await this.cancelFill();
    await this.cancelLive();
    const revision = this.doc.revision;
    const { dataSet, layout } = this.doc;
    const matrix = this.doc.current;
    const state: FillState = { phase: 'running', jobId: null, settings, progress: [] };
    this.setFill(state);
    let jobId: string;
    try {
      ({ jobId } = await this.bridge.call('fit.start', {
        matrix: matrixToPayload(matrix),
        settings,
        trust: { method: 'folds', k: TRUST_FOLDS },
      }));
    } catch (err) {
      this.setFill({ phase: 'failed', message: err instanceof Error ? err.message : String(err) });
      return undefined;
    }
    this.fillJob = jobId;
    state.jobId = jobId;
    try {
      const outcome = await this.jobs.follow(jobId, {
        onProgress: (p) => {
          state.progress.push(p);
          this.setFill(state);
        },
      });
      if (outcome.kind !== 'fit') throw new Error('unexpected reply to a fit');
      if (this.doc.dataSet !== dataSet) {
        // Another data set was opened while this one was fitted: its result is dropped.
        this.setFill({ phase: 'idle' });
        return undefined;
      }
      const result = fitResultFromPayload(outcome.result);
      const run = this.runs.add(
        {
          settings,
          result,
          trust: outcome.trust ? trustFromPayload(outcome.trust) : undefined,
          createdAt: identity?.createdAt ?? Date.now(),
          docRevision: revision,
          dataSet,
          layout,
          rows: result.rows,
          cols: result.cols,
          refits: 0,
          ...(identity?.name ? { name: identity.name } : {}),
        },
        identity?.number,
      );
      this.setFill({ phase: 'idle' });
      // Edits made while the fit ran are caught up by a live refit.
      if (this.doc.revision !== revision) this.scheduleLiveRefit();
      return run;
    } catch (err) {
      if (err instanceof JobEndedError && err.cancelled) this.setFill({ phase: 'cancelled' });
      else this.setFill({ phase: 'failed', message: err instanceof Error ? err.message : String(err) });
      return undefined;
    } finally {
      if (this.fillJob === jobId) this.fillJob = null;
    }
  }

  async cancelFill(): Promise<void> {
    const id = this.fillJob;
    this.fillJob = null;
    if (id) await this.bridge.call('fit.cancel', { jobId: id }).catch(() => undefined);
  }

  private async cancelLive(): Promise<void> {
    const id = this.liveJob;
    this.liveJob = null;
    if (id) await this.bridge.call('fit.cancel', { jobId: id }).catch(() => undefined);
  }

  private scheduleLiveRefit(): void {
    if (!this.liveRefit || this.fillJob) return;
    const run = this.runs.shown;
    if (!run) return;
    // Start at once; a newer edit cancels this refit (so a burst of changes costs one finished fit).
    void this.runLiveRefit(run);
  }

  private async runLiveRefit(run: Run): Promise<void> {
    const revision = this.doc.revision;
    const { dataSet, layout } = this.doc;
    const matrix = this.doc.current;
    // The run's factors are a good start only for the same cells in the same places.
    const sameLayout =
      run.layout === layout && matrix.rowLabels.length === run.rows && matrix.colLabels.length === run.cols;
    const previous = this.liveJob;
    if (previous) void this.bridge.call('fit.cancel', { jobId: previous }).catch(() => undefined);
    // The page names the job itself and follows it before sending, so the result
    // can be drawn as soon as it arrives, whatever the reply to the call is doing.
    const clientId = `live-${++this.liveSeq}-${Math.random().toString(36).slice(2, 8)}`;
    const jobId = `fit:${clientId}`;
    this.liveJob = jobId;
    const outcomePromise = this.jobs.follow(jobId);
    this.bridge
      .call('fit.start', {
        matrix: matrixToPayload(matrix),
        settings: run.settings,
        clientId,
        ...(sameLayout && run.result.rank > 0
          ? {
              warmStart: {
                rowFactors: Array.from(run.result.rowFactors),
                colFactors: Array.from(run.result.colFactors),
              },
            }
          : {}),
      })
      .catch((err: unknown) => this.jobs.abandon(jobId, err instanceof Error ? err : new Error(String(err))));
    try {
      const outcome = await outcomePromise;
      if (outcome.kind !== 'fit' || this.liveJob !== jobId || this.doc.dataSet !== dataSet || !this.runs.get(run.id))
        return;
      const result = fitResultFromPayload(outcome.result);
      if (result.rows !== matrix.rowLabels.length || result.cols !== matrix.colLabels.length) return;
      // The refit itself is drawn first (fast, warm-started); the ensemble spread follows in a second job.
      this.runs.refit(run.id, result, undefined, revision, layout);
      this.liveJob = null;
      void this.refreshTrust(run, revision);
    } catch {
      // A cancelled live refit was superseded by a newer one; a failed one leaves the last result shown.
    } finally {
      if (this.liveJob === jobId) this.liveJob = null;
    }
  }

  /** Recompute a run's per-cell spread after a live refit, unless newer edits overtake it. */
  private async refreshTrust(run: Run, revision: number): Promise<void> {
    if (this.doc.revision !== revision || this.liveJob) return;
    let jobId: string;
    try {
      ({ jobId } = await this.bridge.call('fit.start', {
        matrix: matrixToPayload(this.doc.current),
        settings: run.settings,
        trust: { method: 'folds', k: TRUST_FOLDS },
      }));
    } catch {
      return;
    }
    this.liveJob = jobId;
    try {
      const outcome = await this.jobs.follow(jobId);
      if (
        outcome.kind !== 'fit' ||
        this.liveJob !== jobId ||
        this.doc.revision !== revision ||
        !outcome.trust ||
        !this.runs.get(run.id)
      )
        return;
      this.runs.setTrust(run.id, trustFromPayload(outcome.trust));
    } catch {
      // Superseded by a newer edit.
    } finally {
      if (this.liveJob === jobId) this.liveJob = null;
    }
  }

  /** k-fold cross-validation of a run's settings on the current data; stores the errors on the run. */
  async evaluate(run: Run, onStep?: (done: number, total: number) => void): Promise<CrossValidationPayload> {
    const seed = run.settings.seed;
    const { jobId } = await this.bridge.call('fit.evaluate', {
      matrix: matrixToPayload(this.doc.current),
      settings: run.settings,
      folds: EVALUATION_FOLDS,
      seed,
    });
    const outcome = await this.jobs.follow(jobId, { onStep: (p) => onStep?.(p.done, p.total) });
    if (outcome.kind !== 'evaluated') throw new Error('unexpected reply to an evaluation');
    this.runs.setEvaluation(run.id, { ...outcome.result, k: EVALUATION_FOLDS, seed });
    await this.checkSeeds(run);
    return outcome.result;
  }

  /** Refit the run's settings with seed + 1 and record how far its filled values move (engine/seedStability.ts). */
  private async checkSeeds(run: Run): Promise<void> {
    if (!runIsCurrent(run, this.doc)) return;
    const matrix = this.doc.current;
    const revision = this.doc.revision;
    try {
      const { jobId } = await this.bridge.call('fit.start', {
        matrix: matrixToPayload(matrix),
        settings: { ...run.settings, seed: run.settings.seed + 1 },
      });
      const outcome = await this.jobs.follow(jobId);
      if (outcome.kind !== 'fit' || this.doc.revision !== revision || !runIsCurrent(run, this.doc)) return;
      const other = fitResultFromPayload(outcome.result).predictions;
      this.runs.setSeedStability(
        run.id,
        compareSeedFits(matrix, run.result.predictions, other, [run.settings.seed, run.settings.seed + 1]),
      );
    } catch {
      // The check is an addition to the evaluation; its failure leaves the errors shown.
    }
  }

  /** Evaluate several settings on the same folds (centering comparison, tuning). */
  async evaluateGrid(
    settingsList: FitSettings[],
    folds: number,
    seed: number,
    onStep?: (done: number, total: number) => void,
    onJob?: (jobId: string) => void,
  ): Promise<TunePayload> {
    const { jobId } = await this.bridge.call('fit.tune', {
      matrix: matrixToPayload(this.doc.current),
      settingsList,
      folds,
      seed,
    });
    onJob?.(jobId);
    const outcome = await this.jobs.follow(jobId, { onStep: (p) => onStep?.(p.done, p.total) });
    if (outcome.kind !== 'tuned') throw new Error('unexpected reply to a settings grid');
    return outcome.result;
  }

  cancelJob(jobId: string): Promise<unknown> {
    return this.bridge.call('fit.cancel', { jobId }).catch(() => undefined);
  }
}
