import { mkdtempSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startHttpHost, type HttpHost } from '../../../src-main/hosts/browser/httpHost';
import { NONCE_PLACEHOLDER } from '../../../src-main/hosts/pageSecurity';
import { ApiRouter, type ApiHandlers } from '../../../src-main/services/apiRouter';

interface Reply {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: string;
}

function send(
  port: number,
  method: string,
  path: string,
  headers: Record<string, string>,
  body?: string,
): Promise<Reply> {
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, method, path, headers }, (res) => {
      let data = '';
      res.on('data', (c) => (data += c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: data }));
    });
    req.on('error', reject);
    if (body !== undefined) req.write(body);
    req.end();
  });
}

// Loopback-only, token and origin checks: our own security rules, following
// common practice for local web servers (no source).
describe('browser host (loopback HTTP)', () => {
  let host: HttpHost;
  const handlers = {
    'app.info': async () => ({ name: 'Rankfill', version: '9.9.9', apiVersion: 1, host: 'browser' as const }),
  } as unknown as ApiHandlers;

  beforeAll(async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rankfill-host-'));
    writeFileSync(join(dir, 'index.html'), `<meta name="rankfill-style-nonce" content="${NONCE_PLACEHOLDER}">`);
    writeFileSync(join(dir, 'app.js'), 'console.log(1)');
    host = await startHttpHost({ router: new ApiRouter(handlers), rendererDir: dir, token: 'secret-token-123' });
  });
  afterAll(() => host.close());

  const hostHeader = () => `127.0.0.1:${host.port}`;
  const call = (headers: Record<string, string>, body = JSON.stringify({ method: 'app.info', payload: {} })) =>
    send(host.port, 'POST', '/api/call', { Host: hostHeader(), 'Content-Type': 'application/json', ...headers }, body);

  it('listens on 127.0.0.1 only', () => {
    const addr = host.server.address();
    expect(typeof addr === 'object' && addr?.address).toBe('127.0.0.1');
    expect(host.url).toBe(`http://127.0.0.1:${host.port}/`);
    expect(host.launchUrl).toBe(`http://127.0.0.1:${host.port}/#token=secret-token-123`);
  });

  it('answers a call that carries the token', async () => {
    const r = await call({ 'x-rankfill-token': 'secret-token-123' });
    expect(r.status).toBe(200);
    expect(JSON.parse(r.body)).toEqual({
      ok: true,
      data: { name: 'Rankfill', version: '9.9.9', apiVersion: 1, host: 'browser' },
    });
  });

  it('refuses a call without the token or with a wrong one', async () => {
    for (const headers of [{}, { 'x-rankfill-token': 'secret-token-124' }, { 'x-rankfill-token': 'short' }] as Record<
      string,
      string
    >[]) {
      const r = await call(headers);
      expect(r.status).toBe(401);
      expect(JSON.parse(r.body)).toEqual({
        ok: false,
        error: { code: 'unauthorized', message: 'missing or wrong API token' },
      });
    }
  });

  it('refuses other origins and foreign Host headers (DNS rebinding)', async () => {
    const r = await call({ 'x-rankfill-token': 'secret-token-123', Origin: 'http://evil.example' });
    expect(r.status).toBe(403);
    const r2 = await send(
      host.port,
      'POST',
      '/api/call',
      { Host: 'evil.example', 'x-rankfill-token': 'secret-token-123', 'Content-Type': 'application/json' },
      '{}',
    );
    expect(r2.status).toBe(421);
  });

  it('answers malformed JSON with an error reply', async () => {
    const r = await call({ 'x-rankfill-token': 'secret-token-123' }, '{"method": ');
    expect(r.status).toBe(400);
    expect(JSON.parse(r.body).error.code).toBe('bad-request');
  });

  it('gives index.html a fresh nonce and the strict policy on every load', async () => {
    const a = await send(host.port, 'GET', '/', { Host: hostHeader() });
    const b = await send(host.port, 'GET', '/index.html', { Host: hostHeader() });
    const nonceA = /content="([^"]+)"/.exec(a.body)?.[1];
    const nonceB = /content="([^"]+)"/.exec(b.body)?.[1];
    expect(nonceA).toMatch(/^[A-Za-z0-9+/=]{24}$/);
    expect(nonceA).not.toBe(nonceB);
    const csp = String(a.headers['content-security-policy']);
    expect(csp).toContain(`style-src 'self' 'nonce-${nonceA}'`);
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toContain('unsafe-inline');
    expect(csp).not.toMatch(/https?:/);
  });

  it('serves built files but nothing outside the renderer folder', async () => {
    expect((await send(host.port, 'GET', '/app.js', { Host: hostHeader() })).status).toBe(200);
    expect((await send(host.port, 'GET', '/../../etc/passwd', { Host: hostHeader() })).status).toBe(404);
    expect((await send(host.port, 'GET', '/%2e%2e/%2e%2e/etc/passwd', { Host: hostHeader() })).status).toBe(404);
  });

  it('requires the token for the event stream too', async () => {
    const r = await send(host.port, 'GET', '/api/events', { Host: hostHeader() });
    expect(r.status).toBe(401);
  });
});
