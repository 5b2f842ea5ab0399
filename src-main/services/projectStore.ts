/**
 * Opening and saving project files, and importing delimited text files, from disk.
 * Host-agnostic async functions (the Electron and browser hosts and the CLI call them).
 * None of them throws: failures come back as problems ("FILE:LINE:COLUMN: reason").
 *
 * Saving goes through atomicWrite (temporary file + fsync + rename, previous version
 * kept as NAME.bak). Reading checks the size limit before reading.
 */
import path from 'node:path';
import { existsSync } from 'node:fs';
import type { Problem } from '../../src-shared/io/problem';
import {
  DEFAULT_MAX_BYTES,
  parseDelimited,
  type ParseOptions,
  type ParseResult,
} from '../../src-shared/io/parseDelimited';
import type { ProjectDocument } from '../../src-shared/project/projectDocument';
import { parseProject, serializeProject } from '../../src-shared/project/projectFile';
import { PROJECT_FILE_EXTENSION } from '../../src-shared/project/projectSchema';
import { atomicWrite } from './atomicWrite';
import { describeFsError, readTextFile } from './readTextFile';

/** Largest project file opened: 200 MB. */
export const MAX_PROJECT_BYTES = 200 * 1024 * 1024;

export type OpenProjectResult =
  { ok: true; project: ProjectDocument; path: string } | { ok: false; problems: Problem[] };
export type SaveProjectResult =
  { ok: true; path: string; bytes: number; backupKept: boolean } | { ok: false; problems: Problem[] };

export interface SaveOptions {
  /** Keep the previous version as NAME.bak (default true). */
  backup?: boolean;
  /** Set modifiedAt to this time (default now); pass null to keep the document's own. */
  now?: Date | null;
  /** Flush to disk (default true). */
  fsync?: boolean;
}

/** Adds the project extension when a path has none. */
export function withProjectExtension(filePath: string): string {
  return path.extname(filePath) === '' ? filePath + PROJECT_FILE_EXTENSION : filePath;
}

export async function openProjectFile(filePath: string, maxBytes = MAX_PROJECT_BYTES): Promise<OpenProjectResult> {
  const abs = path.resolve(filePath);
  const read = await readTextFile(abs, maxBytes, { strictUtf8: true });
  if (!read.ok) return read;
  const parsed = parseProject(read.text, path.basename(abs));
  if (!parsed.ok) return parsed;
  return { ok: true, project: parsed.project, path: abs };
}

/**
 * Saves a document atomically. The returned document time is written into the file;
 * the caller's object is not modified.
 */
export async function saveProjectFile(
  filePath: string,
  doc: ProjectDocument,
  opts: SaveOptions = {},
): Promise<SaveProjectResult> {
  const abs = path.resolve(filePath);
  const stamped: ProjectDocument =
    opts.now === null ? doc : { ...doc, modifiedAt: (opts.now ?? new Date()).toISOString() };
  let text: string;
  try {
    text = serializeProject(stamped);
  } catch (err) {
    return {
      ok: false,
      problems: [
        {
          file: path.basename(abs),
          line: 1,
          column: 1,
          message: `cannot prepare the project for saving: ${describeFsError(err)}`,
        },
      ],
    };
  }
  const bytes = Buffer.byteLength(text, 'utf8');
  try {
    await atomicWrite(abs, text, { backup: opts.backup ?? true, fsync: opts.fsync ?? true });
  } catch (err) {
    const code = (err as { code?: string } | null)?.code;
    const folder = path.dirname(abs);
    const message =
      code === 'ENOENT' && !existsSync(folder)
        ? `cannot save: the folder ${folder} does not exist; create it first or choose another folder (nothing was written)`
        : `cannot save: ${describeFsError(err)}; the file on disk is unchanged`;
    return { ok: false, problems: [{ file: path.basename(abs), line: 1, column: 1, message }] };
  }
  return { ok: true, path: abs, bytes, backupKept: opts.backup ?? true };
}

/** Imports a CSV/TSV/semicolon file; the size limit (default 50 MB) is checked before reading. */
export async function importDelimitedFile(
  filePath: string,
  opts: Omit<ParseOptions, 'fileName'> = {},
): Promise<ParseResult> {
  const abs = path.resolve(filePath);
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  const read = await readTextFile(abs, maxBytes);
  if (!read.ok) return read;
  return parseDelimited(read.text, { ...opts, fileName: path.basename(abs), maxBytes });
}
