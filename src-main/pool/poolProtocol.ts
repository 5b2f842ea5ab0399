/**
 * Messages between the engine pool (host side, enginePool.ts) and its workers
 * (pool.worker.ts). A task is one fold of a cross-validation for a list of settings
 * (src-shared/engine/foldTask.ts). The ratings and the fold labels live in
 * SharedArrayBuffers (shareSparse), so a task message carries views, not copies.
 */
import type { SparseMatrix } from '../../src-shared/matrix/sparseRatings';
import type { Folds, FoldScore } from '../../src-shared/engine/crossValidation';
import type { FitSettings } from '../../src-shared/engine/types';
import type { SparseModel } from '../../src-shared/engine/fitModel';

export interface PoolTask {
  type: 'task';
  id: number;
  matrix: SparseMatrix;
  folds: Folds;
  fold: number;
  settings: FitSettings[];
  reuse: boolean;
  keepHeldOut: boolean;
  /** Send each setting's fitted model back (small for the low-rank family: baselines and factors). */
  keepModels: boolean;
  /** Int32 stop flag (1 = stop), shared by every task of a job. */
  stop: SharedArrayBuffer;
}

/** One setting's outcome; errors travel as text (class identity does not survive a message). */
export type WireOutcome = { score: FoldScore; heldOut?: Float64Array; model?: SparseModel } | { error: string };

export type PoolReply =
  | { type: 'progress'; id: number }
  | { type: 'done'; id: number; outcomes: WireOutcome[] }
  | { type: 'cancelled'; id: number }
  | { type: 'failed'; id: number; message: string };
