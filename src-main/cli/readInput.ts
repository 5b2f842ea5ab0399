/**
 * Reads the CLI's input file through the shared parser (src-shared/io), turning every
 * failure into `FILE:LINE:COLUMN: reason` lines. A plain long file (default duplicate rule,
 * no --scale) is read straight into sparse storage (parseLongSparse: no rows × columns
 * array, the ratings limit checked while reading); anything else goes through
 * parseDelimited into a dense RatingMatrix.
 */
import {
  DEFAULT_MAX_BYTES,
  formatProblem,
  looksLong,
  parseDelimited,
  type DuplicatePolicy,
  type Problem,
} from '../../src-shared/io';
import type { RatingMatrix, RatingScale } from '../../src-shared/matrix/ratingMatrix';
import type { SparseMatrix } from '../../src-shared/matrix/sparseRatings';
import { parseLongSparse } from '../../src-shared/io/parseLongSparse';
import { decodeText, readBoundedFileSync } from '../services/readTextFile';

/**
 * Most observed ratings the command line reads from a long file. At about 120 bytes per
 * rating for a 5-fold evaluation (sparse storage, training copies, residuals, factors),
 * 10 million ratings stay near 1.2 GB (the 50 MB read limit is usually reached first).
 */
const CLI_MAX_RATINGS = 10_000_000;

export type ReadResult =
  { ok: true; matrix: RatingMatrix | SparseMatrix; warnings: string[] } | { ok: false; messages: string[] };

/**
 * `path` is a file, or `-` for standard input (a pipe); either way at most 50 MB (the
 * window's import limit) are read, and only regular files are opened.
 * `scale`: the scale from --scale; a value outside it or between its steps is then a located problem.
 */
export function readMatrix(
  path: string,
  long: boolean,
  duplicates: DuplicatePolicy = 'refuse',
  scale?: RatingScale,
): ReadResult {
  const shown = path === '-' ? '(standard input)' : path;
  const read = readBoundedFileSync(path, DEFAULT_MAX_BYTES);
  if (!read.ok) return { ok: false, messages: [`${shown}:1:1: ${read.reason}`] };
  // Decoding as for the window: invalid UTF-8 becomes U+FFFD, which the parser reports as binary content.
  const text = decodeText(read.bytes);
  if (long && duplicates === 'refuse' && !scale) {
    const fast = parseLongSparse(text, shown, CLI_MAX_RATINGS);
    if (fast?.ok) return { ok: true, matrix: fast.matrix, warnings: [] };
    if (fast) return { ok: false, messages: fast.problems.map((p: Problem) => formatProblem(p)) };
  }
  const parsed = parseDelimited(text, {
    fileName: shown,
    layout: long ? 'long' : 'wide',
    duplicates,
    maxBytes: DEFAULT_MAX_BYTES,
    ...(scale ? { scale } : {}),
  });
  if (!parsed.ok) {
    const messages = parsed.problems.map((p: Problem) => formatProblem(p));
    if (!long && looksLong(text)) {
      messages.push(
        `rankfill: ${shown} looks like row,column,value triples (three columns, repeated row labels); if it is, add --long`,
      );
    }
    return { ok: false, messages };
  }
  return { ok: true, matrix: parsed.matrix, warnings: parsed.warnings.map((p: Problem) => formatProblem(p)) };
}
