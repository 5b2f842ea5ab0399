/**
 * Reading a text file from disk with the size limit checked BEFORE reading, and
 * decoding: UTF-8 (BOM optional; invalid bytes become U+FFFD, which the parsers
 * report), or UTF-16 LE/BE when the file starts with a UTF-16 BOM.
 * Never throws: file-system errors come back as a Problem with a plain reason.
 */
import { closeSync, constants, fstatSync, openSync, promises as fs, readSync, statSync, type Stats } from 'node:fs';
import path from 'node:path';
import type { Problem } from '../../src-shared/io/problem';

export type ReadTextResult = { ok: true; text: string; bytes: number } | { ok: false; problems: Problem[] };

function formatBytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB`;
  if (n >= 1024) return `${(n / 1024).toFixed(1).replace(/\.0$/, '')} KB`;
  return `${n} bytes`;
}

/** A plain reason for a file-system error code. */
export function describeFsError(err: unknown): string {
  const code = (err as { code?: string } | null)?.code;
  switch (code) {
    case 'ENOENT':
      return 'file not found';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    case 'EISDIR':
      return 'this is a folder, not a file';
    case 'ENOSPC':
      return 'the disk is full';
    case 'EROFS':
      return 'the disk is read-only';
    case 'EMFILE':
    case 'ENFILE':
      return 'too many open files';
    case 'ENAMETOOLONG':
      return 'the file name is too long';
    case 'ENOTREG':
      return 'this is not a regular file (a device, pipe or socket)';
    case 'EDANGLING':
      return 'this is a link to a file that does not exist';
    case 'ENOTDIR':
      return 'a part of the path is not a folder';
    default:
      return err instanceof Error ? err.message : String(err);
  }
}

export function decodeText(buf: Uint8Array): string {
  if (buf.length >= 2 && buf[0] === 0xff && buf[1] === 0xfe) return new TextDecoder('utf-16le').decode(buf.subarray(2));
  if (buf.length >= 2 && buf[0] === 0xfe && buf[1] === 0xff) {
    // Swap to little-endian and decode.
    const n = (buf.length - 2) & ~1;
    const le = new Uint8Array(n);
    for (let i = 0; i < n; i += 2) {
      le[i] = buf[i + 3];
      le[i + 1] = buf[i + 2];
    }
    return new TextDecoder('utf-16le').decode(le);
  }
  // ignoreBOM: keep a UTF-8 BOM in the text so parsers can report that they saw one.
  return new TextDecoder('utf-8', { fatal: false, ignoreBOM: true }).decode(buf);
}

/** Why a path cannot be read as a file, from its kind (null: a regular file). */
function refusedKind(st: Stats): string | null {
  if (st.isFile()) return null;
  if (st.isDirectory()) return 'this is a folder, not a file';
  if (st.isFIFO()) return 'this is a pipe (FIFO), not a file; only regular files are opened';
  if (st.isCharacterDevice() || st.isBlockDevice())
    return 'this is a device, not a file; only regular files are opened';
  return 'this is not a regular file; only regular files are opened';
}

function tooLarge(n: number, maxBytes: number, atLeast = false): string {
  return `file is too large to open (${atLeast ? 'more than ' : ''}${formatBytes(n)}; the limit is ${formatBytes(maxBytes)})`;
}

export type ReadBytesResult = { ok: true; bytes: Buffer } | { ok: false; reason: string };

/**
 * Reads a whole file with a byte cap. Only regular files: the kind is checked before
 * opening (so a device is never opened), the file is opened without blocking (a FIFO
 * cannot hang the caller), checked again with fstat on the opened handle (no swap
 * between the check and the read), and the cap holds WHILE reading (a file that grows,
 * or one whose size the system reports as 0, is cut off at the limit and refused).
 */
export async function readBoundedFile(filePath: string, maxBytes: number): Promise<ReadBytesResult> {
  let handle: fs.FileHandle | undefined;
  try {
    const before = refusedKind(await fs.stat(filePath));
    if (before) return { ok: false, reason: before };
    handle = await fs.open(filePath, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0));
    const st = await handle.stat();
    const kind = refusedKind(st);
    if (kind) return { ok: false, reason: kind };
    if (st.size > maxBytes) return { ok: false, reason: tooLarge(st.size, maxBytes) };
    const chunks: Buffer[] = [];
    let total = 0;
    for (;;) {
      const chunk = Buffer.allocUnsafe(
        Math.min(Math.max(st.size - total, 64 * 1024), 16 * 1024 * 1024, maxBytes - total + 1),
      );
      const { bytesRead } = await handle.read(chunk, 0, chunk.length, null);
      if (bytesRead === 0) break;
      total += bytesRead;
      if (total > maxBytes) return { ok: false, reason: tooLarge(maxBytes, maxBytes, true) };
      chunks.push(bytesRead === chunk.length ? chunk : chunk.subarray(0, bytesRead));
    }
    return { ok: true, bytes: chunks.length === 1 ? chunks[0] : Buffer.concat(chunks, total) };
  } catch (err) {
    return { ok: false, reason: `cannot read the file: ${describeFsError(err)}` };
  } finally {
    await handle?.close().catch(() => undefined);
  }
}

function readLoopSync(fd: number, maxBytes: number, sizeHint: number): ReadBytesResult {
  const chunks: Buffer[] = [];
  let total = 0;
  for (;;) {
    const chunk = Buffer.allocUnsafe(
      Math.min(Math.max(sizeHint - total, 64 * 1024), 16 * 1024 * 1024, maxBytes - total + 1),
    );
    let bytesRead: number;
    try {
      bytesRead = readSync(fd, chunk, 0, chunk.length, null);
    } catch (err) {
      // A non-blocking pipe with nothing in it yet: wait a little and read again.
      if ((err as NodeJS.ErrnoException).code === 'EAGAIN') {
        Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 5);
        continue;
      }
      throw err;
    }
    if (bytesRead === 0) break;
    total += bytesRead;
    if (total > maxBytes) return { ok: false, reason: tooLarge(maxBytes, maxBytes, true) };
    chunks.push(bytesRead === chunk.length ? chunk : chunk.subarray(0, bytesRead));
  }
  return { ok: true, bytes: Buffer.concat(chunks, total) };
}

/** readBoundedFile, synchronously, for the command line. `-` reads standard input with the same cap. */
export function readBoundedFileSync(filePath: string, maxBytes: number): ReadBytesResult {
  if (filePath === '-') {
    try {
      return readLoopSync(0, maxBytes, 0);
    } catch (err) {
      return { ok: false, reason: `cannot read standard input: ${describeFsError(err)}` };
    }
  }
  let fd: number | undefined;
  try {
    const before = refusedKind(statSync(filePath));
    if (before) return { ok: false, reason: before };
    fd = openSync(filePath, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0));
    const st = fstatSync(fd);
    const kind = refusedKind(st);
    if (kind) return { ok: false, reason: kind };
    if (st.size > maxBytes) return { ok: false, reason: tooLarge(st.size, maxBytes) };
    return readLoopSync(fd, maxBytes, st.size);
  } catch (err) {
    return { ok: false, reason: `cannot read the file: ${describeFsError(err)}` };
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}

/**
 * Where the first byte that is not valid UTF-8 sits, as line and column (characters of
 * that line before it, plus one); null when the bytes are valid UTF-8.
 */
function locateInvalidUtf8(buf: Uint8Array): { byte: number; line: number; column: number } | null {
  try {
    new TextDecoder('utf-8', { fatal: true }).decode(buf);
    return null;
  } catch {
    // Find it: decode ever longer prefixes would be quadratic, so walk the byte patterns
    // (Unicode standard, table 3-7: well-formed UTF-8 byte sequences).
  }
  let k = 0;
  const n = buf.length;
  while (k < n) {
    const b = buf[k];
    let len = 0;
    let lo = 0x80;
    let hi = 0xbf;
    if (b < 0x80) len = 1;
    else if (b >= 0xc2 && b <= 0xdf) len = 2;
    else if (b === 0xe0) [len, lo] = [3, 0xa0];
    else if ((b >= 0xe1 && b <= 0xec) || b === 0xee || b === 0xef) len = 3;
    else if (b === 0xed) [len, hi] = [3, 0x9f];
    else if (b === 0xf0) [len, lo] = [4, 0x90];
    else if (b >= 0xf1 && b <= 0xf3) len = 4;
    else if (b === 0xf4) [len, hi] = [4, 0x8f];
    let ok = len > 0 && k + len <= n;
    for (let t = 1; ok && t < len; t++) {
      const c = buf[k + t];
      ok = t === 1 ? c >= lo && c <= hi : c >= 0x80 && c <= 0xbf;
    }
    if (!ok) break;
    k += len;
  }
  if (k >= n) return null;
  let lineStart = 0;
  let line = 1;
  for (let t = 0; t < k; t++) {
    if (buf[t] === 0x0a) {
      line++;
      lineStart = t + 1;
    }
  }
  const column = new TextDecoder('utf-8').decode(buf.subarray(lineStart, k)).length + 1;
  return { byte: k, line, column };
}

export interface ReadTextOptions {
  /** Refuse bytes that are not valid UTF-8 (with their place) instead of decoding them as U+FFFD. */
  strictUtf8?: boolean;
}

export async function readTextFile(
  filePath: string,
  maxBytes: number,
  opts: ReadTextOptions = {},
): Promise<ReadTextResult> {
  const file = path.basename(filePath);
  const read = await readBoundedFile(filePath, maxBytes);
  if (!read.ok) return { ok: false, problems: [{ file, line: 1, column: 1, message: read.reason }] };
  const b = read.bytes;
  const utf16 = b.length >= 2 && ((b[0] === 0xff && b[1] === 0xfe) || (b[0] === 0xfe && b[1] === 0xff));
  if (opts.strictUtf8 && !utf16) {
    const bad = locateInvalidUtf8(b);
    if (bad) {
      return {
        ok: false,
        problems: [
          {
            file,
            line: bad.line,
            column: bad.column,
            message: `byte ${bad.byte + 1} is not valid UTF-8 text; the file may be damaged or saved in another encoding`,
          },
        ],
      };
    }
  }
  return { ok: true, text: decodeText(b), bytes: b.length };
}
