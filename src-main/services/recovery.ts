/**
 * Recovery snapshots: copies of unsaved work written while the user edits, so a
 * crash loses at most the last few seconds. One file per open document,
 * `<id>.rankfill-recovery` in the recovery folder (default: <config dir>/recovery),
 * always written with atomicWrite (no .bak). The file is JSON:
 *   { "format": "rankfill-recovery", "version": 1,
 *     "meta": { "id", "title", "sourcePath": string|null, "savedAt": ISO time },
 *     "project": <a complete project file object, see src-shared/project/projectSchema.ts> }
 * The project inside is validated exactly like an opened project file when restored.
 * After a normal save or close, the host discards the snapshot; whatever remains at the
 * next start is offered for restore (list → restore or discard).
 */
import { promises as fs } from 'node:fs';
import path from 'node:path';
import type { Problem } from '../../src-shared/io/problem';
import type { ProjectDocument } from '../../src-shared/project/projectDocument';
import { parseProject, serializeProject } from '../../src-shared/project/projectFile';
import { atomicWrite, removeLeftoverTemps } from './atomicWrite';
import { defaultRecoveryDir } from './configDir';
import { describeFsError, readBoundedFile } from './readTextFile';

/** Largest recovery file read: a project at its own limit (200 MB) plus the snapshot's header. */
const MAX_RECOVERY_BYTES = 201 * 1024 * 1024;

async function readRecoveryText(file: string): Promise<string> {
  const read = await readBoundedFile(file, MAX_RECOVERY_BYTES);
  if (!read.ok) throw new Error(read.reason);
  return read.bytes.toString('utf8');
}

const RECOVERY_FORMAT_TAG = 'rankfill-recovery';
const RECOVERY_EXTENSION = '.rankfill-recovery';

interface RecoveryMeta {
  id: string;
  title: string;
  /** The project file the work belongs to; null for a never-saved document. */
  sourcePath: string | null;
  /** ISO-8601 time of the snapshot. */
  savedAt: string;
}

export interface RecoveryEntry extends RecoveryMeta {
  /** Path of the recovery file. */
  file: string;
  bytes: number;
}

export type RestoreResult =
  { ok: true; project: ProjectDocument; meta: RecoveryMeta } | { ok: false; problems: Problem[] };

const SAFE_ID = /^[A-Za-z0-9_-]{1,100}$/;

export class RecoveryStore {
  readonly dir: string;

  constructor(opts: { dir?: string; fsync?: boolean } = {}) {
    this.dir = path.resolve(opts.dir ?? defaultRecoveryDir());
    this.fsync = opts.fsync ?? true;
  }

  private readonly fsync: boolean;

  /** Path of the snapshot for a document id (letters, digits, _ and - only). */
  fileFor(id: string): string {
    if (!SAFE_ID.test(id)) throw new Error(`invalid recovery id ${JSON.stringify(id)}`);
    return path.join(this.dir, id + RECOVERY_EXTENSION);
  }

  /** Writes (replaces) the snapshot for this document. Throws on disk errors (callers log them). */
  async writeSnapshot(
    id: string,
    doc: ProjectDocument,
    meta: { title?: string; sourcePath?: string | null; now?: Date } = {},
  ): Promise<RecoveryEntry> {
    const file = this.fileFor(id);
    await fs.mkdir(this.dir, { recursive: true });
    const m: RecoveryMeta = {
      id,
      title: meta.title ?? (meta.sourcePath ? path.basename(meta.sourcePath) : 'Untitled'),
      sourcePath: meta.sourcePath ?? null,
      savedAt: (meta.now ?? new Date()).toISOString(),
    };
    const text = `{"format":${JSON.stringify(RECOVERY_FORMAT_TAG)},"version":1,"meta":${JSON.stringify(m)},\n"project":${serializeProject(doc)}}\n`;
    await atomicWrite(file, text, { backup: false, fsync: this.fsync });
    return { ...m, file, bytes: Buffer.byteLength(text, 'utf8') };
  }

  /** Snapshots present, newest first. Unreadable or foreign files are skipped. */
  async list(): Promise<RecoveryEntry[]> {
    let names: string[];
    try {
      await removeLeftoverTemps(this.dir);
      names = await fs.readdir(this.dir);
    } catch {
      return [];
    }
    const out: RecoveryEntry[] = [];
    for (const name of names) {
      if (!name.endsWith(RECOVERY_EXTENSION)) continue;
      const id = name.slice(0, -RECOVERY_EXTENSION.length);
      if (!SAFE_ID.test(id)) continue;
      const file = path.join(this.dir, name);
      try {
        const text = await readRecoveryText(file);
        const meta = readMeta(text);
        if (meta) out.push({ ...meta, id, file, bytes: Buffer.byteLength(text, 'utf8') });
      } catch {
        // Skip files we cannot read.
      }
    }
    out.sort((a, b) => (a.savedAt < b.savedAt ? 1 : a.savedAt > b.savedAt ? -1 : 0));
    return out;
  }

  /** Reads and validates a snapshot; never returns a partly loaded project. */
  async restore(id: string): Promise<RestoreResult> {
    let file: string;
    try {
      file = this.fileFor(id);
    } catch (err) {
      return { ok: false, problems: [{ file: id, line: 1, column: 1, message: describeFsError(err) }] };
    }
    const name = path.basename(file);
    let text: string;
    try {
      text = await readRecoveryText(file);
    } catch (err) {
      return {
        ok: false,
        problems: [
          {
            file: name,
            line: 1,
            column: 1,
            message: `cannot read the recovery file: ${err instanceof Error ? err.message : String(err)}`,
          },
        ],
      };
    }
    let data: { format?: unknown; meta?: unknown; project?: unknown };
    try {
      data = JSON.parse(text);
    } catch {
      return {
        ok: false,
        problems: [{ file: name, line: 1, column: 1, message: 'the recovery file is damaged (not valid JSON)' }],
      };
    }
    const meta = readMeta(text, data);
    if (!meta) {
      return { ok: false, problems: [{ file: name, line: 1, column: 1, message: 'not a Rankfill recovery file' }] };
    }
    const parsed = parseProject(JSON.stringify(data.project), name);
    if (!parsed.ok) return parsed;
    return { ok: true, project: parsed.project, meta: { ...meta, id } };
  }

  /** Removes a snapshot (after a save, a close, or the user's choice). Missing is fine. */
  async discard(id: string): Promise<void> {
    await fs.rm(this.fileFor(id), { force: true });
  }
}

function readMeta(text: string, parsed?: unknown): RecoveryMeta | undefined {
  try {
    const data = (parsed ?? JSON.parse(text)) as { format?: unknown; meta?: Partial<RecoveryMeta> };
    if (data.format !== RECOVERY_FORMAT_TAG || typeof data.meta !== 'object' || data.meta === null) return undefined;
    const m = data.meta;
    if (typeof m.id !== 'string' || typeof m.savedAt !== 'string') return undefined;
    return {
      id: m.id,
      title: typeof m.title === 'string' ? m.title : 'Untitled',
      sourcePath: typeof m.sourcePath === 'string' ? m.sourcePath : null,
      savedAt: m.savedAt,
    };
  } catch {
    return undefined;
  }
}
