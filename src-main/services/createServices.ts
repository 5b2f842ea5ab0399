/**
 * The composition root of the main side: builds every service once and wires
 * them to the API router. Both hosts call this and differ only in transport.
 */
import type { ResourceLimits, Worker } from 'node:worker_threads';
import { join } from 'node:path';
import { readFileSync } from 'node:fs';
import { API_VERSION } from '../../src-shared/api';
import { fitResultToPayload, matrixFromPayload } from '../../src-shared/apiCodec';
import type { FitProgress, FitResult } from '../../src-shared/engine/types';
import { ApiRouter } from './apiRouter';
import { findAppRoot } from './appRoot';
import { FitService } from './fitService';
import { importText } from './importService';
import { SampleService } from './sampleService';
import { createDocumentHandlers, type DesktopShell } from './documentHandlers';
import { ParseWorkerClient } from './parseOffThread';
import { RecentFiles } from './recentFiles';
import { RecoveryStore } from './recovery';

export interface MainServices {
  router: ApiRouter;
  fits: FitService;
  dispose(): Promise<void>;
}

export interface CreateServicesOptions {
  host: 'electron' | 'browser';
  /** Builds a fit worker; the host knows where the built worker file lives. */
  createWorker: (resourceLimits: ResourceLimits) => Worker;
  appRoot?: string;
  log?: (line: string) => void;
  /** Builds the import parse worker (issue 4); without it imports parse inline. */
  createParseWorker?: () => Worker;
  /** Native dialogs and window control (Electron host only). */
  shell?: DesktopShell;
  /** Recovery snapshots folder and recent-files list (default: the config folder). */
  recoveryDir?: string;
  recentFilesPath?: string;
}

export function createServices(opts: CreateServicesOptions): MainServices {
  const root = opts.appRoot ?? findAppRoot();
  const version = (JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { version: string }).version;
  const samples = new SampleService(join(root, 'samples'));
  const fits = new FitService({ createWorker: opts.createWorker });

  // Documents and projects (issue 4): one parse worker, made on first use and remade if it dies.
  let parser: ParseWorkerClient | undefined;
  const getParser = (): ParseWorkerClient | undefined => {
    if (!opts.createParseWorker) return undefined;
    if (!parser) {
      const worker = opts.createParseWorker();
      const client = new ParseWorkerClient(worker);
      worker.unref();
      worker.on('exit', () => {
        if (parser === client) parser = undefined;
      });
      parser = client;
    }
    return parser;
  };
  const documentHandlers = createDocumentHandlers({
    recovery: new RecoveryStore({ dir: opts.recoveryDir }),
    recent: new RecentFiles({ file: opts.recentFilesPath }),
    parser: getParser,
    shell: opts.shell,
    log: opts.log,
  });

  const router = new ApiRouter(
    {
      ...documentHandlers,
      'app.info': async () => ({ name: 'Rankfill', version, apiVersion: API_VERSION, host: opts.host }),
      'samples.list': async () => ({ samples: await samples.list() }),
      'samples.open': async ({ id }) => samples.open(id),
      'document.importText': async (req) => importText(req),
      'fit.start': async ({ matrix, settings }) => ({ jobId: fits.startFit(matrixFromPayload(matrix), settings) }),
      'fit.cancel': async ({ jobId }) => ({ cancelled: fits.cancel(jobId) }),
    },
    opts.log,
  );

  fits.on('progress', (jobId: string, p: FitProgress) => {
    router.emit('fit.progress', {
      jobId,
      iteration: p.iteration,
      objective: Number.isFinite(p.objective) ? p.objective : null,
      elapsedMs: p.elapsedMs,
    });
  });
  fits.on('result', (jobId: string, result: FitResult) => {
    router.emit('fit.result', { jobId, result: fitResultToPayload(result) });
  });
  fits.on('error', (jobId: string, message: string) => router.emit('fit.error', { jobId, message }));

  return { router, fits, dispose: async () => {
      await Promise.all([fits.dispose(), parser?.terminate()]);
    },
  };
}
