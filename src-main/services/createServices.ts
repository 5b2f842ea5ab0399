/**
 * The composition root of the main side: builds every service once and wires
 * them to the API router. Both hosts call this and differ only in transport.
 */
import type { ResourceLimits, Worker } from 'node:worker_threads';
import { join } from 'node:path';
import { readFileSync } from 'node:fs';
import { API_VERSION } from '../../src-shared/api';
import {
  crossValidationToPayload,
  fitResultToPayload,
  matrixFromPayload,
  trustToPayload,
  tuneToPayload,
} from '../../src-shared/apiCodec';
import type { CrossValidationResult } from '../../src-shared/engine/crossValidation';
import type { TuneResult } from '../../src-shared/engine/tuning';
import type { FitJobResult, ProgressPayload } from '../workers/fitProtocol';
import { ApiRouter } from './apiRouter';
import { findAppRoot } from './appRoot';
import { suggestExportPath, writeExport } from './exportService';
import { FitService } from './fitService';
import { importText } from './importService';
import { SampleService } from './sampleService';
import { createDocumentHandlers, type DesktopShell } from './documentHandlers';
import { ParseWorkerClient } from './parseOffThread';
import { RecentFiles } from './recentFiles';
import { RecoveryStore } from './recovery';

export interface MainServices {
  router: ApiRouter;
  /** Interactive fits (Fill, live refit after an edit). */
  fits: FitService;
  /** Cross-validation and tuning, on a second worker so they never delay a fit. */
  evaluations: FitService;
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

type JobKind = 'fit' | 'evaluate' | 'tune';

export function createServices(opts: CreateServicesOptions): MainServices {
  const root = opts.appRoot ?? findAppRoot();
  const version = (JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { version: string }).version;
  const samples = new SampleService(join(root, 'samples'));
  const fits = new FitService({ createWorker: opts.createWorker });
  const evaluations = new FitService({ createWorker: opts.createWorker });

  // Each lane numbers its own jobs; the API sees "fit:job-3" or "eval:job-3".
  const kinds = new Map<string, JobKind>();
  const lanes = { fit: fits, eval: evaluations } as const;
  const track = (lane: keyof typeof lanes, kind: JobKind, id: string) => {
    const jobId = `${lane}:${id}`;
    kinds.set(jobId, kind);
    return { jobId };
  };
  const cancel = (jobId: string): boolean => {
    const [lane, id] = jobId.split(':', 2) as [keyof typeof lanes, string];
    const svc = lanes[lane];
    return svc ? svc.cancel(id) : false;
  };

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
      'fit.start': async ({ matrix, settings, trust, warmStart }) =>
        track(
          'fit',
          'fit',
          fits.startFit(matrixFromPayload(matrix), settings, {
            trust,
            warmStart: warmStart && {
              rowFactors: Float64Array.from(warmStart.rowFactors),
              colFactors: Float64Array.from(warmStart.colFactors),
            },
          }),
        ),
      'fit.evaluate': async ({ matrix, settings, folds, seed }) =>
        track('eval', 'evaluate', evaluations.startEvaluate(matrixFromPayload(matrix), settings, folds, seed)),
      'fit.tune': async ({ matrix, settingsList, folds, seed }) =>
        track('eval', 'tune', evaluations.startTune(matrixFromPayload(matrix), settingsList, folds, seed)),
      'fit.cancel': async ({ jobId }) => ({ cancelled: cancel(jobId) }),
      'export.suggestPath': async ({ fileName }) => ({ path: suggestExportPath(fileName) }),
      'export.write': async (req) => writeExport(req),
    },
    opts.log,
  );

  for (const [lane, svc] of Object.entries(lanes)) {
    const idOf = (id: string) => `${lane}:${id}`;
    svc.on('progress', (id: string, p: ProgressPayload) => {
      const jobId = idOf(id);
      if ('iteration' in p) {
        router.emit('fit.progress', {
          jobId,
          iteration: p.iteration,
          objective: Number.isFinite(p.objective) ? p.objective : null,
          elapsedMs: p.elapsedMs,
        });
      } else {
        router.emit('fit.step', { jobId, done: p.done, total: p.total, elapsedMs: p.elapsedMs });
      }
    });
    svc.on('result', (id: string, result: unknown) => {
      const jobId = idOf(id);
      const kind = kinds.get(jobId);
      kinds.delete(jobId);
      if (kind === 'evaluate') {
        router.emit('fit.evaluated', { jobId, result: crossValidationToPayload(result as CrossValidationResult) });
      } else if (kind === 'tune') {
        router.emit('fit.tuned', { jobId, result: tuneToPayload(result as TuneResult) });
      } else {
        const r = result as FitJobResult;
        router.emit('fit.result', { jobId, result: fitResultToPayload(r), ...(r.trust ? { trust: trustToPayload(r.trust) } : {}) });
      }
    });
    svc.on('cancelled', (id: string) => {
      kinds.delete(idOf(id));
      router.emit('fit.cancelled', { jobId: idOf(id) });
    });
    svc.on('error', (id: string, message: string) => {
      kinds.delete(idOf(id));
      router.emit('fit.error', { jobId: idOf(id), message });
    });
  }

  return {
    router,
    fits,
    evaluations,
    dispose: async () => {
      await Promise.all([fits.dispose(), evaluations.dispose(), parser?.terminate()]);
    },
  };
}
