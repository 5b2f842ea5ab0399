/**
 * Writing exports chosen in the page: the text (built in the page by the shared
 * writers) goes to disk atomically, with its settings sidecar beside it as
 * NAME.settings.json. An existing file is never replaced unless the user said so.
 */
import { existsSync, statSync } from 'node:fs';
import { mkdir } from 'node:fs/promises';
import { homedir } from 'node:os';
import { basename, dirname, extname, isAbsolute, join } from 'node:path';
import type { ApiReply, ApiRequest } from '../../src-shared/api';
import { atomicWrite } from './atomicWrite';
import { maskPathFor, sidecarPathFor } from './exportPaths';
import { UserFacingError } from './apiRouter';
import { describeFsError } from './readTextFile';

function isFolder(p: string): boolean {
  try {
    return statSync(p).isDirectory();
  } catch {
    return false;
  }
}

export { sidecarPathFor } from './exportPaths';

export function defaultExportDir(env: NodeJS.ProcessEnv = process.env): string {
  return env.RANKFILL_EXPORT_DIR ?? join(homedir(), 'Rankfill exports');
}

/** A path in the export folder that does not exist yet: name.csv, name-2.csv, … */
export function suggestExportPath(fileName: string, dir = defaultExportDir()): string {
  const safe =
    fileName
      .replace(/[\\/:*?"<>|]/g, '_')
      .replace(/\p{Cc}/gu, '_')
      .slice(0, 200) || 'export.csv';
  const ext = extname(safe) || '.csv';
  const stem = basename(safe, extname(safe));
  for (let n = 1; n < 10_000; n++) {
    const candidate = join(dir, n === 1 ? `${stem}${ext}` : `${stem}-${n}${ext}`);
    if (!existsSync(candidate) && !existsSync(sidecarPathFor(candidate))) return candidate;
  }
  return join(dir, `${stem}-${Date.now()}${ext}`);
}

export async function writeExport(req: ApiRequest<'export.write'>): Promise<ApiReply<'export.write'>> {
  const { path } = req;
  if (!isAbsolute(path) || path.endsWith('/') || path.includes('\u0000')) {
    return { ok: false, reason: 'invalid-path', message: `“${path}” is not a full file path` };
  }
  if (isFolder(path))
    return { ok: false, reason: 'invalid-path', message: `${path} is a folder, not a file: add a file name` };
  const sidecarPath = req.sidecar === undefined ? null : sidecarPathFor(path);
  const maskPath = req.mask === undefined ? null : maskPathFor(path);
  if (!req.overwrite) {
    const existing = [path, sidecarPath, maskPath].find((p) => p !== null && existsSync(p));
    if (existing) return { ok: false, reason: 'exists', message: `${existing} already exists` };
  }
  // Failures come back as one plain sentence naming the file (never a temp file's path or a raw code).
  let writing = dirname(path);
  try {
    await mkdir(writing, { recursive: true });
    writing = path;
    await atomicWrite(path, req.text, { backup: false });
    if (sidecarPath !== null && req.sidecar !== undefined) {
      writing = sidecarPath;
      await atomicWrite(sidecarPath, req.sidecar, { backup: false });
    }
    if (maskPath !== null && req.mask !== undefined) {
      writing = maskPath;
      await atomicWrite(maskPath, req.mask, { backup: false });
    }
  } catch (err) {
    throw new UserFacingError(`Cannot write ${writing}: ${describeFsError(err)}.`);
  }
  return { ok: true, path, sidecarPath, maskPath, bytes: Buffer.byteLength(req.text) };
}
