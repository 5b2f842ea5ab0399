/**
 * Hardening of the loopback HTTP host (issue 11): oversized and slow bodies, broken
 * percent-encoding, the one-time launch address that keeps the token off command lines,
 * and the top-level guard that keeps the host alive when a job result cannot be sent.
 * Status codes as RFC 9110 defines them (400, 401, 408, 413); the rest is our own rule
 * (common practice for local web servers, no source).
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { connect } from 'node:net';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { startHttpHost, type HttpHost } from '../../../src-main/hosts/browser/httpHost';
import { openBrowser } from '../../../src-main/hosts/browser/openBrowser';
import { ApiRouter, type ApiHandlers } from '../../../src-main/services/apiRouter';

interface Reply {
  status: number;
  body: string;
}

function send(
  port: number,
  method: string,
  path: string,
  headers: Record<string, string>,
  body?: string | Buffer,
): Promise<Reply> {
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, method, path, headers }, (res) => {
      let data = '';
      res.on('data', (c) => (data += c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body: data }));
    });
    req.on('error', reject);
    if (body !== undefined) req.write(body);
    req.end();
  });
}

/** Sends raw bytes on a socket and collects everything the host answers until it closes. */
function raw(
  port: number,
  head: string,
  parts: { data: string; afterMs: number }[],
  giveUpMs: number,
): Promise<{ text: string; ms: number }> {
  return new Promise((resolve) => {
    const t0 = performance.now();
    const sock = connect(port, '127.0.0.1');
    let text = '';
    const done = () => resolve({ text, ms: performance.now() - t0 });
    const timers: NodeJS.Timeout[] = [];
    sock.on('data', (d) => (text += d.toString()));
    sock.on('close', () => {
      timers.forEach(clearTimeout);
      done();
    });
    sock.on('error', () => undefined);
    sock.write(head);
    for (const p of parts) timers.push(setTimeout(() => sock.writable && sock.write(p.data), p.afterMs));
    timers.push(setTimeout(() => sock.destroy(), giveUpMs));
  });
}

const fitResult = {
  settings: {
    model: 'lowrank',
    rank: 1,
    lambda: 1,
    centering: 'both',
    scaleLambdaByCount: false,
    maxIterations: 10,
    tolerance: 1e-6,
    seed: 1,
    init: 'spectral',
    offsetLambda: 0,
    clipToScale: true,
    snapToStep: false,
  },
  rows: 2700,
  cols: 2700,
  predictions: [1],
  baseline: [1],
  rowBaseline: [0],
  colBaseline: [0],
  globalMean: 1,
  rowFactors: [0],
  colFactors: [0],
  rank: 1,
  objectiveTrace: [1],
  iterations: 1,
  converged: true,
  elapsedMs: 1,
};

describe('browser host hardening', () => {
  let host: HttpHost;
  let router: ApiRouter;
  const handlers = {
    'app.info': async () => ({ name: 'Rankfill', version: '9.9.9', apiVersion: 1, host: 'browser' as const }),
  } as unknown as ApiHandlers;

  beforeAll(async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rankfill-host-'));
    writeFileSync(join(dir, 'index.html'), '<p>page</p>');
    router = new ApiRouter(handlers);
    host = await startHttpHost({
      router,
      rendererDir: dir,
      token: 'secret-token-123',
      maxBodyBytes: 1000,
      bodyTimeoutMs: 400,
      launchNonceTtlMs: 300,
    });
  });
  afterAll(() => host.close());

  const hostHeader = () => `127.0.0.1:${host.port}`;
  const jsonHeaders = () => ({
    Host: hostHeader(),
    'Content-Type': 'application/json',
    'x-rankfill-token': 'secret-token-123',
  });

  it('answers an oversized body with 413 and a JSON error (before: a TCP reset)', async () => {
    const big = JSON.stringify({ method: 'app.info', payload: { pad: 'x'.repeat(5000) } });
    const r = await send(
      host.port,
      'POST',
      '/api/call',
      { ...jsonHeaders(), 'Content-Length': String(big.length) },
      big,
    );
    expect(r.status).toBe(413);
    expect(JSON.parse(r.body)).toEqual({
      ok: false,
      error: { code: 'bad-request', message: 'the request body (4.9 KB) is larger than the limit of 1000 bytes' },
    });
    // Without a Content-Length (chunked), the cap holds while reading.
    const chunked = await raw(
      host.port,
      `POST /api/call HTTP/1.1\r\nHost: ${hostHeader()}\r\nContent-Type: application/json\r\nx-rankfill-token: secret-token-123\r\nTransfer-Encoding: chunked\r\n\r\n`,
      [{ data: `7d0\r\n${'x'.repeat(2000)}\r\n`, afterMs: 0 }],
      3000,
    );
    expect(chunked.text).toMatch(/^HTTP\/1\.1 413 /);
    expect(chunked.text).toContain('"message":"the request body is larger than the limit of 1000 bytes"');
  });

  it('drops a body trickled in past the deadline with 408 (before: held for over 45 s)', async () => {
    const body = JSON.stringify({ method: 'app.info', payload: {} });
    const trickle = Array.from(body.slice(0, 20), (ch, i) => ({ data: ch, afterMs: i * 100 }));
    const r = await raw(
      host.port,
      `POST /api/call HTTP/1.1\r\nHost: ${hostHeader()}\r\nContent-Type: application/json\r\nx-rankfill-token: secret-token-123\r\nContent-Length: ${body.length}\r\n\r\n`,
      trickle,
      5000,
    );
    expect(r.text).toMatch(/^HTTP\/1\.1 408 /);
    expect(r.text).toContain('the request body did not arrive within 0 s');
    expect(r.ms).toBeLessThan(2500);
  });

  it('answers a broken percent-encoding with 400 (before: 500)', async () => {
    for (const p of ['/%', '/%E0%A4%A', '/a%zz']) {
      const r = await send(host.port, 'GET', p, { Host: hostHeader() });
      expect(r.status).toBe(400);
      expect(r.body).toBe('bad request: the address has a broken percent-encoding');
    }
  });

  it('trades a launch nonce for the token once, and never after it expires', async () => {
    const trade = (nonce: string) =>
      send(
        host.port,
        'POST',
        '/api/launch',
        { Host: hostHeader(), 'Content-Type': 'application/json' },
        JSON.stringify({ nonce }),
      );
    const url = host.newLaunchUrl();
    expect(url).not.toContain('secret-token-123');
    const nonce = /#launch=([A-Za-z0-9_-]+)$/.exec(url)![1];
    const first = await trade(nonce);
    expect(first.status).toBe(200);
    expect(JSON.parse(first.body)).toEqual({ ok: true, data: { token: 'secret-token-123' } });
    const again = await trade(nonce);
    expect(again.status).toBe(401);
    const late = /#launch=(.+)$/.exec(host.newLaunchUrl())![1];
    await new Promise((r) => setTimeout(r, 350));
    expect((await trade(late)).status).toBe(401);
    expect((await trade('guess')).status).toBe(401);
    // From another origin: refused before the nonce is looked at.
    const fresh = /#launch=(.+)$/.exec(host.newLaunchUrl())![1];
    const foreign = await send(
      host.port,
      'POST',
      '/api/launch',
      { Host: hostHeader(), 'Content-Type': 'application/json', Origin: 'http://evil.example' },
      JSON.stringify({ nonce: fresh }),
    );
    expect(foreign.status).toBe(403);
  });

  it('the system browser is opened with the launch address: its argv holds no token', () => {
    const calls: { cmd: string; args: string[] }[] = [];
    const spawn = (cmd: string, args: string[]) => {
      calls.push({ cmd, args });
      return { on: () => undefined, unref: () => undefined };
    };
    expect(openBrowser(host.newLaunchUrl(), { platform: 'linux', env: { DISPLAY: ':0' }, spawn })).toBe(true);
    expect(calls).toHaveLength(1);
    expect(calls[0].cmd).toBe('xdg-open');
    expect(calls[0].args.join(' ')).not.toContain('secret-token-123');
    expect(calls[0].args[0]).toMatch(new RegExp(`^http://127\\.0\\.0\\.1:${host.port}/#launch=[A-Za-z0-9_-]{24}$`));
    expect(openBrowser('http://x/', { platform: 'linux', env: {}, spawn })).toBe(false); // no display: nothing started
  });

  it('a result the transport cannot encode ends the job with one sentence; the host keeps answering', async () => {
    // V8 refuses strings over about 512 MB: JSON.stringify of a 2,700 × 2,700 result with spread
    // throws "RangeError: Invalid string length". We make the same call throw the same error.
    const events: string[] = [];
    const stream = request({
      host: '127.0.0.1',
      port: host.port,
      path: '/api/events?token=secret-token-123',
      headers: { Host: hostHeader() },
    });
    const connected = new Promise<void>((resolve) => {
      stream.on('response', (res) => {
        res.on('data', (d) => {
          events.push(
            ...String(d)
              .split('\n')
              .filter((l) => l.startsWith('data: '))
              .map((l) => l.slice(6)),
          );
          resolve();
        });
      });
    });
    stream.end();
    await connected;
    const realStringify = JSON.stringify;
    const spy = vi.spyOn(JSON, 'stringify').mockImplementation((value: unknown, ...rest: unknown[]) => {
      if ((value as { event?: string } | null)?.event === 'fit.result') throw new RangeError('Invalid string length');
      return realStringify(value, ...(rest as []));
    });
    try {
      expect(() => router.emit('fit.result', { jobId: 'fit:big', result: fitResult } as never)).not.toThrow();
    } finally {
      spy.mockRestore();
    }
    await new Promise((r) => setTimeout(r, 100));
    stream.destroy();
    expect(events.map((e) => JSON.parse(e))).toEqual([
      {
        event: 'fit.error',
        payload: {
          jobId: 'fit:big',
          message:
            'The result is too large to draw in this window (7,290,000 cells); fit fewer rows or columns, or turn off spread.',
        },
      },
    ]);
    const after = await send(
      host.port,
      'POST',
      '/api/call',
      jsonHeaders(),
      JSON.stringify({ method: 'app.info', payload: {} }),
    );
    expect(after.status).toBe(200);
  });
});
