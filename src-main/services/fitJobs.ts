/**
 * The model jobs behind the API: two worker lanes (interactive fits; cross-
 * validation and tuning), the mapping between API job ids and each lane's own
 * ids, and the events that carry progress and results back to the page.
 *
 * API job ids are `fit:<id>` or `eval:<id>`. The caller may choose `<id>`
 * itself (`clientId`), so it can follow the job's events before the reply to
 * the start call arrives — the live refit after an edit depends on that.
 */
import type { ResourceLimits, Worker } from 'node:worker_threads';
import {
  crossValidationToPayload,
  fitResultToPayload,
  matrixFromPayload,
  trustToPayload,
  tuneToPayload,
} from '../../src-shared/apiCodec';
import type { MatrixPayload } from '../../src-shared/api';
import type { CrossValidationResult } from '../../src-shared/engine/crossValidation';
import type { TuneResult } from '../../src-shared/engine/tuning';
import type { FitSettings } from '../../src-shared/engine/types';
import type { FitJobResult, ProgressPayload, TrustRequest } from '../workers/fitProtocol';
import { UserFacingError, undeliverableMessage, type ApiRouter } from './apiRouter';
import { FitService } from './fitService';

type Lane = 'fit' | 'eval';
type JobKind = 'fit' | 'evaluate' | 'tune';

export class FitJobs {
  readonly fits: FitService;
  readonly evaluations: FitService;
  private readonly lanes: Record<Lane, FitService>;
  /** API id → lane, lane-internal id, kind. */
  private readonly jobs = new Map<string, { lane: Lane; internal: string; kind: JobKind }>();
  /** `${lane}/${internal}` → API id. */
  private readonly external = new Map<string, string>();

  constructor(
    private readonly router: ApiRouter,
    createWorker: (limits: ResourceLimits) => Worker,
  ) {
    this.fits = new FitService({ createWorker });
    this.evaluations = new FitService({ createWorker });
    this.lanes = { fit: this.fits, eval: this.evaluations };
    for (const lane of ['fit', 'eval'] as const) this.forwardEvents(lane);
  }

  private reserve(lane: Lane, clientId: string | undefined): string {
    const jobId = clientId ? `${lane}:${clientId}` : '';
    if (jobId && this.jobs.has(jobId)) throw new UserFacingError(`job id ${jobId} is already running`);
    return jobId;
  }

  private track(lane: Lane, kind: JobKind, internal: string, reserved: string): { jobId: string } {
    const jobId = reserved || `${lane}:${internal}`;
    this.jobs.set(jobId, { lane, internal, kind });
    this.external.set(`${lane}/${internal}`, jobId);
    return { jobId };
  }

  startFit(
    matrix: MatrixPayload,
    settings: FitSettings,
    opts: { trust?: TrustRequest; warmStart?: { rowFactors: number[]; colFactors: number[] }; clientId?: string },
  ): { jobId: string } {
    const reserved = this.reserve('fit', opts.clientId);
    const warmStart = opts.warmStart && {
      rowFactors: Float64Array.from(opts.warmStart.rowFactors),
      colFactors: Float64Array.from(opts.warmStart.colFactors),
    };
    return this.track(
      'fit',
      'fit',
      this.fits.startFit(matrixFromPayload(matrix), settings, { trust: opts.trust, warmStart }),
      reserved,
    );
  }

  startEvaluate(
    matrix: MatrixPayload,
    settings: FitSettings,
    folds: number,
    seed: number,
    clientId?: string,
  ): { jobId: string } {
    const reserved = this.reserve('eval', clientId);
    return this.track(
      'eval',
      'evaluate',
      this.evaluations.startEvaluate(matrixFromPayload(matrix), settings, folds, seed),
      reserved,
    );
  }

  startTune(
    matrix: MatrixPayload,
    settingsList: FitSettings[],
    folds: number,
    seed: number,
    clientId?: string,
  ): { jobId: string } {
    const reserved = this.reserve('eval', clientId);
    return this.track(
      'eval',
      'tune',
      this.evaluations.startTune(matrixFromPayload(matrix), settingsList, folds, seed),
      reserved,
    );
  }

  cancel(jobId: string): boolean {
    const job = this.jobs.get(jobId);
    return job ? this.lanes[job.lane].cancel(job.internal) : false;
  }

  /** Look up and forget a finished job. */
  private finish(lane: Lane, internal: string): { jobId: string; kind: JobKind | undefined } {
    const key = `${lane}/${internal}`;
    const jobId = this.external.get(key) ?? `${lane}:${internal}`;
    const kind = this.jobs.get(jobId)?.kind;
    this.external.delete(key);
    this.jobs.delete(jobId);
    return { jobId, kind };
  }

  private forwardEvents(lane: Lane): void {
    const svc = this.lanes[lane];
    const router = this.router;
    svc.on('progress', (id: string, p: ProgressPayload) => {
      const jobId = this.external.get(`${lane}/${id}`) ?? `${lane}:${id}`;
      if ('iteration' in p) {
        router.emit('fit.progress', {
          jobId,
          iteration: p.iteration,
          objective: Number.isFinite(p.objective) ? p.objective : null,
          elapsedMs: p.elapsedMs,
        });
      } else {
        router.emit('fit.step', { jobId, done: p.done, total: p.total, elapsedMs: p.elapsedMs });
      }
    });
    svc.on('result', (id: string, result: unknown) => {
      const { jobId, kind } = this.finish(lane, id);
      // Building the wire form of a huge result can itself fail (memory, array limits):
      // the job then ends with one sentence for the page, and the host keeps running.
      try {
        if (kind === 'evaluate')
          router.emit('fit.evaluated', { jobId, result: crossValidationToPayload(result as CrossValidationResult) });
        else if (kind === 'tune') router.emit('fit.tuned', { jobId, result: tuneToPayload(result as TuneResult) });
        else {
          const r = result as FitJobResult;
          router.emit('fit.result', {
            jobId,
            result: fitResultToPayload(r),
            ...(r.trust ? { trust: trustToPayload(r.trust) } : {}),
          });
        }
      } catch (err) {
        const r = result as { rows?: number; cols?: number };
        router.emit('fit.error', {
          jobId,
          message: undeliverableMessage(
            { event: 'fit.result', payload: { result: { rows: r?.rows, cols: r?.cols } } },
            err,
          ),
        });
      }
    });
    svc.on('cancelled', (id: string) => router.emit('fit.cancelled', { jobId: this.finish(lane, id).jobId }));
    svc.on('error', (id: string, message: string) =>
      router.emit('fit.error', { jobId: this.finish(lane, id).jobId, message }),
    );
  }

  async dispose(): Promise<void> {
    await Promise.all([this.fits.dispose(), this.evaluations.dispose()]);
  }
}
