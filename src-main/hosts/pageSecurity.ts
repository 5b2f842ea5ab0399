/**
 * What both hosts do to the renderer's page before handing it out: a fresh
 * style nonce per load, the strict Content-Security-Policy that goes with it,
 * and content types for the built files. Shared so that the Electron window and
 * the browser fallback enforce exactly the same policy.
 */
import { randomBytes } from 'node:crypto';
import { extname } from 'node:path';

/** Placeholder written into src-renderer/index.html, replaced per load. */
export const NONCE_PLACEHOLDER = '__RANKFILL_STYLE_NONCE__';

export function newNonce(): string {
  return randomBytes(18).toString('base64');
}

/**
 * No remote origins, no inline script, no eval. Styles: our own files plus the
 * grid's run-time <style> elements, admitted only by this load's nonce.
 */
export function contentSecurityPolicy(nonce: string): string {
  return [
    "default-src 'self'",
    "script-src 'self'",
    `style-src 'self' 'nonce-${nonce}'`,
    "img-src 'self' data:",
    "font-src 'self' data:",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'none'",
    "form-action 'none'",
    "frame-ancestors 'none'",
  ].join('; ');
}

export function injectNonce(indexHtml: string, nonce: string): string {
  return indexHtml.split(NONCE_PLACEHOLDER).join(nonce);
}

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.woff2': 'font/woff2',
  '.map': 'application/json; charset=utf-8',
};

export function contentType(path: string): string {
  return TYPES[extname(path).toLowerCase()] ?? 'application/octet-stream';
}

/** Headers every served file carries. */
export function securityHeaders(): Record<string, string> {
  return {
    'X-Content-Type-Options': 'nosniff',
    'Referrer-Policy': 'no-referrer',
    'Cross-Origin-Opener-Policy': 'same-origin',
    'Cross-Origin-Resource-Policy': 'same-origin',
  };
}
