/**
 * worker_threads entry of the engine pool: runs fold tasks (foldTask.ts) one at a time and
 * answers with their outcomes (poolProtocol.ts). The stop flag is polled by the engine.
 */
import { parentPort } from 'node:worker_threads';
import { runFoldTask } from '../../src-shared/engine/foldTask';
import { FitCancelledError } from '../../src-shared/engine/errors';
import type { PoolReply, PoolTask, WireOutcome } from './poolProtocol';

const port = parentPort;
if (!port) throw new Error('pool.worker must run inside a worker thread');

port.on('message', (task: PoolTask) => {
  if (task?.type !== 'task') return;
  const flag = new Int32Array(task.stop);
  const shouldStop = (): boolean => Atomics.load(flag, 0) !== 0;
  const post = (m: PoolReply, transfer: ArrayBuffer[] = []): void => port.postMessage(m, transfer);
  try {
    const outcomes = runFoldTask(task.matrix, task.folds, task.fold, task.settings, {
      reuse: task.reuse,
      keepHeldOut: task.keepHeldOut,
      keepModels: task.keepModels,
      shouldStop,
      onSettingDone: () => post({ type: 'progress', id: task.id }),
    });
    const wire: WireOutcome[] = outcomes.map((o) => ('error' in o ? { error: o.error.message } : o));
    // Typed arrays of the outcomes move to the host without a copy.
    const transfer = new Set<ArrayBuffer>();
    const add = (a: ArrayBufferView | undefined): void => {
      if (a && a.buffer instanceof ArrayBuffer && a.byteLength > 0) transfer.add(a.buffer);
    };
    for (const o of wire) {
      if ('error' in o) continue;
      add(o.heldOut);
      if (o.model) for (const v of Object.values(o.model)) if (ArrayBuffer.isView(v)) add(v);
    }
    post({ type: 'done', id: task.id, outcomes: wire }, [...transfer]);
  } catch (err) {
    if (err instanceof FitCancelledError || shouldStop()) post({ type: 'cancelled', id: task.id });
    else post({ type: 'failed', id: task.id, message: err instanceof Error ? err.message : String(err) });
  }
});
