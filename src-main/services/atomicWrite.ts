/**
 * Crash-safe file replacement — the one writer every part of Rankfill uses (window
 * saves, recovery snapshots, the recent list, exports, the command line's output).
 *
 * atomicWrite(target, data) / atomicWriteSync(target, data):
 *   0. resolve the target: when it is a symbolic link, the file it points to is the one
 *      replaced (the link stays a link); a link to nothing, a folder, a FIFO or a device
 *      is refused with a plain reason;
 *   1. create a temporary file in the SAME folder as the real target, named
 *      `.NAME.<pid>.<12 random hex digits>.tmp`, with O_CREAT|O_EXCL|O_NOFOLLOW: it must
 *      not exist yet and is never a link someone planted (so no other file is written);
 *   2. write the data and fsync the temporary file;
 *   3. when `backup` is on (default) and the target exists, keep the current target as NAME.bak
 *      (a hard link made under a temporary name and renamed into place, or a copy);
 *   4. rename the temporary file over the target (atomic on POSIX and NTFS: a reader
 *      sees the old file or the new one, never a mix);
 *   5. fsync the folder so the rename itself is durable (skipped where the OS refuses).
 * If anything fails the temporary file is removed and the error is re-thrown; the
 * target is then unchanged.
 *
 * removeLeftoverTemps(folder) removes temporary files of earlier writes that were
 * interrupted (the writer was killed between steps 1 and 4): ours by name, and either
 * written by a process that no longer runs or older than a day. Hosts call it at start
 * for their own folders, and every write calls it for the target's folder.
 */
import { randomBytes } from 'node:crypto';
// Through the module objects (not named imports), so tests can watch the calls.
import fsSync, { constants } from 'node:fs';
import path from 'node:path';

const fs = {
  lstat: (p: string) => fsSync.promises.lstat(p),
  realpath: (p: string) => fsSync.promises.realpath(p),
  stat: (p: string) => fsSync.promises.stat(p),
  open: (p: string, flags: string | number, mode?: number) => fsSync.promises.open(p, flags, mode),
  link: (a: string, b: string) => fsSync.promises.link(a, b),
  copyFile: (a: string, b: string, mode: number) => fsSync.promises.copyFile(a, b, mode),
  rename: (a: string, b: string) => fsSync.promises.rename(a, b),
  rm: (p: string, o: { force: boolean }) => fsSync.promises.rm(p, o),
  readdir: (p: string) => fsSync.promises.readdir(p),
};
type FileHandle = fsSync.promises.FileHandle;

export interface AtomicWriteOptions {
  /** Keep the previous version as NAME.bak (default true). */
  backup?: boolean;
  /** Flush file and folder to disk (default true; tests of logic alone may turn it off). */
  fsync?: boolean;
  /** File mode for a new file (default 0o644, minus umask). */
  mode?: number;
}

/** An error with a Node-style `code`, so describeFsError gives its plain reason. */
function codedError(code: string, message: string): NodeJS.ErrnoException {
  const err = new Error(message) as NodeJS.ErrnoException;
  err.code = code;
  return err;
}

/** Name of the backup kept beside a target. */
export function backupPathFor(target: string): string {
  return target + '.bak';
}

const TEMP_NAME = /^\.(.+)\.(\d+)\.([0-9a-f]{12})\.tmp$/;

/** Whether a folder entry is a temporary file of this module (by name). */
export function isTempName(name: string): boolean {
  return TEMP_NAME.test(name);
}

function tempPathFor(realTarget: string): string {
  const dir = path.dirname(realTarget);
  const base = path.basename(realTarget);
  return path.join(dir, `.${base}.${process.pid}.${randomBytes(6).toString('hex')}.tmp`);
}

/** Flags of the temporary file: new, exclusive, never through a link. */
const TEMP_FLAGS = constants.O_WRONLY | constants.O_CREAT | constants.O_EXCL | (constants.O_NOFOLLOW ?? 0);

function refuseKind(st: fsSync.Stats, shown: string): void {
  if (st.isDirectory()) throw codedError('EISDIR', `${shown} is a folder, not a file`);
  if (!st.isFile()) throw codedError('ENOTREG', `${shown} is not a regular file (a device, pipe or socket)`);
}

/** The path actually replaced: the target itself, or the file a link at the target points to. */
async function resolveWriteTarget(target: string): Promise<string> {
  const abs = path.resolve(target);
  let st: fsSync.Stats;
  try {
    st = await fs.lstat(abs);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return abs;
    throw err;
  }
  if (!st.isSymbolicLink()) {
    refuseKind(st, abs);
    return abs;
  }
  let real: string;
  try {
    real = await fs.realpath(abs);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT')
      throw codedError('EDANGLING', `${abs} is a link to a file that does not exist`);
    throw err;
  }
  refuseKind(await fs.stat(real), real);
  return real;
}

function resolveWriteTargetSync(target: string): string {
  const abs = path.resolve(target);
  let st: fsSync.Stats;
  try {
    st = fsSync.lstatSync(abs);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return abs;
    throw err;
  }
  if (!st.isSymbolicLink()) {
    refuseKind(st, abs);
    return abs;
  }
  let real: string;
  try {
    real = fsSync.realpathSync(abs);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT')
      throw codedError('EDANGLING', `${abs} is a link to a file that does not exist`);
    throw err;
  }
  refuseKind(fsSync.statSync(real), real);
  return real;
}

async function fsyncDir(dir: string): Promise<void> {
  let handle: FileHandle | undefined;
  try {
    handle = await fs.open(dir, 'r');
    await handle.sync();
  } catch {
    // Windows and some file systems do not allow opening or syncing a folder; the rename stands.
  } finally {
    await handle?.close().catch(() => undefined);
  }
}

function fsyncDirSync(dir: string): void {
  let fd: number | undefined;
  try {
    fd = fsSync.openSync(dir, 'r');
    fsSync.fsyncSync(fd);
  } catch {
    // As above.
  } finally {
    if (fd !== undefined) fsSync.closeSync(fd);
  }
}

async function keepBackup(realTarget: string, doSync: boolean): Promise<void> {
  try {
    await fs.lstat(realTarget);
  } catch {
    return; // nothing to keep
  }
  const bak = backupPathFor(realTarget);
  const tmpBak = tempPathFor(bak);
  try {
    await fs.link(realTarget, tmpBak);
  } catch {
    await fs.copyFile(realTarget, tmpBak, constants.COPYFILE_EXCL);
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

export async function atomicWrite(
  target: string,
  data: string | Uint8Array,
  opts: AtomicWriteOptions = {},
): Promise<void> {
  const doSync = opts.fsync ?? true;
  const real = await resolveWriteTarget(target);
  const dir = path.dirname(real);
  await removeLeftoverTemps(dir);
  const tmp = tempPathFor(real);
  let handle: FileHandle | undefined;
  try {
    handle = await fs.open(tmp, TEMP_FLAGS, opts.mode ?? 0o644);
    await handle.writeFile(data);
    if (doSync) await handle.sync();
    await handle.close();
    handle = undefined;
    if (opts.backup ?? true) await keepBackup(real, doSync);
    await fs.rename(tmp, real);
  } catch (err) {
    await handle?.close().catch(() => undefined);
    await fs.rm(tmp, { force: true }).catch(() => undefined);
    throw err;
  }
  if (doSync) await fsyncDir(dir);
}

/** The same steps, synchronously (the command line writes its one output this way). No backup. */
export function atomicWriteSync(
  target: string,
  data: string | Uint8Array,
  opts: Omit<AtomicWriteOptions, 'backup'> = {},
): void {
  const doSync = opts.fsync ?? true;
  const real = resolveWriteTargetSync(target);
  const dir = path.dirname(real);
  removeLeftoverTempsSync(dir);
  const tmp = tempPathFor(real);
  let fd: number | undefined;
  try {
    fd = fsSync.openSync(tmp, TEMP_FLAGS, opts.mode ?? 0o644);
    fsSync.writeFileSync(fd, data);
    if (doSync) fsSync.fsyncSync(fd);
    fsSync.closeSync(fd);
    fd = undefined;
    fsSync.renameSync(tmp, real);
  } catch (err) {
    if (fd !== undefined) {
      try {
        fsSync.closeSync(fd);
      } catch {
        // already closed
      }
    }
    fsSync.rmSync(tmp, { force: true });
    throw err;
  }
  if (doSync) fsyncDirSync(dir);
}

/** Whether process `pid` is running (EPERM: it runs under another user). */
function processRuns(pid: number): boolean {
  if (pid === process.pid) return true;
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

export interface LeftoverOptions {
  /** Remove temps of running processes too when older than this (default one day). */
  olderThanMs?: number;
  /** Only temps of this target's name (default: every temp of this module in the folder). */
  forName?: string;
}

function isLeftover(name: string, st: fsSync.Stats, now: number, opts: LeftoverOptions): boolean {
  const m = TEMP_NAME.exec(name);
  if (!m || !st.isFile()) return false;
  if (opts.forName !== undefined && m[1] !== opts.forName && m[1] !== opts.forName + '.bak') return false;
  const pid = Number(m[2]);
  if (pid === process.pid) return false; // one of this process's own writes in flight
  return !processRuns(pid) || now - st.mtimeMs >= (opts.olderThanMs ?? 24 * 3600_000);
}

/** Removes leftover temporary files in `dir` (see the top of this file). Returns how many; never throws. */
export async function removeLeftoverTemps(dir: string, opts: LeftoverOptions = {}): Promise<number> {
  let removed = 0;
  let names: string[];
  try {
    names = await fs.readdir(dir);
  } catch {
    return 0; // folder missing or unreadable: nothing to clean
  }
  const now = Date.now();
  for (const name of names) {
    if (!TEMP_NAME.test(name)) continue;
    const full = path.join(dir, name);
    try {
      if (isLeftover(name, await fs.lstat(full), now, opts)) {
        await fs.rm(full, { force: true });
        removed++;
      }
    } catch {
      // Gone already, or not ours to remove.
    }
  }
  return removed;
}

function removeLeftoverTempsSync(dir: string, opts: LeftoverOptions = {}): number {
  let removed = 0;
  let names: string[];
  try {
    names = fsSync.readdirSync(dir);
  } catch {
    return 0;
  }
  const now = Date.now();
  for (const name of names) {
    if (!TEMP_NAME.test(name)) continue;
    const full = path.join(dir, name);
    try {
      if (isLeftover(name, fsSync.lstatSync(full), now, opts)) {
        fsSync.rmSync(full, { force: true });
        removed++;
      }
    } catch {
      // As above.
    }
  }
  return removed;
}
