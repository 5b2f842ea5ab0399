/**
 * Fast reading of a plain long-layout file (`row, column, value` per line) straight into
 * sparse storage, for the command line: no per-line record objects, no rows × columns array.
 *
 * It handles the common plain case only and answers `undefined` for anything else, so the
 * caller falls back to parseDelimited, which reports problems as FILE:LINE:COLUMN with its
 * exact wording: quotes, NUL or U+FFFD, a delimiter other than the detected one inside a
 * value, a decimal comma, other than 3 fields on a line, empty labels, values that are not
 * plain decimal numbers, blank-but-delimited lines, duplicate pairs. On the files it accepts
 * it gives the same matrix as parseDelimited with layout 'long' (same label order = first
 * appearance, same values, same scale rule), as test/unit/io/parseLongSparse.test.ts checks.
 *
 * Limit by observed ratings, checked while reading: the (maxRatings + 1)-th rating stops the
 * read at once with a problem naming its line.
 */
import type { RatingScale } from '../matrix/ratingMatrix';
import { sparseFromTriples, type SparseMatrix } from '../matrix/sparseRatings';
import { detectDelimiter } from './detectDelimiter';
import { detectScale } from './detectScale';
import { DEFAULT_MISSING_TOKENS, MAX_ABS_VALUE } from './parseCellValue';
import type { Problem } from './problem';

const NUMBER_DOT = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

export type LongSparseResult = { ok: true; matrix: SparseMatrix } | { ok: false; problems: Problem[] };

function isSpace(c: number, isTab: boolean): boolean {
  return c === 32 || (c === 9 && !isTab);
}

function trim(s: string, isTab: boolean): string {
  if (s.length === 0) return s;
  if (!isSpace(s.charCodeAt(0), isTab) && !isSpace(s.charCodeAt(s.length - 1), isTab)) return s;
  return isTab ? s.replace(/^ +| +$/g, '') : s.replace(/^[ \t]+|[ \t]+$/g, '');
}

class Growing {
  rows = new Int32Array(1024);
  cols = new Int32Array(1024);
  vals = new Float64Array(1024);
  n = 0;
  push(i: number, j: number, x: number): void {
    if (this.n === this.vals.length) {
      const cap = this.vals.length * 2;
      const r = new Int32Array(cap);
      r.set(this.rows);
      const c = new Int32Array(cap);
      c.set(this.cols);
      const v = new Float64Array(cap);
      v.set(this.vals);
      this.rows = r;
      this.cols = c;
      this.vals = v;
    }
    this.rows[this.n] = i;
    this.cols[this.n] = j;
    this.vals[this.n++] = x;
  }
}

export function parseLongSparse(input: string, fileName: string, maxRatings: number): LongSparseResult | undefined {
  if (input.indexOf('"') >= 0 || input.indexOf('\u0000') >= 0 || input.indexOf('\uFFFD') >= 0) return undefined;
  if (/\r(?!\n)/.test(input)) return undefined; // lone CR line breaks
  const start = input.charCodeAt(0) === 0xfeff ? 1 : 0;
  const delimiter = detectDelimiter(input, start);
  const isTab = delimiter === '\t';
  if (delimiter !== ',' && input.indexOf(',') >= 0) return undefined; // maybe a decimal comma
  const missing = new Set<string>(DEFAULT_MISSING_TOKENS.map((t) => t.toUpperCase()));
  const rowIndex = new Map<string, number>();
  const colIndex = new Map<string, number>();
  const rowLabels: string[] = [];
  const colLabels: string[] = [];
  const triples = new Growing();
  const len = input.length;
  let pos = start;
  let line = 0;
  let first = true;
  while (pos < len) {
    let end = input.indexOf('\n', pos);
    if (end < 0) end = len;
    line++;
    let stop = end;
    if (stop > pos && input.charCodeAt(stop - 1) === 13) stop--;
    const a = input.indexOf(delimiter, pos);
    if (a < 0 || a >= stop) {
      if (trim(input.slice(pos, stop), isTab) === '') {
        pos = end + 1;
        continue; // blank line
      }
      return undefined;
    }
    const b = input.indexOf(delimiter, a + 1);
    if (b < 0 || b >= stop) return undefined;
    const c = input.indexOf(delimiter, b + 1);
    if (c >= 0 && c < stop) return undefined; // more than 3 fields
    const f0 = trim(input.slice(pos, a), isTab);
    const f1 = trim(input.slice(a + 1, b), isTab);
    const f2 = trim(input.slice(b + 1, stop), isTab);
    pos = end + 1;
    const isNumber = NUMBER_DOT.test(f2);
    if (first) {
      first = false;
      // A header: the third field is not a number (and not a missing token, which the full parser reads as data).
      if (!isNumber && !missing.has(f2.toUpperCase())) continue;
    }
    if (f0 === '' || f1 === '') return undefined;
    let x = NaN;
    if (isNumber) {
      x = Number(f2);
      if (!(Math.abs(x) <= MAX_ABS_VALUE)) return undefined;
      if (x === 0) x = 0;
    } else if (!missing.has(f2.toUpperCase())) return undefined;
    let ri = rowIndex.get(f0);
    if (ri === undefined) {
      ri = rowLabels.length;
      rowIndex.set(f0, ri);
      rowLabels.push(f0);
    }
    let ci = colIndex.get(f1);
    if (ci === undefined) {
      ci = colLabels.length;
      colIndex.set(f1, ci);
      colLabels.push(f1);
    }
    if (x !== x) continue; // a missing value only registers its labels
    if (triples.n >= maxRatings) {
      return {
        ok: false,
        problems: [
          {
            file: fileName,
            line,
            column: 3,
            message: `more than ${maxRatings.toLocaleString('en')} observed ratings; the command line holds at most ${maxRatings.toLocaleString('en')}`,
          },
        ],
      };
    }
    triples.push(ri, ci, x);
  }
  if (rowLabels.length === 0 || triples.n === 0) return undefined; // let the full parser word it
  const data = sparseFromTriples(
    rowLabels.length,
    colLabels.length,
    triples.rows,
    triples.cols,
    triples.vals,
    triples.n,
  );
  if ('duplicate' in data) return undefined;
  const detected = detectScale(data.rowVal)!;
  const scale: RatingScale =
    detected.max > detected.min
      ? { ...detected }
      : { ...detected, max: detected.min + (detected.step > 0 ? detected.step : 1) };
  return { ok: true, matrix: { rowLabels, colLabels, scale, data } };
}
