/**
 * Writers for delimited text (RFC 4180): fields holding the delimiter, a quote,
 * a line break, or leading/trailing spaces/tabs are quoted, with quotes doubled.
 * Records end with CRLF. A missing value (NaN or undefined) is written as an empty field.
 * Numbers use the shortest round-trip form (`String(x)`) unless `decimals` is given.
 *
 * Formula guard (on by default): a spreadsheet that opens a CSV runs a text cell starting
 * with `=`, `+`, `-` or `@` as a formula, and tab or CR can smuggle one in (OWASP, "CSV
 * Injection"). Text cells — row and column labels, headers — that start with one of
 * these characters are written with a leading apostrophe (`'=SUM(A1)`), which
 * spreadsheets show as text. A label that is a plain number (`-1`, `+2.5`, `-3e2`) is left
 * as it is: a spreadsheet reads it as that number, and no formula can run. Value cells
 * are numbers we format ourselves and are never changed: `-1.5` stays `-1.5`.
 * `formulaGuard: false` writes labels exactly (for tools that are not spreadsheets).
 */
import type { RatingMatrix } from '../matrix/ratingMatrix';
import type { Delimiter } from './detectDelimiter';

export interface WriteOptions {
  delimiter?: Delimiter;
  /** Fixed number of decimals; default: shortest form that reads back exactly. */
  decimals?: number;
  /** Write `,` as the decimal mark (only with tab or semicolon delimiters). */
  decimalComma?: boolean;
  /** Value source for cell (i, j); default the matrix's own values. */
  layer?: (i: number, j: number) => number | undefined;
  /** Line ending; default CRLF. */
  lineEnding?: '\r\n' | '\n';
  /** Guard text cells against spreadsheet formulas (default true; see the top of this file). */
  formulaGuard?: boolean;
}

export interface WideWriteOptions extends WriteOptions {
  /** Text of the top-left header field; default "row". */
  cornerLabel?: string;
}

export interface LongWriteOptions extends WriteOptions {
  /** Also write cells whose value is missing (as an empty value), so empty rows/columns survive. */
  includeMissing?: boolean;
  /** Header names; default ["row", "column", "value"]. */
  header?: [string, string, string];
}

export function quoteField(s: string, delimiter: string): string {
  if (s === '') return s;
  const needs =
    s.includes(delimiter) || s.includes('"') || s.includes('\n') || s.includes('\r') || /^[ \t]|[ \t]$/.test(s);
  return needs ? `"${s.replace(/"/g, '""')}"` : s;
}

const FORMULA_START = /^[=+\-@\t\r]/;
const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** Whether a spreadsheet could run this text cell as a formula (OWASP, "CSV Injection"). */
export function startsLikeFormula(s: string): boolean {
  return FORMULA_START.test(s) && !PLAIN_NUMBER.test(s);
}

/** A text cell: guarded against formulas unless `guard` is false, then quoted as needed. */
export function textField(s: string, delimiter: string, guard = true): string {
  return quoteField(guard && startsLikeFormula(s) ? `'${s}` : s, delimiter);
}

export function formatNumber(x: number | undefined, opts: WriteOptions = {}): string {
  if (x === undefined || x !== x) return '';
  let s = opts.decimals !== undefined ? x.toFixed(opts.decimals) : String(x);
  if (s === '-0') s = '0';
  if (opts.decimalComma && (opts.delimiter ?? ',') !== ',') s = s.replace('.', ',');
  return s;
}

function valueAt(m: RatingMatrix, opts: WriteOptions, i: number, j: number): number | undefined {
  return opts.layer ? opts.layer(i, j) : m.values[i * m.colLabels.length + j];
}

export function writeWideCsv(matrix: RatingMatrix, opts: WideWriteOptions = {}): string {
  const d = opts.delimiter ?? ',';
  const eol = opts.lineEnding ?? '\r\n';
  const out: string[] = [];
  const g = opts.formulaGuard ?? true;
  const head = [textField(opts.cornerLabel ?? 'row', d, g)];
  for (const c of matrix.colLabels) head.push(textField(c, d, g));
  out.push(head.join(d));
  const nCols = matrix.colLabels.length;
  for (let i = 0; i < matrix.rowLabels.length; i++) {
    const parts = [textField(matrix.rowLabels[i], d, g)];
    for (let j = 0; j < nCols; j++) parts.push(formatNumber(valueAt(matrix, opts, i, j), opts));
    out.push(parts.join(d));
  }
  return out.join(eol) + eol;
}

export function writeLongCsv(matrix: RatingMatrix, opts: LongWriteOptions = {}): string {
  const d = opts.delimiter ?? ',';
  const eol = opts.lineEnding ?? '\r\n';
  const header = opts.header ?? ['row', 'column', 'value'];
  const g = opts.formulaGuard ?? true;
  const out: string[] = [header.map((h) => textField(h, d, g)).join(d)];
  const nCols = matrix.colLabels.length;
  const colText = matrix.colLabels.map((c) => textField(c, d, g));
  for (let i = 0; i < matrix.rowLabels.length; i++) {
    const r = textField(matrix.rowLabels[i], d, g);
    for (let j = 0; j < nCols; j++) {
      const v = formatNumber(valueAt(matrix, opts, i, j), opts);
      if (v === '' && !opts.includeMissing) continue;
      out.push(r + d + colText[j] + d + v);
    }
  }
  return out.join(eol) + eol;
}

/** Layers of a completed matrix (a FitResult fits this shape). Row-major, length rows × cols. */
export interface FilledLayers {
  predictions: ArrayLike<number>;
  baseline?: ArrayLike<number>;
  /** Per-cell spread; NaN where unknown. */
  spread?: ArrayLike<number>;
  /** Interval bounds per cell (NaN on observed cells); when given, `lower` and `upper` columns follow. */
  lower?: ArrayLike<number>;
  upper?: ArrayLike<number>;
}

/**
 * Long export of a completed matrix: one record per cell with
 * `row, column, value, source, baseline, spread` (and `lower, upper` when the run has
 * intervals) where value is the observed rating (source "observed") or the model's
 * prediction (source "filled"); baseline, spread and bounds are empty when not available.
 */
export function writeFilledLongCsv(matrix: RatingMatrix, layers: FilledLayers, opts: WriteOptions = {}): string {
  const d = opts.delimiter ?? ',';
  const eol = opts.lineEnding ?? '\r\n';
  const g = opts.formulaGuard ?? true;
  const bounds = layers.lower && layers.upper ? { lower: layers.lower, upper: layers.upper } : undefined;
  const out: string[] = [
    ['row', 'column', 'value', 'source', 'baseline', 'spread', ...(bounds ? ['lower', 'upper'] : [])].join(d),
  ];
  const nCols = matrix.colLabels.length;
  const colText = matrix.colLabels.map((c) => textField(c, d, g));
  for (let i = 0; i < matrix.rowLabels.length; i++) {
    const r = textField(matrix.rowLabels[i], d, g);
    for (let j = 0; j < nCols; j++) {
      const k = i * nCols + j;
      const obs = matrix.values[k];
      const observed = obs === obs;
      const v = observed ? obs : layers.predictions[k];
      out.push(
        [
          r,
          colText[j],
          formatNumber(v, opts),
          observed ? 'observed' : 'filled',
          formatNumber(layers.baseline ? layers.baseline[k] : undefined, opts),
          formatNumber(layers.spread ? layers.spread[k] : undefined, opts),
          ...(bounds
            ? [
                formatNumber(observed ? undefined : bounds.lower[k], opts),
                formatNumber(observed ? undefined : bounds.upper[k], opts),
              ]
            : []),
        ].join(d),
      );
    }
  }
  return out.join(eol) + eol;
}
