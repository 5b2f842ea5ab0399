import { describe, expect, it } from 'vitest';
import { ApiRouter, UserFacingError, type ApiHandlers } from '../../../src-main/services/apiRouter';
import type { EventEnvelope } from '../../../src-shared/api';

const goodDoc = {
  source: { kind: 'sample' as const, name: 'x' },
  title: 'X',
  matrix: { rowLabels: ['a'], colLabels: ['b', 'c'], values: [1, null], scale: { min: 1, max: 5, step: 1 } },
  warnings: [],
};

function router(overrides: Partial<ApiHandlers> = {}, log: string[] = []): ApiRouter {
  const handlers = {
    'app.info': async () => ({ name: 'Rankfill', version: '0.0.0', apiVersion: 1, host: 'browser' }),
    'samples.list': async () => ({ samples: [] }),
    'samples.open': async () => goodDoc,
    'fit.start': async () => ({ jobId: 'job-1' }),
    'fit.cancel': async () => ({ cancelled: true }),
    ...overrides,
  } as unknown as ApiHandlers;
  return new ApiRouter(handlers, (l) => log.push(l));
}

// The contract's rules are our own (common practice for RPC boundaries, no source).
describe('ApiRouter: every message validated at the boundary', () => {
  it('answers a valid call with ok and the validated reply', async () => {
    expect(await router().call('samples.open', { id: 'x' })).toEqual({ ok: true, data: goodDoc });
  });

  it('refuses an unknown method without calling anything', async () => {
    const r = await router().call('files.deleteEverything', {});
    expect(r).toEqual({ ok: false, error: { code: 'bad-method', message: 'unknown method: files.deleteEverything' } });
  });

  it('refuses a request that does not match its schema, naming the field', async () => {
    const r = await router().call('samples.open', { id: 42 });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.code).toBe('bad-request');
      expect(r.error.message).toMatch(/^samples\.open: id: /);
    }
  });

  it('refuses extra fields and wrong matrix shapes', async () => {
    expect((await router().call('fit.cancel', { jobId: 'a', extra: 1 })).ok).toBe(false);
    const badMatrix = { rowLabels: ['a'], colLabels: ['b'], values: [1, 2], scale: { min: 1, max: 5, step: 1 } };
    const r = await router().call('fit.start', {
      matrix: badMatrix,
      settings: {
        model: 'gaussian',
        shrinkage: 0,
        transpose: false,
        maxIterations: 10,
        tolerance: 1e-6,
        seed: 1,
        clipToScale: true,
        snapToStep: false,
      },
    });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toContain('values length must equal rows × columns');
  });

  it('turns a thrown handler error into an error reply, never a crash', async () => {
    const log: string[] = [];
    const r = await router(
      {
        'samples.open': async () => {
          throw new UserFacingError('no sample called "q"');
        },
      },
      log,
    ).call('samples.open', { id: 'q' });
    expect(r).toEqual({ ok: false, error: { code: 'failed', message: 'no sample called "q"' } });
    expect(log).toEqual([]);
    const r2 = await router(
      {
        'samples.open': async () => {
          throw new TypeError('boom');
        },
      },
      log,
    ).call('samples.open', { id: 'q' });
    expect(r2).toEqual({ ok: false, error: { code: 'failed', message: 'boom' } });
    expect(log[0]).toMatch(/^samples\.open failed: TypeError: boom/);
  });

  it('refuses to pass on a reply that breaks the contract', async () => {
    const r = await router({ 'fit.start': async () => ({ jobId: '' }) }).call('fit.start', {
      matrix: goodDoc.matrix,
      settings: {
        model: 'gaussian',
        shrinkage: 0.1,
        transpose: false,
        maxIterations: 10,
        tolerance: 1e-6,
        seed: 1,
        clipToScale: true,
        snapToStep: false,
      },
    });
    expect(r).toEqual({
      ok: false,
      error: { code: 'bad-reply', message: 'fit.start: internal reply did not match the contract' },
    });
  });

  it('publishes only events that match their schema', () => {
    const log: string[] = [];
    const r = router({}, log);
    const seen: EventEnvelope[] = [];
    r.onEvent((e) => seen.push(e));
    r.emit('fit.progress', { jobId: 'j', iteration: 3, objective: 1.5, elapsedMs: 12 });
    r.emit('fit.progress', { jobId: 'j', iteration: -1, objective: 1.5, elapsedMs: 12 });
    expect(seen).toEqual([
      { event: 'fit.progress', payload: { jobId: 'j', iteration: 3, objective: 1.5, elapsedMs: 12 } },
    ]);
    expect(log[0]).toMatch(/^event fit\.progress dropped: iteration/);
  });
});
