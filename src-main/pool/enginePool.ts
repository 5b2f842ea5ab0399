/**
 * A pool of engine workers sized to the machine (os.availableParallelism()), used by the
 * command line's evaluate and tune. A job is split into tasks: one per (fold, group of
 * settings sharing a baseline), each run by runFoldTask in whichever worker is free. Tasks
 * share nothing but the read-only ratings, and a task's reuse (baseline, spectral start,
 * λ path) stays inside its group, so every outcome is the same number whatever the pool
 * size or finishing order (test/unit/workers/enginePool.test.ts checks 1, 2 and 4 workers
 * against the in-process run). Outcomes are assembled by (fold, setting).
 */
import { availableParallelism } from 'node:os';
import type { Worker } from 'node:worker_threads';
import type { SparseMatrix } from '../../src-shared/matrix/sparseRatings';
import type { Folds } from '../../src-shared/engine/crossValidation';
import type { FitSettings } from '../../src-shared/engine/types';
import { runFoldTask, type FoldOutcome } from '../../src-shared/engine/foldTask';
import { FitCancelledError } from '../../src-shared/engine/errors';
import type { PoolReply, PoolTask } from './poolProtocol';
import { shareFolds, shareSparse } from './shareSparse';

export interface FoldJob {
  matrix: SparseMatrix;
  folds: Folds;
  settings: FitSettings[];
  reuse: boolean;
  keepHeldOut?: boolean;
  keepModels?: boolean;
  /** Called after each (fold, setting) is done, with the count and the total. */
  onProgress?: (done: number, total: number) => void;
}

/** Index groups of settings that share a baseline (and so a task's reuse). */
export function settingGroups(list: FitSettings[]): number[][] {
  const groups = new Map<string, number[]>();
  list.forEach((s, t) => {
    const key = s.model === 'lowrank' ? `lowrank|${s.centering}|${s.offsetLambda}` : 'gaussian';
    const g = groups.get(key);
    if (g) g.push(t);
    else groups.set(key, [t]);
  });
  return [...groups.values()];
}

/** The same job in this thread, task by task (what the pool computes, for hosts without one). */
export function runFoldsInProcess(job: FoldJob, shouldStop?: () => boolean): FoldOutcome[][] {
  const total = job.settings.length * job.folds.k;
  let done = 0;
  const out: FoldOutcome[][] = [];
  for (let f = 0; f < job.folds.k; f++) {
    const row: FoldOutcome[] = new Array(job.settings.length);
    for (const group of settingGroups(job.settings)) {
      const outcomes = runFoldTask(
        job.matrix,
        job.folds,
        f,
        group.map((t) => job.settings[t]),
        {
          reuse: job.reuse,
          keepHeldOut: job.keepHeldOut,
          keepModels: job.keepModels,
          shouldStop,
          onSettingDone: () => job.onProgress?.(++done, total),
        },
      );
      group.forEach((t, g) => (row[t] = outcomes[g]));
    }
    out.push(row);
  }
  return out;
}

interface Pending {
  task: PoolTask;
  /** Called with the worker's last reply for the task ('done', 'cancelled' or 'failed'). */
  settle: (m: Exclude<PoolReply, { type: 'progress' }>) => void;
  progress: () => void;
  fail: (err: Error) => void;
}

export class EnginePool {
  readonly size: number;
  private readonly workers: (Worker | undefined)[] = [];
  private readonly busy: boolean[] = [];
  /** Tasks of every running job, first come first served: jobs started together share the workers. */
  private readonly queue: Pending[] = [];
  private nextId = 1;

  constructor(
    private readonly createWorker: () => Worker,
    size = availableParallelism(),
  ) {
    this.size = Math.max(1, Math.floor(size));
  }

  private worker(slot: number): Worker {
    const w = this.workers[slot] ?? this.createWorker();
    this.workers[slot] = w;
    return w;
  }

  /** Hands queued tasks to idle workers. */
  private pump(): void {
    for (let slot = 0; slot < this.size && this.queue.length > 0; slot++) {
      if (this.busy[slot]) continue;
      const next = this.queue.shift()!;
      this.busy[slot] = true;
      const w = this.worker(slot);
      const release = (): void => {
        w.off('message', onMessage);
        w.off('error', onError);
        w.off('exit', onExit);
        this.busy[slot] = false;
        this.pump();
      };
      const onMessage = (m: PoolReply): void => {
        if (m.id !== next.task.id) return;
        if (m.type === 'progress') {
          next.progress();
          return;
        }
        release();
        next.settle(m);
      };
      const lost = (why: string): void => {
        this.workers[slot] = undefined;
        release();
        next.fail(new Error(`an engine worker stopped unexpectedly (${why})`));
      };
      const onError = (err: Error): void => lost(err.message);
      const onExit = (code: number): void => lost(`exit code ${code}`);
      w.on('message', onMessage);
      w.once('error', onError);
      w.once('exit', onExit);
      w.postMessage(next.task);
    }
  }

  /** Runs every (fold, group) task; resolves to outcomes[fold][setting]. */
  runFolds(job: FoldJob, stop: SharedArrayBuffer = new SharedArrayBuffer(4)): Promise<FoldOutcome[][]> {
    const matrix = shareSparse(job.matrix);
    const folds = shareFolds(job.folds);
    const groups = settingGroups(job.settings);
    const out: FoldOutcome[][] = Array.from({ length: folds.k }, () => new Array<FoldOutcome>(job.settings.length));
    const total = job.settings.length * folds.k;
    let done = 0;
    let remaining = folds.k * groups.length;
    return new Promise((resolve, reject) => {
      let failed = false;
      const mine: Pending[] = [];
      const fail = (err: Error): void => {
        if (failed) return;
        failed = true;
        Atomics.store(new Int32Array(stop), 0, 1);
        // This job's tasks not yet started are dropped; other jobs' stay queued.
        for (const p of mine) {
          const at = this.queue.indexOf(p);
          if (at >= 0) this.queue.splice(at, 1);
        }
        reject(err);
      };
      if (remaining === 0) {
        resolve(out);
        return;
      }
      for (let f = 0; f < folds.k; f++) {
        for (const group of groups) {
          const task: PoolTask = {
            type: 'task',
            id: this.nextId++,
            matrix,
            folds,
            fold: f,
            settings: group.map((t) => job.settings[t]),
            reuse: job.reuse,
            keepHeldOut: job.keepHeldOut === true,
            keepModels: job.keepModels === true,
            stop,
          };
          const pending: Pending = {
            task,
            progress: () => job.onProgress?.(++done, total),
            fail,
            settle: (m) => {
              if (failed) return;
              if (m.type === 'done') {
                m.outcomes.forEach((o, g) => (out[f][group[g]] = 'error' in o ? { error: new Error(o.error) } : o));
                remaining--;
                if (remaining === 0) resolve(out);
              } else if (m.type === 'cancelled') fail(new FitCancelledError());
              else fail(new Error(m.message));
            },
          };
          mine.push(pending);
          this.queue.push(pending);
        }
      }
      this.pump();
    });
  }

  async close(): Promise<void> {
    const ws = this.workers.filter((w): w is Worker => w !== undefined);
    this.workers.length = 0;
    await Promise.all(ws.map((w) => w.terminate()));
  }
}
