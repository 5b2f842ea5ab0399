import path from 'node:path';
import { Worker } from 'node:worker_threads';
import { afterAll, describe, expect, it } from 'vitest';
import { formatProblem } from '../../../../src-shared/io/problem';
import { ParseWorkerClient } from '../../../../src-main/services/parseOffThread';

// Built apps load the bundled worker; here the TypeScript source runs through tsx's CommonJS hook.
const WORKER_TS = path.resolve(__dirname, '../../../../src-main/workers/parse.worker.ts');
const worker = new Worker(`require('tsx/cjs'); require(${JSON.stringify(WORKER_TS)});`, { eval: true });
const client = new ParseWorkerClient(worker);
afterAll(() => client.terminate());

describe('parse worker', () => {
  it('parses text and files off the main thread with the same results', async () => {
    const r = await client.parseText('w.csv', 'row;a;b\nx;1,5;2\n');
    expect(r.ok && Array.from(r.matrix.values)).toEqual([1.5, 2]);
    expect(r.ok && r.matrix.values).toBeInstanceOf(Float64Array);
    const bad = await client.parseFile(path.resolve(__dirname, '../../../fixtures/bad/ragged-too-many.csv'));
    expect(bad.ok).toBe(false);
    if (!bad.ok)
      expect(formatProblem(bad.problems[0])).toBe(
        'ragged-too-many.csv:3:4: too many fields: found 5, the header has 3',
      );
  });
});
