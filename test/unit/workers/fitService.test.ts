import { afterEach, describe, expect, it } from 'vitest';
import { Worker, type ResourceLimits } from 'node:worker_threads';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import { FitService } from '../../../src-main/services/fitService';
import type { FitJobResult, StepProgress } from '../../../src-main/workers/fitProtocol';
import type { FitProgress } from '../../../src-shared/engine/types';
import type { TuneResult } from '../../../src-shared/engine/tuning';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { expandLowRankGrid } from '../../../src-shared/engine/tuning';
import { fitModel } from '../../../src-shared/engine/fitModel';
import { lowRankCase } from '../engine/helpers';

// Under vitest on Node 20 the TypeScript worker entry is loaded through tsx's CommonJS hook
// inside an eval worker (execArgv ['--import', 'tsx'] fails there: "Unknown file extension .ts").
const workerFile = fileURLToPath(new URL('../../../src-main/workers/fit.worker.ts', import.meta.url));
const tsxCjsApi = createRequire(import.meta.url).resolve('tsx/cjs/api');
const makeWorker = (limits: ResourceLimits) =>
  new Worker(`require(${JSON.stringify(tsxCjsApi)}).register(); require(${JSON.stringify(workerFile)});`, {
    eval: true,
    resourceLimits: limits,
  });

type Outcome =
  | { kind: 'result'; payload: unknown; progress: unknown[]; progressTimes: number[] }
  | { kind: 'error'; message: string; progress: unknown[]; progressTimes: number[] }
  | { kind: 'cancelled'; progress: unknown[]; progressTimes: number[] };

function outcome(service: FitService, jobId: string): Promise<Outcome> {
  const progress: unknown[] = [];
  const progressTimes: number[] = [];
  return new Promise((resolve) => {
    const onProgress = (id: string, p: unknown) => {
      if (id !== jobId) return;
      progress.push(p);
      progressTimes.push(performance.now());
    };
    const done = (o: Outcome) => {
      service.off('progress', onProgress);
      service.off('result', onResult);
      service.off('error', onError);
      service.off('cancelled', onCancelled);
      resolve(o);
    };
    const onResult = (id: string, payload: unknown) =>
      id === jobId && done({ kind: 'result', payload, progress, progressTimes });
    const onError = (id: string, message: string) =>
      id === jobId && done({ kind: 'error', message, progress, progressTimes });
    const onCancelled = (id: string) => id === jobId && done({ kind: 'cancelled', progress, progressTimes });
    service.on('progress', onProgress);
    service.on('result', onResult);
    service.on('error', onError);
    service.on('cancelled', onCancelled);
  });
}

let service: FitService | undefined;
afterEach(async () => {
  await service?.dispose();
  service = undefined;
});

describe('FitService with a real worker', () => {
  it('fits in the worker with the same result as in-process, posting throttled progress', async () => {
    service = new FitService({ createWorker: makeWorker });
    const { matrix } = lowRankCase(300, 200, 4, 0.3, 0.3, 71);
    const settings = { ...defaultLowRankSettings(), rank: 4, tolerance: 0, maxIterations: 60 };
    const id = service.startFit(matrix, settings);
    const o = await outcome(service, id);
    expect(o.kind).toBe('result');
    const r = (o as { payload: FitJobResult }).payload;
    // Determinism across threads: same seed, same bits as an in-process fit.
    const local = fitModel(matrix, settings);
    expect(r.objectiveTrace).toEqual(local.objectiveTrace);
    expect(r.predictions).toBeInstanceOf(Float64Array);
    expect(Array.from(r.predictions.subarray(0, 50))).toEqual(Array.from(local.predictions.subarray(0, 50)));
    // Progress: FitProgress payloads, at most one per 50 ms (a few ms of slack for timer skew on receipt).
    expect(o.progress.length).toBeGreaterThan(0);
    const first = o.progress[0] as FitProgress;
    expect(first.iteration).toBeGreaterThan(0);
    expect(Number.isFinite(first.objective)).toBe(true);
    const its = (o.progress as FitProgress[]).map((p) => p.elapsedMs);
    // (the engine stamps elapsedMs a few µs before the worker's throttle reads its clock)
    for (let t = 1; t < its.length; t++) expect(its[t] - its[t - 1]).toBeGreaterThanOrEqual(49.9);
  });

  it('cancels a long fit within 100 ms and keeps serving the next job', async () => {
    service = new FitService({ createWorker: makeWorker });
    const { matrix } = lowRankCase(2000, 400, 10, 0.3, 0.2, 72);
    const id = service.startFit(matrix, { ...defaultLowRankSettings(), rank: 10, tolerance: 0, maxIterations: 100000 });
    const long = outcome(service, id);
    // Wait until it is really iterating.
    await new Promise<void>((resolve) => service!.once('progress', () => resolve()));
    const next = service.startEvaluate(
      lowRankCase(20, 15, 1, 0.3, 0.7, 1).matrix,
      { ...defaultLowRankSettings(), rank: 1 },
      3,
      1,
    );
    const nextOutcome = outcome(service, next);
    const t0 = performance.now();
    expect(service.cancel(id)).toBe(true);
    expect((await long).kind).toBe('cancelled');
    const o2 = await nextOutcome;
    // The worker only picks the next job after it stopped the cancelled one.
    expect(performance.now() - t0).toBeLessThan(1000);
    expect(o2.kind).toBe('result');
    expect(service.cancel(id)).toBe(false);
  });

  it('stops the cancelled computation itself within 100 ms (flag polled inside the loop)', async () => {
    service = new FitService({ createWorker: makeWorker });
    const { matrix } = lowRankCase(3000, 500, 10, 0.3, 0.2, 73);
    const id = service.startFit(matrix, { ...defaultLowRankSettings(), rank: 10, tolerance: 0, maxIterations: 100000 });
    await new Promise<void>((resolve) => service!.once('progress', () => resolve()));
    const stopped = new Promise<number>((resolve) =>
      service!.once('stopped', (_id: string, ms: number) => resolve(ms)),
    );
    const small = lowRankCase(30, 20, 2, 0.3, 0.5, 2).matrix;
    const t0 = performance.now();
    service.cancel(id);
    // The worker measures from the request (shared clock) to leaving the loop.
    expect(await stopped).toBeLessThan(100);
    // And the next job runs right after (generous bound: other test files share the cores).
    const o = await outcome(
      service,
      service.startFit(small, { ...defaultLowRankSettings(), rank: 1, maxIterations: 1 }),
    );
    expect(o.kind).toBe('result');
    expect(performance.now() - t0).toBeLessThan(1000);
  });

  it('reports a failed fit as an error with the engine message', async () => {
    service = new FitService({ createWorker: makeWorker });
    const { matrix } = lowRankCase(10, 8, 1, 0.3, 0.8, 74);
    matrix.values[3] = Infinity;
    const o = await outcome(service, service.startFit(matrix, defaultLowRankSettings()));
    expect(o).toMatchObject({ kind: 'error', message: 'non-finite value at row 1, column 4' });
  });

  it('reports a crashed worker for its job, replaces it and runs the next job', async () => {
    let made = 0;
    service = new FitService({
      createWorker: (limits) => {
        made++;
        // The first worker dies on its first message (simulated crash); later ones are real.
        if (made === 1)
          return new Worker(
            'require("node:worker_threads").parentPort.on("message", () => { throw new Error("boom"); });',
            { eval: true },
          );
        return makeWorker(limits);
      },
    });
    const { matrix } = lowRankCase(20, 10, 1, 0.3, 0.8, 75);
    const a = service.startFit(matrix, defaultLowRankSettings());
    const b = service.startFit(matrix, defaultLowRankSettings());
    const [oa, ob] = await Promise.all([outcome(service, a), outcome(service, b)]);
    expect(oa.kind).toBe('error');
    expect((oa as { message: string }).message).toMatch(/stopped unexpectedly \(boom\)/);
    expect(ob.kind).toBe('result');
    expect(made).toBe(2);
  });

  it('runs evaluate and tune jobs with step progress; fit with trust adds spreads', async () => {
    service = new FitService({ createWorker: makeWorker });
    const { matrix } = lowRankCase(40, 30, 2, 0.3, 0.5, 76);
    const list = expandLowRankGrid({ ranks: [1, 2], lambdas: [1], centerings: ['both'] });
    const t = await outcome(service, service.startTune(matrix, list, 3, 5));
    expect(t.kind).toBe('result');
    const tr = (t as { payload: TuneResult }).payload;
    expect(tr.table).toHaveLength(2);
    for (const p of t.progress as StepProgress[]) expect(p.total).toBe(6);
    const f = await outcome(
      service,
      service.startFit(matrix, { ...defaultLowRankSettings(), rank: 2 }, { trust: { method: 'folds', k: 3 } }),
    );
    const fr = (f as { payload: FitJobResult }).payload;
    expect(fr.spread).toBeInstanceOf(Float64Array);
    expect(fr.spread!.length).toBe(1200);
    expect(fr.trust!.rowSupport.length).toBe(40);
  });

  it('kills a worker that exceeds its memory limit and reports it', async () => {
    service = new FitService({
      // A small heap limit (room for a fresh worker and one small fit, measured: 8 MB no longer
      // held the worker itself) and a grid whose result table of plain JS objects cannot fit in it.
      resourceLimits: { maxOldGenerationSizeMb: 24, maxYoungGenerationSizeMb: 4 },
      createWorker: makeWorker,
    });
    const { matrix } = lowRankCase(20, 10, 1, 0.3, 0.8, 77);
    const list = expandLowRankGrid({
      ranks: [0],
      lambdas: Array.from({ length: 1500000 }, (_, i) => i + 1),
      centerings: ['none'],
    });
    const o = await outcome(service, service.startTune(matrix, list, 2, 1));
    expect(o).toMatchObject({
      kind: 'error',
      message: expect.stringMatching(/stopped unexpectedly \(out of memory\)/),
    });
    // And the service recovers with a fresh worker.
    const again = await outcome(service, service.startFit(matrix, defaultLowRankSettings()));
    expect(again.kind).toBe('result');
  });
});
