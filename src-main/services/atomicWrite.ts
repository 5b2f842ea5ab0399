/**
 * Crash-safe file replacement.
 *
 * atomicWrite(target, data):
 *   1. write the data to a temporary file in the SAME folder as the target
 *      (`.NAME.<pid>.<random>.tmp`, so the final rename never crosses file systems);
 *   2. fsync the temporary file, so its bytes are on disk before it gets the real name;
 *   3. when `backup` is on (default) and the target exists, keep the current target as
 *      `NAME.bak` (a hard link made under a temporary name and renamed into place, or a
 *      copy where hard links are not supported) — so the previous version survives;
 *   4. rename the temporary file over the target (atomic on POSIX and NTFS: a reader sees
 *      either the old file or the new one, never a mix);
 *   5. fsync the folder so the rename itself is durable (skipped where the OS refuses).
 * If anything fails the temporary file is removed and the error is re-thrown; the
 * target is then unchanged.
 */
import { randomBytes } from 'node:crypto';
import { promises as fs } from 'node:fs';
import path from 'node:path';

export interface AtomicWriteOptions {
  /** Keep the previous version as NAME.bak (default true). */
  backup?: boolean;
  /** Flush file and folder to disk (default true; tests of logic alone may turn it off). */
  fsync?: boolean;
  /** File mode for a new file (default 0o644, minus umask). */
  mode?: number;
}

/** Name of the backup kept beside a target. */
export function backupPathFor(target: string): string {
  return target + '.bak';
}

function tempPathFor(target: string): string {
  const dir = path.dirname(target);
  const base = path.basename(target);
  return path.join(dir, `.${base}.${process.pid}.${randomBytes(6).toString('hex')}.tmp`);
}

async function fsyncDir(dir: string): Promise<void> {
  let handle: fs.FileHandle | undefined;
  try {
    handle = await fs.open(dir, 'r');
    await handle.sync();
  } catch {
    // Windows and some file systems do not allow opening or syncing a folder; the rename stands.
  } finally {
    await handle?.close().catch(() => undefined);
  }
}

async function exists(p: string): Promise<boolean> {
  try {
    await fs.lstat(p);
    return true;
  } catch {
    return false;
  }
}

async function keepBackup(target: string, doSync: boolean): Promise<void> {
  if (!(await exists(target))) return;
  const bak = backupPathFor(target);
  const tmpBak = tempPathFor(bak);
  try {
    await fs.link(target, tmpBak);
  } catch {
    await fs.copyFile(target, tmpBak);
    if (doSync) {
      const h = await fs.open(tmpBak, 'r+');
      try {
        await h.sync();
      } finally {
        await h.close();
      }
    }
  }
  try {
    await fs.rename(tmpBak, bak);
  } catch (err) {
    await fs.rm(tmpBak, { force: true }).catch(() => undefined);
    throw err;
  }
}

export async function atomicWrite(target: string, data: string | Uint8Array, opts: AtomicWriteOptions = {}): Promise<void> {
  const doSync = opts.fsync ?? true;
  const dir = path.dirname(path.resolve(target));
  const tmp = tempPathFor(target);
  let handle: fs.FileHandle | undefined;
  try {
    handle = await fs.open(tmp, 'wx', opts.mode ?? 0o644);
    await handle.writeFile(data);
    if (doSync) await handle.sync();
    await handle.close();
    handle = undefined;
    if (opts.backup ?? true) await keepBackup(target, doSync);
    await fs.rename(tmp, target);
  } catch (err) {
    await handle?.close().catch(() => undefined);
    await fs.rm(tmp, { force: true }).catch(() => undefined);
    throw err;
  }
  if (doSync) await fsyncDir(dir);
}

/**
 * Removes temporary files left beside `target` by writes that were interrupted
 * (a crash between steps 1 and 4), when older than `olderThanMs` (default 10 minutes).
 * Returns the number removed; never throws.
 */
export async function removeStaleTempFiles(target: string, olderThanMs = 10 * 60_000): Promise<number> {
  const dir = path.dirname(path.resolve(target));
  const prefixes = ['.' + path.basename(target) + '.', '.' + path.basename(backupPathFor(target)) + '.'];
  let removed = 0;
  try {
    const now = Date.now();
    for (const name of await fs.readdir(dir)) {
      if (!name.endsWith('.tmp') || !prefixes.some((p) => name.startsWith(p))) continue;
      const full = path.join(dir, name);
      try {
        const st = await fs.stat(full);
        if (now - st.mtimeMs >= olderThanMs) {
          await fs.rm(full, { force: true });
          removed++;
        }
      } catch {
        // Gone already, or not ours to remove.
      }
    }
  } catch {
    // Folder unreadable: nothing to clean.
  }
  return removed;
}
