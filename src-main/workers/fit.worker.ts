/**
 * worker_threads entry of the fit worker. Runs one job at a time (FitService queues
 * them) and answers with progress/result/error/cancelled messages (fitProtocol.ts).
 * Anything thrown outside a job escapes on purpose: the host sees the worker die,
 * reports an error for the running job and starts a fresh worker.
 */
import { parentPort } from 'node:worker_threads';
import type { JobMessage, WorkerMessage } from './fitProtocol';
import { runJob } from './runJob';

const port = parentPort;
if (!port) throw new Error('fit.worker must run inside a worker thread');

port.on('message', (msg: JobMessage) => {
  if (msg?.type !== 'job') return;
  runJob(msg, (m: WorkerMessage, transfer?: ArrayBuffer[]) => port.postMessage(m, transfer ?? []));
});
