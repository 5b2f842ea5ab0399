/**
 * Reads the CLI's input file into a RatingMatrix through the shared parser
 * (src-shared/io), turning every failure into `FILE:LINE:COLUMN: reason` lines.
 */
import { readFileSync } from 'node:fs';
import { formatProblem, looksLong, parseDelimited, type DuplicatePolicy, type Problem } from '../../src-shared/io';
import type { RatingMatrix, RatingScale } from '../../src-shared/matrix/ratingMatrix';

export type ReadResult =
  | { ok: true; matrix: RatingMatrix; warnings: string[] }
  | { ok: false; messages: string[] };

function describeFsError(err: NodeJS.ErrnoException): string {
  switch (err.code) {
    case 'ENOENT':
      return 'no such file';
    case 'EISDIR':
      return 'is a directory, not a file';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    default:
      return `cannot read the file (${err.code ?? err.message})`;
  }
}

/** `scale`: the scale from --scale; a value outside it or between its steps is then a located problem. */
export function readMatrix(path: string, long: boolean, duplicates: DuplicatePolicy = 'refuse', scale?: RatingScale): ReadResult {
  let text: string;
  try {
    // Non-fatal decoding: invalid UTF-8 becomes U+FFFD, which the parser reports as binary content.
    text = new TextDecoder('utf-8', { fatal: false }).decode(readFileSync(path));
  } catch (err) {
    return { ok: false, messages: [`${path}:1:1: ${describeFsError(err as NodeJS.ErrnoException)}`] };
  }
  const parsed = parseDelimited(text, { fileName: path, layout: long ? 'long' : 'wide', duplicates, ...(scale ? { scale } : {}) });
  if (!parsed.ok) {
    const messages = parsed.problems.map((p: Problem) => formatProblem(p));
    if (!long && looksLong(text)) {
      messages.push(`rankfill: ${path} looks like row,column,value triples (three columns, repeated row labels); if it is, add --long`);
    }
    return { ok: false, messages };
  }
  return { ok: true, matrix: parsed.matrix, warnings: parsed.warnings.map((p: Problem) => formatProblem(p)) };
}
