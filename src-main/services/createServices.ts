/**
 * The composition root of the main side: builds every service once and wires
 * them to the API router. Both hosts call this and differ only in transport.
 */
import type { ResourceLimits, Worker } from 'node:worker_threads';
import { dirname, join } from 'node:path';
import { readFileSync } from 'node:fs';
import { API_VERSION } from '../../src-shared/api';
import { ApiRouter } from './apiRouter';
import { findAppRoot } from './appRoot';
import { defaultExportDir, suggestExportPath, writeExport } from './exportService';
import { removeLeftoverTemps } from './atomicWrite';
import { FitJobs } from './fitJobs';
import type { FitService } from './fitService';
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

/**
 * At start: temporary files of writes interrupted by a crash or a kill are removed from
 * the folders this host writes to (config, recovery, exports, the folders of recent projects).
 * Every later write also cleans its own folder (atomicWrite).
 */
async function cleanLeftoverTemps(recovery: RecoveryStore, recent: RecentFiles): Promise<void> {
  const dirs = new Set([recovery.dir, dirname(recent.file), defaultExportDir()]);
  try {
    for (const f of await recent.list()) dirs.add(dirname(f.path));
  } catch {
    // No recent list: the fixed folders are enough.
  }
  for (const d of dirs) await removeLeftoverTemps(d);
}

export function createServices(opts: CreateServicesOptions): MainServices {
  const root = opts.appRoot ?? findAppRoot();
  const version = (JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { version: string }).version;
  const samples = new SampleService(join(root, 'samples'));
  // Built after the router (below): job events are published through it.
  let jobs!: FitJobs;

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
  const recovery = new RecoveryStore({ dir: opts.recoveryDir });
  const recent = new RecentFiles({ file: opts.recentFilesPath });
  void cleanLeftoverTemps(recovery, recent);
  const documentHandlers = createDocumentHandlers({
    recovery,
    recent,
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
      'fit.start': async ({ matrix, settings, trust, warmStart, clientId }) =>
        jobs.startFit(matrix, settings, { trust, warmStart, clientId }),
      'fit.evaluate': async ({ matrix, settings, folds, seed, clientId }) =>
        jobs.startEvaluate(matrix, settings, folds, seed, clientId),
      'fit.tune': async ({ matrix, settingsList, folds, seed, clientId }) =>
        jobs.startTune(matrix, settingsList, folds, seed, clientId),
      'fit.cancel': async ({ jobId }) => ({ cancelled: jobs.cancel(jobId) }),
      'export.suggestPath': async ({ fileName }) => ({ path: suggestExportPath(fileName) }),
      'export.write': async (req) => writeExport(req),
    },
    opts.log,
  );

  jobs = new FitJobs(router, opts.createWorker);

  return {
    router,
    fits: jobs.fits,
    evaluations: jobs.evaluations,
    dispose: async () => {
      await Promise.all([jobs.dispose(), parser?.terminate()]);
    },
  };
}
