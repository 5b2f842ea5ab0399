import { afterEach, describe, expect, it } from 'vitest';
import { Worker } from 'node:worker_threads';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import { EnginePool, runFoldsInProcess, settingGroups } from '../../../src-main/pool/enginePool';
import { evaluateOnPool, seedStabilityOnPool, tuneOnPool } from '../../../src-main/pool/poolJobs';
import { seedStability } from '../../../src-shared/engine/seedStability';
import { crossValidate, makeFolds } from '../../../src-shared/engine/crossValidation';
import { expandLowRankGrid, tune } from '../../../src-shared/engine/tuning';
import { defaultLowRankSettings } from '../../../src-shared/engine/defaults';
import { toSparseMatrix } from '../../../src-shared/matrix/sparseRatings';
import { lowRankCase } from '../engine/helpers';

// TypeScript worker entry through tsx's CommonJS hook in an eval worker (see fitService.test.ts).
const workerFile = fileURLToPath(new URL('../../../src-main/pool/pool.worker.ts', import.meta.url));
const tsxCjsApi = createRequire(import.meta.url).resolve('tsx/cjs/api');
const makeWorker = (): Worker =>
  new Worker(`require(${JSON.stringify(tsxCjsApi)}).register(); require(${JSON.stringify(workerFile)});`, {
    eval: true,
  });

const pools: EnginePool[] = [];
afterEach(async () => {
  await Promise.all(pools.splice(0).map((p) => p.close()));
});
function pool(size: number): EnginePool {
  const p = new EnginePool(makeWorker, size);
  pools.push(p);
  return p;
}

describe('engine pool', () => {
  const { matrix } = lowRankCase(60, 40, 2, 0.3, 0.5, 17);
  const m = toSparseMatrix(matrix);
  const list = expandLowRankGrid({
    ranks: [0, 1, 3],
    lambdas: [0.5, 4],
    centerings: ['row', 'both'],
    base: { maxIterations: 30 },
  });

  it('gives bit-identical outcomes with 1, 2 and 4 workers and in this thread', async () => {
    // common practice, no source: parallel work split into independent deterministic tasks must not change any number.
    const folds = makeFolds(m, 5, 3);
    const job = { matrix: m, folds, settings: list, reuse: true };
    const here = runFoldsInProcess(job);
    for (const size of [1, 2, 4]) {
      const got = await pool(size).runFolds(job);
      expect(got).toEqual(here);
    }
    // The in-process tasks are the engine's own tune (same reuse, same table).
    const engine = tune(m, { settings: list }, 5, 3);
    const onPool = await tuneOnPool(pool(2), m, list, 5, 3);
    expect(onPool.table).toEqual(engine.table);
    expect(onPool.bestIndex).toBe(engine.bestIndex);
    expect(settingGroups(list)).toHaveLength(2);
  });

  it('evaluates like crossValidate and reports progress per fold and setting', async () => {
    const s = { ...defaultLowRankSettings(), rank: 2, lambda: 1 };
    const expected = crossValidate(m, s, makeFolds(m, 4, 9), { keepHeldOut: true, intervalLevels: [0.8] });
    const got = await evaluateOnPool(pool(2), m, s, 4, 9, { keepHeldOut: true, intervalLevels: [0.8] });
    expect(got).toEqual(expected);
    expect(got.intervals?.[0].normalized.coverage).toBeGreaterThan(0.5);
    const seen: number[] = [];
    await pool(2).runFolds({
      matrix: m,
      folds: makeFolds(m, 4, 9),
      settings: [s, { ...s, rank: 1 }],
      reuse: false,
      onProgress: (d) => seen.push(d),
    });
    expect(seen.sort((a, b) => a - b)).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
  });

  it('turns a failing setting into its error and keeps the others', async () => {
    const bad = { ...defaultLowRankSettings(), rank: 2, lambda: -1 };
    const good = { ...defaultLowRankSettings(), rank: 1 };
    const r = await tuneOnPool(pool(2), m, [bad, good], 3, 1);
    expect(r.table[0].error).toMatch(/lambda must be/);
    expect(Number.isFinite(r.table[1].meanRmse)).toBe(true);
  });

  it('seed stability on the pool (two jobs sharing the workers, beside an evaluation) equals two fits in this thread', async () => {
    // Common practice, no source: a fit must not depend on where it runs; the reference is
    // seedStability() on the dense matrix, which fits each seed with fitModel.
    const settings = { ...defaultLowRankSettings(), rank: 3, lambda: 1, maxIterations: 20 };
    const expected = seedStability(matrix, settings);
    const p = pool(2);
    const [cv, onPool] = await Promise.all([evaluateOnPool(p, m, settings, 4, 9), seedStabilityOnPool(p, m, settings)]);
    expect(onPool).toEqual(expected);
    expect(await seedStabilityOnPool(undefined, m, settings)).toEqual(expected);
    expect(cv.meanRmse).toBe(crossValidate(m, settings, makeFolds(m, 4, 9)).meanRmse);
    expect(expected.cells).toBe(matrix.values.filter((x) => Number.isNaN(x)).length);
    expect(expected.maxMove).toBeGreaterThan(0);
  });
});
