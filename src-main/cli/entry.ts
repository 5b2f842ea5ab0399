/**
 * Entry of the built command line (out/cli/rankfill.js, see vite.cli.config.mts and
 * bin/rankfill.js): runs the CLI with an engine pool whose workers run the built
 * out/cli/pool.worker.js beside this file.
 */
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { EnginePool } from '../pool/enginePool';
import { runCli } from './main';

const poolWorker = join(__dirname, 'pool.worker.js');

export function main(argv: string[]): Promise<number> {
  return runCli(argv, undefined, { createPool: () => new EnginePool(() => new Worker(poolWorker)) });
}
