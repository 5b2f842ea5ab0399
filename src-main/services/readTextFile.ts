/**
 * Reading a text file from disk with the size limit checked BEFORE reading, and
 * decoding: UTF-8 (BOM optional; invalid bytes become U+FFFD, which the parsers
 * report), or UTF-16 LE/BE when the file starts with a UTF-16 BOM.
 * Never throws: file-system errors come back as a Problem with a plain reason.
 */
import { promises as fs } from 'node:fs';
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

export async function readTextFile(filePath: string, maxBytes: number): Promise<ReadTextResult> {
  const file = path.basename(filePath);
  const problem = (message: string): ReadTextResult => ({ ok: false, problems: [{ file, line: 1, column: 1, message }] });
  try {
    const st = await fs.stat(filePath);
    if (st.isDirectory()) return problem('this is a folder, not a file');
    if (st.size > maxBytes) {
      return problem(`file is too large to open (${formatBytes(st.size)}; the limit is ${formatBytes(maxBytes)})`);
    }
    const buf = await fs.readFile(filePath);
    if (buf.length > maxBytes) {
      return problem(`file is too large to open (${formatBytes(buf.length)}; the limit is ${formatBytes(maxBytes)})`);
    }
    return { ok: true, text: decodeText(buf), bytes: buf.length };
  } catch (err) {
    return problem(`cannot read the file: ${describeFsError(err)}`);
  }
}
