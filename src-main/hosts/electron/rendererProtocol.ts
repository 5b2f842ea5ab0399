/**
 * Serves the built renderer to the Electron window from `rankfill://app/`,
 * giving index.html a fresh style nonce and the strict Content-Security-Policy
 * on every load (the same policy the browser host sends).
 */
import { readFile } from 'node:fs/promises';
import { join, normalize, sep } from 'node:path';
import { contentSecurityPolicy, contentType, injectNonce, newNonce, securityHeaders } from '../pageSecurity';

export async function serveRendererRequest(rendererDir: string, requestUrl: string): Promise<Response> {
  const url = new URL(requestUrl);
  let rel = decodeURIComponent(url.pathname);
  if (rel === '/' || rel === '') rel = '/index.html';
  const root = normalize(rendererDir);
  const full = normalize(join(root, rel));
  if (!full.startsWith(root + sep)) return new Response('not found', { status: 404 });
  let data: Buffer;
  try {
    data = await readFile(full);
  } catch {
    return new Response('not found', { status: 404 });
  }
  const headers: Record<string, string> = { 'Content-Type': contentType(full), ...securityHeaders() };
  if (full.endsWith('index.html')) {
    const nonce = newNonce();
    headers['Content-Security-Policy'] = contentSecurityPolicy(nonce);
    return new Response(injectNonce(data.toString('utf8'), nonce), { headers });
  }
  return new Response(new Uint8Array(data), { headers });
}
