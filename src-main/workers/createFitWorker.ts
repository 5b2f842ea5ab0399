/**
 * Where the built fit worker lives: electron-vite turns the `?modulePath`
 * import into the path of a separate chunk under out/main/chunks/.
 */
import { Worker } from 'node:worker_threads';
import fitWorkerPath from './fit.worker?modulePath';
import { FIT_WORKER_RESOURCE_LIMITS } from '../services/fitService';

export function createFitWorker(): Worker {
  return new Worker(fitWorkerPath, { resourceLimits: FIT_WORKER_RESOURCE_LIMITS });
}
