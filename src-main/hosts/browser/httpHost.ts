/**
 * The loopback HTTP host: serves the built renderer and the typed API to a
 * browser on this machine only.
 *
 *   GET  /…                      static files of the built renderer (index.html gets a fresh style nonce)
 *   POST /api/call               {"method": "...", "payload": {...}} → ApiResult   (token header required)
 *   GET  /api/events?token=…     server-sent events, one `data:` line per EventEnvelope
 *
 * Guards: bound to 127.0.0.1; the Host header must name this loopback address and
 * port (defeats DNS rebinding); a present Origin must be this host's own origin;
 * every API call must carry the per-launch token; bodies are size-limited.
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
  /** Largest accepted request body in bytes. */
  maxBodyBytes?: number;
  log?: (line: string) => void;
}

export interface HttpHost {
  url: string;
  /** URL with the token in the fragment (never sent to the server in requests). */
  launchUrl: string;
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

  const send = (res: ServerResponse, status: number, body: string | Buffer, type: string, extra: Record<string, string> = {}) => {
    res.writeHead(status, { 'Content-Type': type, 'Cache-Control': 'no-store', ...securityHeaders(), ...extra });
    res.end(body);
  };
  const sendJson = (res: ServerResponse, status: number, value: ApiResult<unknown>) =>
    send(res, status, JSON.stringify(value), 'application/json; charset=utf-8');
  const refuse = (res: ServerResponse, status: number, code: 'unauthorized' | 'bad-request' | 'transport', message: string) =>
    sendJson(res, status, { ok: false, error: { code, message } });

  const readBody = (req: IncomingMessage): Promise<string> =>
    new Promise((resolve, reject) => {
      const chunks: Buffer[] = [];
      let size = 0;
      req.on('data', (c: Buffer) => {
        size += c.length;
        if (size > maxBody) {
          reject(new Error(`request body over ${maxBody} bytes`));
          req.destroy();
          return;
        }
        chunks.push(c);
      });
      req.on('end', () => resolve(Buffer.concat(chunks).toString('utf8')));
      req.on('error', reject);
    });

  const serveStatic = async (res: ServerResponse, urlPath: string) => {
    let rel = decodeURIComponent(urlPath.split('?')[0]);
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
    if (!allowedHosts().has(host)) return refuse(res, 421, 'unauthorized', 'this host answers only on its loopback address');
    const origin = req.headers.origin;
    if (origin !== undefined && !allowedOrigins().has(origin)) return refuse(res, 403, 'unauthorized', 'cross-origin requests are refused');
    const url = new URL(req.url ?? '/', `http://${host}`);

    if (url.pathname === '/api/call') {
      if (req.method !== 'POST') return refuse(res, 405, 'bad-request', 'use POST');
      const headerToken = req.headers[TOKEN_HEADER];
      if (!tokenOk(Array.isArray(headerToken) ? headerToken[0] : headerToken)) {
        return refuse(res, 401, 'unauthorized', 'missing or wrong API token');
      }
      if (!(req.headers['content-type'] ?? '').startsWith('application/json')) {
        return refuse(res, 415, 'bad-request', 'expected application/json');
      }
      let body: unknown;
      try {
        body = JSON.parse(await readBody(req));
      } catch (err) {
        return refuse(res, 400, 'bad-request', `unreadable request: ${err instanceof Error ? err.message : String(err)}`);
      }
      const { method, payload } = (body ?? {}) as { method?: unknown; payload?: unknown };
      const result = await opts.router.call(method, payload);
      return sendJson(res, 200, result);
    }

    if (url.pathname === '/api/events') {
      if (!tokenOk(url.searchParams.get('token'))) return refuse(res, 401, 'unauthorized', 'missing or wrong API token');
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
