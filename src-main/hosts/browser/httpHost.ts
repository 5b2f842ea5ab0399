/**
 * The loopback HTTP host: serves the built renderer and the typed API to a
 * browser on this machine only.
 *
 *   GET  /…                      static files of the built renderer (index.html gets a fresh style nonce)
 *   POST /api/call               {"method": "...", "payload": {...}} → ApiResult   (token header required)
 *   GET  /api/events?token=…     server-sent events, one `data:` line per EventEnvelope
 *   POST /api/launch             {"nonce": "..."} → {"ok": true, "data": {"token": "..."}}, once per nonce
 *
 * Guards: bound to 127.0.0.1; the Host header must name this loopback address and
 * port (defeats DNS rebinding); a present Origin must be this host's own origin;
 * every API call must carry the per-launch token. The token is never put on a command
 * line (where `ps` shows it to every local user): the system browser is opened on a
 * launch address carrying a one-time nonce (valid for 60 s), which the page trades for
 * the token. Bodies are size-limited (413 with a JSON error, checked from Content-Length
 * before reading and while reading) and must arrive within a deadline (408); a badly
 * percent-encoded address answers 400.
 */
import { randomBytes, timingSafeEqual } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import { join, normalize, sep } from 'node:path';
import { TOKEN_HEADER, type ApiResult } from '../../../src-shared/api';
import type { ApiRouter } from '../../services/apiRouter';
import { contentSecurityPolicy, contentType, injectNonce, newNonce, securityHeaders } from '../pageSecurity';

export interface HttpHostOptions {
  router: ApiRouter;
  /** Folder with the built renderer (index.html and assets). */
  rendererDir: string;
  /** 0 = any free port. */
  port?: number;
  /** Fixed token for tests; random per launch otherwise. */
  token?: string;
  /** Largest accepted request body in bytes (default 64 MB). */
  maxBodyBytes?: number;
  /** Time a request body may take to arrive, ms (default 20 s). */
  bodyTimeoutMs?: number;
  /** Life of a launch nonce, ms (default 60 s). */
  launchNonceTtlMs?: number;
  log?: (line: string) => void;
}

export interface HttpHost {
  url: string;
  /** URL with the token in the fragment (never sent to the server in requests); printed for the user only. */
  launchUrl: string;
  /** A fresh one-time launch address (`#launch=<nonce>`), for handing to another program such as the system browser. */
  newLaunchUrl(): string;
  port: number;
  token: string;
  server: Server;
  close(): Promise<void>;
}

const LOOPBACK = '127.0.0.1';

export async function startHttpHost(opts: HttpHostOptions): Promise<HttpHost> {
  const token = opts.token ?? randomBytes(24).toString('base64url');
  const tokenBytes = Buffer.from(token);
  const maxBody = opts.maxBodyBytes ?? 64 * 1024 * 1024;
  const bodyTimeoutMs = opts.bodyTimeoutMs ?? 20_000;
  const nonceTtlMs = opts.launchNonceTtlMs ?? 60_000;
  /** Launch nonces not yet traded, with their expiry time. */
  const nonces = new Map<string, number>();
  const log = opts.log ?? (() => {});
  const rendererDir = normalize(opts.rendererDir);
  let port = opts.port ?? 0;
  const eventStreams = new Set<ServerResponse>();

  const tokenOk = (candidate: string | undefined | null): boolean => {
    if (!candidate) return false;
    const b = Buffer.from(candidate);
    return b.length === tokenBytes.length && timingSafeEqual(b, tokenBytes);
  };

  const allowedHosts = () => new Set([`${LOOPBACK}:${port}`, `localhost:${port}`]);
  const allowedOrigins = () => new Set([`http://${LOOPBACK}:${port}`, `http://localhost:${port}`]);

  const send = (
    res: ServerResponse,
    status: number,
    body: string | Buffer,
    type: string,
    extra: Record<string, string> = {},
  ) => {
    res.writeHead(status, { 'Content-Type': type, 'Cache-Control': 'no-store', ...securityHeaders(), ...extra });
    res.end(body);
  };
  const sendJson = (res: ServerResponse, status: number, value: ApiResult<unknown>) =>
    send(res, status, JSON.stringify(value), 'application/json; charset=utf-8');
  const refuse = (
    res: ServerResponse,
    status: number,
    code: 'unauthorized' | 'bad-request' | 'transport',
    message: string,
  ) => sendJson(res, status, { ok: false, error: { code, message } });

  const megabytes = (n: number) =>
    n >= 1024 * 1024
      ? `${(n / (1024 * 1024)).toFixed(1)} MB`
      : n >= 1024
        ? `${(n / 1024).toFixed(1)} KB`
        : `${n} bytes`;

  /** A body refused part-way: answer, then close the connection (the rest of the body is not read). */
  class BodyRefused extends Error {
    constructor(
      readonly status: 408 | 413,
      message: string,
    ) {
      super(message);
    }
  }

  const readBody = (req: IncomingMessage): Promise<string> =>
    new Promise((resolve, reject) => {
      const declared = Number(req.headers['content-length']);
      if (Number.isFinite(declared) && declared > maxBody) {
        reject(
          new BodyRefused(
            413,
            `the request body (${megabytes(declared)}) is larger than the limit of ${megabytes(maxBody)}`,
          ),
        );
        return;
      }
      const chunks: Buffer[] = [];
      let size = 0;
      let done = false;
      const finish = (err: Error | null, text?: string) => {
        if (done) return;
        done = true;
        clearTimeout(timer);
        req.removeAllListeners('data');
        if (err) {
          req.pause();
          reject(err);
        } else resolve(text!);
      };
      const timer = setTimeout(
        () =>
          finish(new BodyRefused(408, `the request body did not arrive within ${Math.round(bodyTimeoutMs / 1000)} s`)),
        bodyTimeoutMs,
      );
      req.on('data', (c: Buffer) => {
        size += c.length;
        if (size > maxBody)
          return finish(new BodyRefused(413, `the request body is larger than the limit of ${megabytes(maxBody)}`));
        chunks.push(c);
      });
      req.on('end', () => finish(null, Buffer.concat(chunks).toString('utf8')));
      req.on('error', (err) => finish(err));
    });

  /** Reads a JSON body, answering 413/408/400 itself; undefined when it did. */
  const readJsonBody = async (req: IncomingMessage, res: ServerResponse): Promise<{ value: unknown } | undefined> => {
    try {
      return { value: JSON.parse(await readBody(req)) };
    } catch (err) {
      if (err instanceof BodyRefused) {
        const result: ApiResult<unknown> = { ok: false, error: { code: 'bad-request', message: err.message } };
        send(res, err.status, JSON.stringify(result), 'application/json; charset=utf-8', { Connection: 'close' });
        res.once('finish', () => setTimeout(() => req.socket.destroy(), 50).unref());
        return undefined;
      }
      refuse(
        res,
        400,
        'bad-request',
        `unreadable request: ${err instanceof Error ? err.message.slice(0, 200) : String(err)}`,
      );
      return undefined;
    }
  };

  const tradeNonce = (nonce: unknown): boolean => {
    const now = Date.now();
    for (const [n, expires] of nonces) if (expires <= now) nonces.delete(n);
    if (typeof nonce !== 'string' || !nonces.has(nonce)) return false;
    nonces.delete(nonce); // one use only
    return true;
  };

  const serveStatic = async (res: ServerResponse, urlPath: string) => {
    let rel: string;
    try {
      rel = decodeURIComponent(urlPath.split('?')[0]);
    } catch {
      return send(res, 400, 'bad request: the address has a broken percent-encoding', 'text/plain; charset=utf-8');
    }
    if (rel === '/' || rel === '') rel = '/index.html';
    const full = normalize(join(rendererDir, rel));
    if (full !== rendererDir && !full.startsWith(rendererDir + sep)) return send(res, 404, 'not found', 'text/plain');
    let data: Buffer;
    try {
      data = await readFile(full);
    } catch {
      return send(res, 404, 'not found', 'text/plain');
    }
    if (full.endsWith('index.html')) {
      const nonce = newNonce();
      return send(res, 200, injectNonce(data.toString('utf8'), nonce), contentType(full), {
        'Content-Security-Policy': contentSecurityPolicy(nonce),
      });
    }
    send(res, 200, data, contentType(full));
  };

  const handle = async (req: IncomingMessage, res: ServerResponse) => {
    const host = req.headers.host ?? '';
    if (!allowedHosts().has(host))
      return refuse(res, 421, 'unauthorized', 'this host answers only on its loopback address');
    const origin = req.headers.origin;
    if (origin !== undefined && !allowedOrigins().has(origin))
      return refuse(res, 403, 'unauthorized', 'cross-origin requests are refused');
    let url: URL;
    try {
      url = new URL(req.url ?? '/', `http://${host}`);
    } catch {
      return send(res, 400, 'bad request: unreadable address', 'text/plain; charset=utf-8');
    }

    if (url.pathname === '/api/launch') {
      if (req.method !== 'POST') return refuse(res, 405, 'bad-request', 'use POST');
      if (!(req.headers['content-type'] ?? '').startsWith('application/json')) {
        return refuse(res, 415, 'bad-request', 'expected application/json');
      }
      const body = await readJsonBody(req, res);
      if (!body) return;
      if (!tradeNonce((body.value as { nonce?: unknown } | null)?.nonce)) {
        return refuse(
          res,
          401,
          'unauthorized',
          'this launch address was already used or has expired; open the address Rankfill printed',
        );
      }
      return sendJson(res, 200, { ok: true, data: { token } });
    }

    if (url.pathname === '/api/call') {
      if (req.method !== 'POST') return refuse(res, 405, 'bad-request', 'use POST');
      const headerToken = req.headers[TOKEN_HEADER];
      if (!tokenOk(Array.isArray(headerToken) ? headerToken[0] : headerToken)) {
        return refuse(res, 401, 'unauthorized', 'missing or wrong API token');
      }
      if (!(req.headers['content-type'] ?? '').startsWith('application/json')) {
        return refuse(res, 415, 'bad-request', 'expected application/json');
      }
      const body = await readJsonBody(req, res);
      if (!body) return;
      const { method, payload } = (body.value ?? {}) as { method?: unknown; payload?: unknown };
      const result = await opts.router.call(method, payload);
      return sendJson(res, 200, result);
    }

    if (url.pathname === '/api/events') {
      if (!tokenOk(url.searchParams.get('token')))
        return refuse(res, 401, 'unauthorized', 'missing or wrong API token');
      res.writeHead(200, {
        'Content-Type': 'text/event-stream; charset=utf-8',
        'Cache-Control': 'no-store',
        Connection: 'keep-alive',
        ...securityHeaders(),
      });
      res.write(': connected\n\n');
      eventStreams.add(res);
      req.on('close', () => eventStreams.delete(res));
      return;
    }

    if (url.pathname.startsWith('/api/')) return refuse(res, 404, 'bad-request', 'no such API route');
    if (req.method !== 'GET' && req.method !== 'HEAD') return send(res, 405, 'method not allowed', 'text/plain');
    return serveStatic(res, url.pathname);
  };

  const unsubscribe = opts.router.onEvent((envelope) => {
    const line = `data: ${JSON.stringify(envelope)}\n\n`;
    for (const res of eventStreams) res.write(line);
  });

  const server = createServer((req, res) => {
    handle(req, res).catch((err) => {
      log(`request failed: ${err instanceof Error ? err.stack : String(err)}`);
      if (!res.headersSent) refuse(res, 500, 'transport', 'the host could not answer this request');
      else res.end();
    });
  });
  server.headersTimeout = 30_000;
  // Backstop behind the body deadline above (Node answers 408 itself and closes).
  server.requestTimeout = Math.max(bodyTimeoutMs + 5_000, 30_000);

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, LOOPBACK, () => {
      server.off('error', reject);
      resolve();
    });
  });
  const address = server.address();
  if (address && typeof address === 'object') port = address.port;
  const url = `http://${LOOPBACK}:${port}/`;

  return {
    url,
    launchUrl: `${url}#token=${token}`,
    newLaunchUrl: () => {
      const nonce = randomBytes(18).toString('base64url');
      nonces.set(nonce, Date.now() + nonceTtlMs);
      return `${url}#launch=${nonce}`;
    },
    port,
    token,
    server,
    close: async () => {
      unsubscribe();
      for (const res of eventStreams) res.end();
      eventStreams.clear();
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
