/**
 * Where the built fit worker lives: electron-vite turns the `?modulePath`
 * import into the path of a separate chunk under out/main/chunks/.
 */
import { Worker, type ResourceLimits } from 'node:worker_threads';
import fitWorkerPath from './fit.worker?modulePath';

export function createFitWorker(resourceLimits: ResourceLimits): Worker {
  return new Worker(fitWorkerPath, { resourceLimits });
}
