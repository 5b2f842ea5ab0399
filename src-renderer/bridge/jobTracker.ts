/**
 * Follows long-running jobs (fits, evaluations, tuning) by id. Events may
 * arrive before the call that started the job has answered, so events for
 * unknown ids are kept briefly and replayed when the job is followed.
 */
import type {
  ApiEventName,
  ApiEventPayload,
  CrossValidationPayload,
  FitResultPayload,
  TrustPayload,
  TunePayload,
} from '../../src-shared/api';
import type { HostBridge } from './hostBridge';

export interface JobHandlers {
  onProgress?: (p: ApiEventPayload<'fit.progress'>) => void;
  onStep?: (p: ApiEventPayload<'fit.step'>) => void;
}

export type JobOutcome =
  | { kind: 'fit'; result: FitResultPayload; trust?: TrustPayload }
  | { kind: 'evaluated'; result: CrossValidationPayload }
  | { kind: 'tuned'; result: TunePayload };

/** A job that ended without a result. `cancelled` is true when the user (or a newer job) stopped it. */
export class JobEndedError extends Error {
  constructor(
    message: string,
    readonly cancelled: boolean,
  ) {
    super(message);
  }
}

type Follower = JobHandlers & { resolve: (o: JobOutcome) => void; reject: (e: Error) => void };
type Early = { event: ApiEventName; payload: { jobId: string } };

export class JobTracker {
  private readonly followers = new Map<string, Follower>();
  private early: Early[] = [];

  constructor(bridge: HostBridge) {
    const names: ApiEventName[] = [
      'fit.progress',
      'fit.step',
      'fit.result',
      'fit.evaluated',
      'fit.tuned',
      'fit.cancelled',
      'fit.error',
    ];
    for (const name of names) bridge.on(name, (payload) => this.deliver(name, payload as { jobId: string }));
  }

  /** Resolve with the job's outcome; reject with JobEndedError on cancel or failure. */
  follow(jobId: string, handlers: JobHandlers = {}): Promise<JobOutcome> {
    return new Promise<JobOutcome>((resolve, reject) => {
      this.followers.set(jobId, { ...handlers, resolve, reject });
      const mine = this.early.filter((e) => e.payload.jobId === jobId);
      this.early = this.early.filter((e) => e.payload.jobId !== jobId);
      for (const e of mine) this.deliver(e.event, e.payload);
    });
  }

  /** Stop following a job whose start call failed; its promise rejects with `reason`. */
  abandon(jobId: string, reason: Error): void {
    const f = this.followers.get(jobId);
    this.followers.delete(jobId);
    f?.reject(reason);
  }

  private deliver(event: ApiEventName, payload: { jobId: string }): void {
    const f = this.followers.get(payload.jobId);
    if (!f) {
      this.early.push({ event, payload });
      if (this.early.length > 500) this.early.splice(0, this.early.length - 500);
      return;
    }
    const end = () => this.followers.delete(payload.jobId);
    switch (event) {
      case 'fit.progress':
        f.onProgress?.(payload as ApiEventPayload<'fit.progress'>);
        break;
      case 'fit.step':
        f.onStep?.(payload as ApiEventPayload<'fit.step'>);
        break;
      case 'fit.result': {
        const p = payload as ApiEventPayload<'fit.result'>;
        end();
        f.resolve({ kind: 'fit', result: p.result, ...(p.trust ? { trust: p.trust } : {}) });
        break;
      }
      case 'fit.evaluated':
        end();
        f.resolve({ kind: 'evaluated', result: (payload as ApiEventPayload<'fit.evaluated'>).result });
        break;
      case 'fit.tuned':
        end();
        f.resolve({ kind: 'tuned', result: (payload as ApiEventPayload<'fit.tuned'>).result });
        break;
      case 'fit.cancelled':
        end();
        f.reject(new JobEndedError('stopped', true));
        break;
      case 'fit.error':
        end();
        f.reject(new JobEndedError((payload as ApiEventPayload<'fit.error'>).message, false));
        break;
      default:
        break;
    }
  }
}
