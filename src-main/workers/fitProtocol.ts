/**
 * Messages between FitService (host side) and the fit worker. Everything is plain data
 * that survives structured clone; typed arrays in results are transferred, not copied.
 * Cancellation does not travel as a message (the worker is busy computing while a job
 * runs): each job carries a SharedArrayBuffer holding one Int32 flag that the host sets
 * with Atomics.store and the engine polls inside its iteration loop.
 */
import type { RatingMatrix } from '../../src-shared/matrix/ratingMatrix';
import type { FitProgress, FitResult, FitSettings } from '../../src-shared/engine/types';
import type { CrossValidationResult } from '../../src-shared/engine/crossValidation';
import type { TuneResult } from '../../src-shared/engine/tuning';
import type { CellTrust } from '../../src-shared/engine/trust';

/** The matrix as it crosses the boundary. */
export type MatrixMessage = Pick<RatingMatrix, 'rowLabels' | 'colLabels' | 'values' | 'scale'>;

export type TrustRequest = { method: 'folds'; k: number } | { method: 'bootstrap'; B: number };

export type JobRequest =
  | {
      kind: 'fit';
      matrix: MatrixMessage;
      settings: FitSettings;
      warmStart?: { rowFactors: Float64Array; colFactors: Float64Array };
      trust?: TrustRequest;
    }
  | { kind: 'evaluate'; matrix: MatrixMessage; settings: FitSettings; k: number; seed: number }
  | { kind: 'tune'; matrix: MatrixMessage; settingsList: FitSettings[]; k: number; seed: number };

export interface JobMessage {
  type: 'job';
  jobId: string;
  /**
   * SharedArrayBuffer of 16 bytes: Int32 at byte 0 is the stop flag (1 = stop); Float64 at
   * byte 8 is the epoch time in ms (performance.timeOrigin + now) when stop was requested.
   */
  cancelFlag: SharedArrayBuffer;
  request: JobRequest;
}

/** Progress of an evaluate/tune/trust job: folds or grid points done. */
export interface StepProgress {
  done: number;
  total: number;
  elapsedMs: number;
}

/** A fit job posts FitProgress; evaluate and tune post StepProgress. */
export type ProgressPayload = FitProgress | StepProgress;

/** Result of a fit job; `trust` is present when it was requested (and `spread` is set). */
export type FitJobResult = FitResult & { trust?: CellTrust };

type ResultPayload = FitJobResult | CrossValidationResult | TuneResult;

export type WorkerMessage =
  | { type: 'progress'; jobId: string; payload: ProgressPayload }
  | { type: 'result'; jobId: string; payload: ResultPayload }
  | { type: 'error'; jobId: string; message: string }
  /** `stopLatencyMs`: from the stop request to the worker leaving the computation. */
  | { type: 'cancelled'; jobId: string; stopLatencyMs?: number };
