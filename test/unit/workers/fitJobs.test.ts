import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import { Worker, type ResourceLimits } from 'node:worker_threads';
import { afterEach, describe, expect, it } from 'vitest';
import { ApiRouter, UserFacingError, type ApiHandlers } from '../../../src-main/services/apiRouter';
import { FitJobs } from '../../../src-main/services/fitJobs';
import { matrixToPayload } from '../../../src-shared/apiCodec';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { fitModel } from '../../../src-shared/engine/fitModel';
import type { EventEnvelope } from '../../../src-shared/api';
import { lowRankCase } from '../engine/helpers';

// The fit worker's TypeScript entry, loaded through tsx's CommonJS hook (see fitService.test.ts).
const workerFile = fileURLToPath(new URL('../../../src-main/workers/fit.worker.ts', import.meta.url));
const tsxCjsApi = createRequire(import.meta.url).resolve('tsx/cjs/api');
const makeWorker = (limits: ResourceLimits) =>
  new Worker(`require(${JSON.stringify(tsxCjsApi)}).register(); require(${JSON.stringify(workerFile)});`, {
    eval: true,
    resourceLimits: limits,
  });

function setup() {
  const router = new ApiRouter({} as ApiHandlers);
  const events: EventEnvelope[] = [];
  router.onEvent((e) => events.push(e));
  const jobs = new FitJobs(router, makeWorker);
  const waitFor = (pred: (e: EventEnvelope) => boolean) =>
    new Promise<EventEnvelope>((resolve) => {
      const hit = events.find(pred);
      if (hit) return resolve(hit);
      const off = router.onEvent((e) => {
        if (pred(e)) {
          off();
          resolve(e);
        }
      });
    });
  return { jobs, events, waitFor };
}

describe('model jobs behind the API', () => {
  let dispose: (() => Promise<void>) | undefined;
  afterEach(async () => dispose?.());

  const { matrix } = lowRankCase(20, 15, 2, 0.1, 0.6, 3);
  const payload = matrixToPayload(matrix);
  const settings = { ...defaultLowRankSettings(), rank: 2 };

  it('a page-chosen id names the job and its events; the result equals an in-process fit', async () => {
    const { jobs, waitFor } = setup();
    dispose = () => jobs.dispose();
    expect(jobs.startFit(payload, settings, { clientId: 'live-1' })).toEqual({ jobId: 'fit:live-1' });
    const e = await waitFor((x) => x.event === 'fit.result');
    expect((e.payload as { jobId: string }).jobId).toBe('fit:live-1');
    // Reference: the same fit run in this process (the engine is deterministic for a seed).
    const want = fitModel(matrix, settings);
    const got = (e as Extract<EventEnvelope, { event: 'fit.result' }>).payload.result.predictions;
    got.forEach((p, c) => expect(p).toBeCloseTo(want.predictions[c], 12));
  });

  it('refuses a page-chosen id that is still running, and cancels by API id', async () => {
    const { jobs, waitFor } = setup();
    dispose = () => jobs.dispose();
    const big = matrixToPayload(lowRankCase(300, 200, 5, 0.1, 0.5, 9).matrix);
    jobs.startTune(
      big,
      [
        { ...settings, rank: 5 },
        { ...settings, rank: 4 },
        { ...settings, rank: 3 },
      ],
      5,
      1,
      'grid-1',
    );
    expect(() => jobs.startTune(payload, [settings], 5, 1, 'grid-1')).toThrow(UserFacingError);
    expect(jobs.cancel('eval:grid-1')).toBe(true);
    const e = await waitFor((x) => x.event === 'fit.cancelled');
    expect((e.payload as { jobId: string }).jobId).toBe('eval:grid-1');
    expect(jobs.cancel('eval:grid-1')).toBe(false);
    expect(jobs.cancel('eval:no-such-job')).toBe(false);
  });

  it('numbers jobs per lane when no id is given, and reports evaluations as their own event', async () => {
    const { jobs, waitFor } = setup();
    dispose = () => jobs.dispose();
    const { jobId } = jobs.startEvaluate(payload, settings, 4, 1);
    expect(jobId).toMatch(/^eval:job-\d+$/);
    const e = await waitFor((x) => x.event === 'fit.evaluated');
    expect((e.payload as { jobId: string }).jobId).toBe(jobId);
    const r = (e as Extract<EventEnvelope, { event: 'fit.evaluated' }>).payload.result;
    expect(r.folds).toHaveLength(4);
    expect(r.meanRmse).toBeGreaterThan(0);
  });
});
