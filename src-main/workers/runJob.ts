/**
 * Runs one job inside the worker: every model goes through the engine's fitModel
 * (directly, or via crossValidate / tune / cellTrust). Progress is throttled to at most
 * one message per 50 ms; the cancel flag is polled by the engine inside its loops.
 */
import { fitModel } from '../../src-shared/engine/fitModel';
import { crossValidate, makeFolds } from '../../src-shared/engine/crossValidation';
import { tune } from '../../src-shared/engine/tuning';
import { cellTrust } from '../../src-shared/engine/trust';
import { FitCancelledError } from '../../src-shared/engine/errors';
import type { RatingMatrix } from '../../src-shared/matrix/ratingMatrix';
import { toSparseMatrix } from '../../src-shared/matrix/sparseRatings';
import type { FitJobResult, JobMessage, ProgressPayload, WorkerMessage } from './fitProtocol';

const PROGRESS_INTERVAL_MS = 50;

function transferables(value: unknown): ArrayBuffer[] {
  const out: ArrayBuffer[] = [];
  const seen = new Set<ArrayBuffer>();
  const visit = (v: unknown, depth: number): void => {
    if (depth > 4 || v === null || typeof v !== 'object') return;
    if (ArrayBuffer.isView(v)) {
      const b = v.buffer;
      if (b instanceof ArrayBuffer && !seen.has(b)) {
        seen.add(b);
        out.push(b);
      }
      return;
    }
    for (const x of Array.isArray(v) ? v : Object.values(v)) visit(x, depth + 1);
  };
  visit(value, 0);
  return out;
}

export function runJob(msg: JobMessage, post: (m: WorkerMessage, transfer?: ArrayBuffer[]) => void): void {
  const { jobId, request } = msg;
  const flag = new Int32Array(msg.cancelFlag);
  const shouldStop = (): boolean => Atomics.load(flag, 0) !== 0;
  const t0 = performance.now();
  let last = -Infinity;
  const progress = (payload: ProgressPayload, force = false): void => {
    const now = performance.now();
    if (!force && now - last < PROGRESS_INTERVAL_MS) return;
    last = now;
    post({ type: 'progress', jobId, payload });
  };
  const steps = (p: { done: number; total: number }): void =>
    progress({ done: p.done, total: p.total, elapsedMs: performance.now() - t0 });
  const matrix: RatingMatrix = request.matrix;
  try {
    if (request.kind === 'fit') {
      const result: FitJobResult = fitModel(matrix, request.settings, {
        warmStart: request.warmStart,
        shouldStop,
        onProgress: (p) => progress(p),
      });
      if (request.trust) {
        const t = request.trust;
        const seed = request.settings.seed;
        const trust = cellTrust(
          matrix,
          request.settings,
          t.method === 'folds' ? { method: 'folds', k: t.k, seed } : { method: 'bootstrap', B: t.B, seed },
          // The full fit (before its spread is replaced below) anchors the intervals.
          { shouldStop, full: { ...result } },
        );
        result.trust = trust;
        result.spread = trust.spread;
      }
      if (shouldStop()) throw new FitCancelledError();
      post({ type: 'result', jobId, payload: result }, transferables(result));
    } else if (request.kind === 'evaluate') {
      const sparse = toSparseMatrix(matrix);
      const folds = makeFolds(sparse, request.k, request.seed);
      const cv = crossValidate(sparse, request.settings, folds, {
        shouldStop,
        onProgress: (p) => {
          if (p.fit === undefined) steps(p);
        },
      });
      if (shouldStop()) throw new FitCancelledError();
      post({ type: 'result', jobId, payload: cv });
    } else {
      const result = tune(matrix, { settings: request.settingsList }, request.k, request.seed, steps, shouldStop);
      if (shouldStop()) throw new FitCancelledError();
      post({ type: 'result', jobId, payload: result });
    }
  } catch (err) {
    if (err instanceof FitCancelledError || shouldStop()) {
      const requested = new Float64Array(msg.cancelFlag, 8, 1)[0];
      const stopLatencyMs = requested > 0 ? performance.timeOrigin + performance.now() - requested : undefined;
      post({ type: 'cancelled', jobId, stopLatencyMs });
    } else post({ type: 'error', jobId, message: err instanceof Error ? err.message : String(err) });
  }
}
