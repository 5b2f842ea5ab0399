/**
 * Where the built import parse worker lives: electron-vite turns the
 * `?modulePath` import into the path of a separate chunk under out/main/chunks/.
 * Hosts pass this to createServices so imports parse off the UI/IPC thread.
 */
import { Worker } from 'node:worker_threads';
import parseWorkerPath from '../workers/parse.worker?modulePath';

export function createParseWorker(): Worker {
  // 1 GB old space: a 50 MB file expands to a few hundred MB of strings while parsing.
  return new Worker(parseWorkerPath, { resourceLimits: { maxOldGenerationSizeMb: 1024 } });
}
