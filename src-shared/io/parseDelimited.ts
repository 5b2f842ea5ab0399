/**
 * Import of delimited text (CSV, TSV, semicolon-separated) into a RatingMatrix.
 *
 * Layouts:
 * - wide: the header row holds column labels (its first field, the corner, is ignored);
 *   each following record is a row label then one value per column.
 * - long: records `row, column, value` (an optional header is recognised when its third
 *   field is not a number); fields after the third are ignored with a warning. Pairs are
 *   pivoted into a matrix with rows and columns in order of first appearance. A (row, column)
 *   pair given more than once is a duplicate, resolved by `duplicates`:
 *   'refuse' (default: each duplicate is a problem), 'last' (keep the last value) or
 *   'average' (mean of the values); the latter two report each duplicate as a warning.
 *   A pair whose value is missing only registers its labels.
 * - auto: long when the first record has 3 or 4 fields, its third field is named
 *   value / rating / score (singular or plural, any case), and the data either repeat a
 *   first-column label or have text in the second column (within the first 50 records);
 *   or when it has exactly 3 fields, the third is a number (no header) and the first
 *   column repeats a label; wide otherwise.
 *
 * Limits (refused politely, never thrown): input above `maxBytes` (default 50 MB of UTF-8),
 * a matrix above MAX_CELLS (20 million cells), values with |x| > 1e15, non-finite words.
 * Unquoted fields are trimmed; quoted fields are kept verbatim. A leading UTF-8 BOM is skipped.
 * NUL characters or U+FFFD (what a decoder puts in place of invalid UTF-8) mean binary or
 * mis-encoded content and stop the import.
 *
 * All problems are collected (up to 200 plus an "and N more" entry); the result is either
 * a complete matrix with warnings, or no matrix and the list of problems.
 */
import type { RatingMatrix, RatingScale } from '../matrix/ratingMatrix';
import { buildLong } from './buildLongMatrix';
import { buildWide } from './buildWideMatrix';
import { detectDelimiter, DELIMITERS, type Delimiter } from './detectDelimiter';
import { detectScale } from './detectScale';
import { show } from './importCommon';
import { DEFAULT_MISSING_TOKENS, missingMatcher } from './parseCellValue';
import { ProblemCollector, type Problem } from './problem';
import { isBlankRecord, tokenizeDelimited, type RawRecord } from './tokenizeDelimited';
import { scaleRefusal } from '../matrix/scaleCheck';

type Layout = 'wide' | 'long';
export type DuplicatePolicy = 'last' | 'average' | 'refuse';
type ColumnOrder = 'as-read' | 'sorted';

export interface ParseOptions {
  fileName: string;
  layout?: Layout | 'auto';
  delimiter?: Delimiter | 'auto';
  decimalComma?: boolean | 'auto';
  /** Tokens read as missing (case-insensitive); the empty field is always missing. */
  missingTokens?: string[];
  duplicates?: DuplicatePolicy;
  /**
   * The rating scale chosen by the user. When given, a value outside it or between its steps
   * is a problem (line, column, nearest allowed values) and the matrix gets this scale;
   * otherwise the scale is guessed from the values (see detectScale).
   */
  scale?: RatingScale;
  /** Long layout: columns in order of first appearance ('as-read', default) or sorted by label (natural order). */
  columnOrder?: ColumnOrder;
  /** Size limit in bytes of UTF-8; default DEFAULT_MAX_BYTES. */
  maxBytes?: number;
}

interface ParseInfo {
  delimiter: Delimiter;
  layout: Layout;
  decimalComma: boolean;
  hadBom: boolean;
  rows: number;
  cols: number;
  observed: number;
  /** Observed min/max and a step guess. The matrix's own scale equals this, except that
   *  when every value is equal its max is widened by one step (or 1) so that max > min. */
  detectedScale: RatingScale;
  /** Long layout: number of (row, column) pairs given more than once. */
  duplicatePairs: number;
  /** Number of physical lines read. */
  lines: number;
  /** Title of the row-label column in the file (wide: the corner field; long: the header's first field), if any. */
  rowHeader?: string;
  /** The scale the matrix got, and where it came from. */
  scaleSource: 'given' | 'guessed';
}

export type ParseResult =
  { ok: true; matrix: RatingMatrix; warnings: Problem[]; info: ParseInfo } | { ok: false; problems: Problem[] };

/** Documented import size limit: 50 MB. */
export const DEFAULT_MAX_BYTES = 50 * 1024 * 1024;
const VALUE_HEADER = /^(value|values|rating|ratings|score|scores)$/i;
const NUMBER_LIKE = /^[+-]?(?:\d+[.,]?\d*|[.,]\d+)(?:[eE][+-]?\d+)?$/;

/** UTF-8 byte length of a string (counting a lone surrogate as 3 bytes, as an encoder writes U+FFFD). */
export function utf8ByteLength(s: string): number {
  let n = 0;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c < 0x80) n += 1;
    else if (c < 0x800) n += 2;
    else if (c >= 0xd800 && c <= 0xdbff && i + 1 < s.length) {
      const c2 = s.charCodeAt(i + 1);
      if (c2 >= 0xdc00 && c2 <= 0xdfff) {
        n += 4;
        i++;
      } else n += 3;
    } else n += 3;
  }
  return n;
}

export function formatBytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB`;
  if (n >= 1024) return `${(n / 1024).toFixed(1).replace(/\.0$/, '')} KB`;
  return `${n} bytes`;
}
function fail(problems: ProblemCollector): ParseResult {
  return { ok: false, problems: problems.list() };
}

/** Line/field of the first NUL (when `nul`) or U+FFFD (otherwise) in a record, if any. */
function findBinary(rec: RawRecord, nul: boolean): { column: number; line: number; nul: boolean } | undefined {
  const ch = nul ? '\u0000' : '\uFFFD';
  for (let j = 0; j < rec.fields.length; j++) {
    if (rec.fields[j].indexOf(ch) >= 0) return { column: j + 1, line: rec.lines[j], nul };
  }
  return undefined;
}
export function parseDelimited(input: string, opts: ParseOptions): ParseResult {
  const file = opts.fileName;
  const problems = new ProblemCollector(file);
  const warnings = new ProblemCollector(file, 200, 'warning');
  try {
    return parseInner(input, opts, problems, warnings);
  } catch (err) {
    // Defensive: the parser is written not to throw; if it ever does, still answer with a problem.
    problems.add(1, 1, `could not read this file (${err instanceof Error ? err.message : String(err)})`);
    return fail(problems);
  }
}

function parseInner(
  input: string,
  opts: ParseOptions,
  problems: ProblemCollector,
  warnings: ProblemCollector,
): ParseResult {
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  if (typeof input !== 'string') {
    problems.add(1, 1, 'no text to read');
    return fail(problems);
  }
  // Size: each UTF-16 unit is at least one UTF-8 byte, so only count exactly near the limit.
  if (input.length > maxBytes || (input.length * 3 > maxBytes && utf8ByteLength(input) > maxBytes)) {
    const size = input.length > maxBytes * 4 ? `over ${formatBytes(maxBytes)}` : formatBytes(utf8ByteLength(input));
    problems.add(1, 1, `file is too large to import (${size}; the limit is ${formatBytes(maxBytes)})`);
    return fail(problems);
  }
  const hadBom = input.charCodeAt(0) === 0xfeff;
  const start = hadBom ? 1 : 0;
  if (input.slice(start).trim().length === 0) {
    problems.add(1, 1, 'file is empty: expected a header row and data rows');
    return fail(problems);
  }

  // Delimiter.
  let delimiter: Delimiter;
  if (opts.delimiter === undefined || opts.delimiter === 'auto') delimiter = detectDelimiter(input, start);
  else if (DELIMITERS.includes(opts.delimiter)) delimiter = opts.delimiter;
  else {
    problems.add(1, 1, `unsupported delimiter ${show(String(opts.delimiter))}; use comma, tab or semicolon`);
    return fail(problems);
  }

  // Tokenize everything once; keep non-blank records.
  const records: RawRecord[] = [];
  let lastLine = 1;
  let binary: { column: number; line: number; nul: boolean } | undefined;
  let structural = false;
  // A NUL anywhere is the stronger sign of a binary file, so it is looked for first.
  const lookForNul = input.indexOf('\u0000') >= 0;
  const lookForBad = lookForNul || input.indexOf('\uFFFD') >= 0;
  tokenizeDelimited(
    input,
    delimiter,
    {
      onRecord(rec) {
        lastLine = rec.lines[rec.lines.length - 1];
        const b = lookForBad ? findBinary(rec, lookForNul) : undefined;
        if (b) {
          binary = b;
          return false;
        }
        if (!isBlankRecord(rec)) records.push(rec);
        return true;
      },
      onProblem(kind, line, column) {
        structural = true;
        if (kind === 'unclosed-quote') {
          problems.add(line, column, 'unbalanced quote: the quote that opens this field is never closed');
        } else {
          problems.add(
            line,
            column,
            'unexpected text after a closing quote (a quote inside a quoted field must be doubled: "")',
          );
        }
      },
    },
    start,
  );
  if (binary) {
    const b = binary as { column: number; line: number; nul: boolean };
    problems.add(
      b.line,
      b.column,
      b.nul
        ? 'contains a NUL byte: this looks like a binary file, not delimited text'
        : 'contains bytes that are not valid UTF-8 text (save the file as UTF-8)',
    );
    return fail(problems);
  }
  if (structural) {
    // Field boundaries cannot be trusted after a broken quote; report only that.
    return fail(problems);
  }
  if (records.length === 0) {
    problems.add(1, 1, 'file is empty: expected a header row and data rows');
    return fail(problems);
  }

  // Decimal comma.
  let decimalComma: boolean;
  if (opts.decimalComma === true) {
    if (delimiter === ',') {
      problems.add(1, 1, 'decimal comma cannot be used when the delimiter is a comma; choose tab or semicolon');
      return fail(problems);
    }
    decimalComma = true;
  } else if (opts.decimalComma === false) decimalComma = false;
  else decimalComma = delimiter !== ',' && guessDecimalComma(records);

  const isMissing = missingMatcher(opts.missingTokens ?? DEFAULT_MISSING_TOKENS);

  // Layout.
  let layout: Layout;
  if (opts.layout === 'wide' || opts.layout === 'long') layout = opts.layout;
  else layout = guessLayout(records);

  const given = opts.scale;
  const refuse = given ? (x: number, text: string) => scaleRefusal(x, given, text) : undefined;
  const built =
    layout === 'wide'
      ? buildWide(records, decimalComma, isMissing, problems, warnings, delimiter, refuse)
      : buildLong(records, decimalComma, isMissing, opts.duplicates ?? 'refuse', problems, warnings, delimiter, refuse);
  if (!built || problems.count > 0) return fail(problems);

  const { matrix, duplicatePairs } = built;
  if (layout === 'long' && opts.columnOrder === 'sorted') sortColumns(matrix);
  const scale = detectScale(matrix.values);
  if (!scale) {
    problems.add(1, 1, 'no observed values: every cell is missing');
    return fail(problems);
  }
  // The matrix's scale must have max > min; when every observed value is equal, widen by one step (or 1).
  if (built.rowHeader !== undefined && built.rowHeader.trim() !== '') matrix.rowHeader = built.rowHeader;
  if (given) matrix.scale = { ...given };
  else
    matrix.scale =
      scale.max > scale.min ? { ...scale } : { ...scale, max: scale.min + (scale.step > 0 ? scale.step : 1) };
  let observed = 0;
  for (let i = 0; i < matrix.values.length; i++) if (matrix.values[i] === matrix.values[i]) observed++;
  return {
    ok: true,
    matrix,
    warnings: warnings.list(),
    info: {
      delimiter,
      layout,
      decimalComma,
      hadBom,
      rows: matrix.rowLabels.length,
      cols: matrix.colLabels.length,
      observed,
      detectedScale: scale,
      duplicatePairs,
      lines: lastLine,
      ...(built.rowHeader !== undefined && built.rowHeader.trim() !== '' ? { rowHeader: built.rowHeader } : {}),
      scaleSource: given ? 'given' : 'guessed',
    },
  };
}
const labelOrder = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

/** Columns sorted by label in natural order ("item 2" before "item 10"), values moved with them. */
function sortColumns(m: RatingMatrix): void {
  const cols = m.colLabels.length;
  const order = m.colLabels
    .map((_, j) => j)
    .sort((a, b) => labelOrder.compare(m.colLabels[a], m.colLabels[b]) || a - b);
  const values = new Float64Array(m.values.length);
  for (let i = 0; i < m.rowLabels.length; i++)
    for (let k = 0; k < cols; k++) values[i * cols + k] = m.values[i * cols + order[k]];
  m.colLabels = order.map((j) => m.colLabels[j]);
  m.values = values;
}

const COMMA_DECIMAL = /^[+-]?\d*,\d+$/;

function guessDecimalComma(records: RawRecord[]): boolean {
  const limit = Math.min(records.length, 1000);
  for (let r = 1; r < limit; r++) {
    const f = records[r].fields;
    for (let j = 1; j < f.length; j++) if (COMMA_DECIMAL.test(f[j])) return true;
  }
  return false;
}

function guessLayout(records: RawRecord[]): Layout {
  const head = records[0].fields;
  const width = head.length;
  const limit = Math.min(records.length, 51);
  const firstColumnRepeats = (from: number): boolean => {
    const seen = new Set<string>();
    for (let r = from; r < limit; r++) {
      const label = records[r].fields[0];
      if (seen.has(label)) return true;
      seen.add(label);
    }
    return false;
  };
  if ((width === 3 || width === 4) && VALUE_HEADER.test(head[2].trim())) {
    // A wide file with a column named "rating" looks the same; long data repeats its row
    // labels or has text in the second column, wide data has numbers there.
    if (firstColumnRepeats(1)) return 'long';
    for (let r = 1; r < limit; r++) {
      const f = records[r].fields;
      if (f.length > 1 && f[1].trim() !== '' && !NUMBER_LIKE.test(f[1].trim())) return 'long';
    }
    return 'wide';
  }
  if (width === 3 && NUMBER_LIKE.test(head[2].trim()) && firstColumnRepeats(0)) return 'long';
  return 'wide';
}
