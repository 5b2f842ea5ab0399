/**
 * Pieces shared by the wide and long matrix builders of the delimited-text import.
 */
import type { RatingMatrix, RatingScale } from '../matrix/ratingMatrix';
import { delimiterName, DELIMITERS, type Delimiter } from './detectDelimiter';
import type { ProblemCollector } from './problem';
import type { RawRecord } from './tokenizeDelimited';

/** Largest matrix an import may create (rows × columns). */
export const MAX_CELLS = 20_000_000;

export interface Built {
  matrix: RatingMatrix;
  duplicatePairs: number;
  /** Title of the row-label column as the file gives it (wide: the corner field; long: the first header field). */
  rowHeader?: string;
}

/** Why a read value may not be stored (off the chosen scale), or undefined. */
export type ValueRefusal = (value: number, text: string) => string | undefined;

export const EMPTY_SCALE: RatingScale = { min: 0, max: 0, step: 0 };

/** A value quoted for a message, shortened past 40 characters. */
export function show(s: string): string {
  return JSON.stringify(s.length > 40 ? s.slice(0, 37) + '…' : s);
}

export function checkCells(rows: number, cols: number, problems: ProblemCollector): boolean {
  if (rows * cols > MAX_CELLS) {
    problems.add(
      1,
      1,
      `the matrix would have ${rows} × ${cols} = ${rows * cols} cells; the limit is ${MAX_CELLS} cells`,
    );
    return false;
  }
  return true;
}

/** A hint when a ragged record would split evenly on another delimiter. */
export function otherDelimiterHint(rec: RawRecord, d: Delimiter, expected: number): string {
  if (rec.fields.length !== 1) return '';
  const joined = rec.fields[0];
  for (const o of DELIMITERS) {
    if (o === d) continue;
    if (joined.split(o).length === expected)
      return ` (this line seems to use ${delimiterName(o)} as the delimiter instead of ${delimiterName(d)})`;
  }
  return '';
}
