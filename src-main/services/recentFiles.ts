/**
 * The recent-files list shown in the File menu, persisted as JSON
 * (default <config dir>/recent-files.json):
 *   { "format": "rankfill-recent", "version": 1, "files": [ { "path", "openedAt" } ] }
 * Newest first, no duplicates, at most `max` entries (default 10). A missing or
 * damaged list reads as empty (never an error for the user); writes are atomic.
 */
import { promises as fs } from 'node:fs';
import path from 'node:path';
import { atomicWrite } from './atomicWrite';
import { readBoundedFile } from './readTextFile';
import { defaultRecentFilesPath } from './configDir';

export interface RecentFile {
  path: string;
  /** ISO-8601 time it was last opened or saved. */
  openedAt: string;
}

const TAG = 'rankfill-recent';

export class RecentFiles {
  readonly file: string;
  private readonly max: number;

  constructor(opts: { file?: string; max?: number } = {}) {
    this.file = path.resolve(opts.file ?? defaultRecentFilesPath());
    this.max = opts.max ?? 10;
  }

  async list(): Promise<RecentFile[]> {
    try {
      const read = await readBoundedFile(this.file, 1024 * 1024);
      if (!read.ok) return [];
      const data = JSON.parse(read.bytes.toString('utf8')) as { format?: unknown; files?: unknown };
      if (data.format !== TAG || !Array.isArray(data.files)) return [];
      const out: RecentFile[] = [];
      for (const f of data.files as unknown[]) {
        const e = f as Partial<RecentFile> | null;
        if (e && typeof e.path === 'string' && e.path !== '' && typeof e.openedAt === 'string') {
          if (!out.some((o) => o.path === e.path)) out.push({ path: e.path, openedAt: e.openedAt });
        }
      }
      return out.slice(0, this.max);
    } catch {
      return [];
    }
  }

  /** Moves (or adds) a file to the top. */
  async add(filePath: string, now: Date = new Date()): Promise<RecentFile[]> {
    const abs = path.resolve(filePath);
    const files = [
      { path: abs, openedAt: now.toISOString() },
      ...(await this.list()).filter((f) => f.path !== abs),
    ].slice(0, this.max);
    await this.write(files);
    return files;
  }

  async remove(filePath: string): Promise<RecentFile[]> {
    const abs = path.resolve(filePath);
    const files = (await this.list()).filter((f) => f.path !== abs);
    await this.write(files);
    return files;
  }

  async clear(): Promise<void> {
    await this.write([]);
  }

  private async write(files: RecentFile[]): Promise<void> {
    await fs.mkdir(path.dirname(this.file), { recursive: true });
    await atomicWrite(this.file, JSON.stringify({ format: TAG, version: 1, files }, null, 2) + '\n', { backup: false });
  }
}
