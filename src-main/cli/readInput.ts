/**
 * Reads the CLI's input file into a RatingMatrix through the shared parser
 * (src-shared/io), turning every failure into `FILE:LINE:COLUMN: reason` lines.
 */
import { DEFAULT_MAX_BYTES, formatProblem, looksLong, parseDelimited, type DuplicatePolicy, type Problem } from '../../src-shared/io';
import type { RatingMatrix, RatingScale } from '../../src-shared/matrix/ratingMatrix';
import { decodeText, readBoundedFileSync } from '../services/readTextFile';

export type ReadResult =
  | { ok: true; matrix: RatingMatrix; warnings: string[] }
  | { ok: false; messages: string[] };

/**
 * `path` is a file, or `-` for standard input (a pipe); either way at most 50 MB (the
 * window's import limit) are read, and only regular files are opened.
 * `scale`: the scale from --scale; a value outside it or between its steps is then a located problem.
 */
export function readMatrix(path: string, long: boolean, duplicates: DuplicatePolicy = 'refuse', scale?: RatingScale): ReadResult {
  const shown = path === '-' ? '(standard input)' : path;
  const read = readBoundedFileSync(path, DEFAULT_MAX_BYTES);
  if (!read.ok) return { ok: false, messages: [`${shown}:1:1: ${read.reason}`] };
  // Decoding as for the window: invalid UTF-8 becomes U+FFFD, which the parser reports as binary content.
  const text = decodeText(read.bytes);
  const parsed = parseDelimited(text, { fileName: shown, layout: long ? 'long' : 'wide', duplicates, maxBytes: DEFAULT_MAX_BYTES, ...(scale ? { scale } : {}) });
  if (!parsed.ok) {
    const messages = parsed.problems.map((p: Problem) => formatProblem(p));
    if (!long && looksLong(text)) {
      messages.push(`rankfill: ${shown} looks like row,column,value triples (three columns, repeated row labels); if it is, add --long`);
    }
    return { ok: false, messages };
  }
  return { ok: true, matrix: parsed.matrix, warnings: parsed.warnings.map((p: Problem) => formatProblem(p)) };
}
