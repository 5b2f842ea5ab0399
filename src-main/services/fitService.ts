/**
 * Runs fits, cross-validations and tuning grids in a worker thread, one job at a time
 * (later jobs wait in a queue), so the main process never blocks.
 *
 * Events (all with the job id first):
 *   'progress' (jobId, payload)  FitProgress {iteration, objective, elapsedMs} for a fit job,
 *                                {done, total, elapsedMs} for evaluate/tune; ≤ 1 per 50 ms.
 *   'result'   (jobId, payload)  FitResult (+ `trust` and `spread` when trust was asked for),
 *                                CrossValidationResult, or TuneResult.
 *   'error'    (jobId, message)  a one-line reason (bad settings, non-finite values,
 *                                diverging objective, crashed or out-of-memory worker).
 *   'cancelled'(jobId)           emitted at once when cancel() succeeds; no progress, result
 *                                or error follows for that job.
 *   'stopped'  (jobId, ms)       the worker confirms it left a cancelled computation, ms after
 *                                the request (diagnostic; the budget is 100 ms).
 *
 * Cancellation: cancel() sets the job's shared Int32 flag (Atomics), which the engine
 * polls every 64 rows/columns inside each half-step, so computing stops within
 * milliseconds; if the worker is still busy 1 s later it is terminated and replaced.
 * A worker that dies (uncaught error, out of memory, exit) is reported as an 'error' for
 * its job and replaced; queued jobs continue on the new worker.
 *
 * The host supplies the worker factory. In the built app the worker path comes from an
 * electron-vite `?modulePath` import (see ../workers/createFitWorker.ts). Under vitest on
 * Node 20 the TypeScript entry is started through tsx's CommonJS hook in an eval worker:
 *   new Worker(`require(${JSON.stringify(tsxCjsApiPath)}).register();
 *               require(${JSON.stringify(workerFilePath)});`, { eval: true, resourceLimits })
 * with tsxCjsApiPath = createRequire(import.meta.url).resolve('tsx/cjs/api').
 * (`execArgv: ['--import', 'tsx']` does NOT work there: the worker's entry is resolved
 * before the loader is active and fails with "Unknown file extension .ts"; registering
 * tsx's ESM API inside an eval worker fails with a require(esm) cycle on Node 20.)
 * See test/unit/workers/fitService.test.ts.
 */
import { EventEmitter } from 'node:events';
import type { ResourceLimits, Worker } from 'node:worker_threads';
import type { RatingMatrix } from '../../src-shared/matrix/ratingMatrix';
import type { FitSettings } from '../../src-shared/engine/types';
import type { JobMessage, JobRequest, MatrixMessage, TrustRequest, WorkerMessage } from '../workers/fitProtocol';

/**
 * Heap limits of a fit worker. Float64Array data live outside the V8 heap (array buffer
 * backing stores), so this bounds the engine's JS objects (result tables, label arrays,
 * temporary Matrix objects), not the matrix itself; 1 GiB leaves ample room for any grid.
 */
const FIT_WORKER_RESOURCE_LIMITS: ResourceLimits = {
  maxOldGenerationSizeMb: 1024,
  maxYoungGenerationSizeMb: 64,
  stackSizeMb: 4,
};

/** How long a cancelled job may keep the worker busy before the worker is replaced. */
const CANCEL_GRACE_MS = 1000;

export interface FitServiceOptions {
  /** Builds a worker running fit.worker; receives the limits to pass as `resourceLimits`. */
  createWorker: (resourceLimits: ResourceLimits) => Worker;
  resourceLimits?: ResourceLimits;
}

interface Job {
  id: string;
  flag: SharedArrayBuffer;
  request: JobRequest;
  cancelled: boolean;
}

function toMessageMatrix(m: RatingMatrix): MatrixMessage {
  return { rowLabels: m.rowLabels, colLabels: m.colLabels, values: m.values, scale: m.scale };
}

export class FitService extends EventEmitter {
  private readonly createWorker: (limits: ResourceLimits) => Worker;
  private readonly limits: ResourceLimits;
  private worker: Worker | undefined;
  private active: Job | undefined;
  private readonly queue: Job[] = [];
  private nextId = 1;
  private disposed = false;
  private graceTimer: ReturnType<typeof setTimeout> | undefined;

  constructor(opts: FitServiceOptions) {
    super();
    this.createWorker = opts.createWorker;
    this.limits = opts.resourceLimits ?? FIT_WORKER_RESOURCE_LIMITS;
  }

  startFit(
    matrix: RatingMatrix,
    settings: FitSettings,
    opts: { warmStart?: { rowFactors: Float64Array; colFactors: Float64Array }; trust?: TrustRequest } = {},
  ): string {
    return this.enqueue({
      kind: 'fit',
      matrix: toMessageMatrix(matrix),
      settings,
      warmStart: opts.warmStart,
      trust: opts.trust,
    });
  }

  startEvaluate(matrix: RatingMatrix, settings: FitSettings, k: number, seed: number): string {
    return this.enqueue({ kind: 'evaluate', matrix: toMessageMatrix(matrix), settings, k, seed });
  }

  startTune(matrix: RatingMatrix, settingsList: FitSettings[], k: number, seed: number): string {
    return this.enqueue({ kind: 'tune', matrix: toMessageMatrix(matrix), settingsList, k, seed });
  }

  /** Stops a queued or running job; false if the id is unknown or already finished. */
  cancel(jobId: string): boolean {
    const q = this.queue.findIndex((j) => j.id === jobId);
    if (q >= 0) {
      this.queue.splice(q, 1);
      this.emit('cancelled', jobId);
      return true;
    }
    const job = this.active;
    if (!job || job.id !== jobId || job.cancelled) return false;
    job.cancelled = true;
    new Float64Array(job.flag, 8, 1)[0] = performance.timeOrigin + performance.now();
    Atomics.store(new Int32Array(job.flag), 0, 1);
    this.emit('cancelled', jobId);
    // If the worker does not come back in time, replace it.
    this.graceTimer = setTimeout(() => {
      if (this.active === job) {
        this.discardWorker();
        this.active = undefined;
        this.pump();
      }
    }, CANCEL_GRACE_MS);
    this.graceTimer.unref?.();
    return true;
  }

  /** Ids of the running job and the queued ones. */
  pendingJobs(): string[] {
    return [...(this.active ? [this.active.id] : []), ...this.queue.map((j) => j.id)];
  }

  async dispose(): Promise<void> {
    this.disposed = true;
    if (this.graceTimer) clearTimeout(this.graceTimer);
    for (const j of this.queue.splice(0)) this.emit('cancelled', j.id);
    if (this.active && !this.active.cancelled) this.emit('cancelled', this.active.id);
    this.active = undefined;
    const w = this.worker;
    this.worker = undefined;
    if (w) {
      w.removeAllListeners();
      await w.terminate();
    }
  }

  private enqueue(request: JobRequest): string {
    if (this.disposed) throw new Error('the fit service has been disposed');
    const id = `job-${this.nextId++}`;
    this.queue.push({ id, flag: new SharedArrayBuffer(16), request, cancelled: false });
    queueMicrotask(() => this.pump());
    return id;
  }

  private ensureWorker(): Worker {
    if (this.worker) return this.worker;
    const w = this.createWorker(this.limits);
    w.on('message', (m: WorkerMessage) => this.onMessage(w, m));
    w.on('error', (err: Error & { code?: string }) => this.onWorkerDeath(w, describeCrash(err)));
    w.on('exit', (code: number) => this.onWorkerDeath(w, `exit code ${code}`));
    this.worker = w;
    return w;
  }

  private pump(): void {
    if (this.disposed || this.active) return;
    const job = this.queue.shift();
    if (!job) return;
    this.active = job;
    let w: Worker;
    try {
      w = this.ensureWorker();
    } catch (err) {
      this.active = undefined;
      this.emitError(job.id, `could not start the fit worker: ${(err as Error).message}`);
      this.pump();
      return;
    }
    const msg: JobMessage = { type: 'job', jobId: job.id, cancelFlag: job.flag, request: job.request };
    w.postMessage(msg);
  }

  private onMessage(w: Worker, m: WorkerMessage): void {
    if (w !== this.worker) return;
    const job = this.active;
    if (!job || m.jobId !== job.id) return;
    if (m.type === 'progress') {
      if (!job.cancelled) this.emit('progress', job.id, m.payload);
      return;
    }
    // Terminal message: the worker is free again.
    this.active = undefined;
    if (this.graceTimer) clearTimeout(this.graceTimer);
    if (job.cancelled) {
      if (m.type === 'cancelled' && m.stopLatencyMs !== undefined) this.emit('stopped', job.id, m.stopLatencyMs);
    } else {
      if (m.type === 'result') this.emit('result', job.id, m.payload);
      else if (m.type === 'error') this.emitError(job.id, m.message);
      else this.emit('cancelled', job.id);
    }
    this.pump();
  }

  private onWorkerDeath(w: Worker, reason: string): void {
    if (w !== this.worker) return;
    this.worker = undefined;
    w.removeAllListeners();
    void w.terminate().catch(() => undefined);
    const job = this.active;
    this.active = undefined;
    if (job && !job.cancelled && !this.disposed) {
      this.emitError(job.id, `the fit worker stopped unexpectedly (${reason}); a new worker has been started`);
    }
    if (!this.disposed) this.pump();
  }

  /** 'error' without a listener would throw out of the event loop; never let it. */
  private emitError(jobId: string, message: string): void {
    if (this.listenerCount('error') > 0) this.emit('error', jobId, message);
  }

  private discardWorker(): void {
    const w = this.worker;
    this.worker = undefined;
    if (w) {
      w.removeAllListeners();
      void w.terminate().catch(() => undefined);
    }
  }
}

function describeCrash(err: Error & { code?: string }): string {
  if (err.code === 'ERR_WORKER_OUT_OF_MEMORY') return 'out of memory';
  const first = String(err.message ?? err).split('\n')[0];
  return first.length > 200 ? `${first.slice(0, 200)}…` : first;
}
