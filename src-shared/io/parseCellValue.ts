/**
 * Reading one numeric cell of an imported file.
 *
 * Accepted: plain decimal numbers with optional sign, fraction and exponent
 * (`4`, `-0.5`, `.5`, `3.`, `1e2`), with `,` as the decimal mark when decimal
 * comma is on. Refused: text, thousands separators, `inf`/`NaN` words, and any
 * value with |x| > 1e15 (finite in floating point but implausible as a rating;
 * this also refuses 1e308 and anything that overflows to Infinity).
 */

export const DEFAULT_MISSING_TOKENS: readonly string[] = ['', 'NA', 'N/A', '-', '.', '?'];

/** Largest magnitude accepted for a rating. */
export const MAX_ABS_VALUE = 1e15;

export type CellValue = { kind: 'missing' } | { kind: 'number'; value: number } | { kind: 'error'; message: string };

const MISSING: CellValue = { kind: 'missing' };
const NUMBER_DOT = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const NUMBER_COMMA = /^[+-]?(?:\d+,?\d*|,\d+)(?:[eE][+-]?\d+)?$/;
const NON_FINITE_WORD = /^[+-]?(?:inf|infinity|nan|∞)$/i;

/** Builds a case-insensitive matcher for the missing-value tokens; the empty field is always missing. */
export function missingMatcher(tokens: readonly string[] | undefined): (s: string) => boolean {
  const set = new Set<string>(['']);
  for (const t of tokens ?? DEFAULT_MISSING_TOKENS) set.add(t.trim().toUpperCase());
  return (s) => set.has(s.toUpperCase());
}

function quoteForMessage(s: string): string {
  const shown = s.length > 40 ? s.slice(0, 37) + '…' : s;
  return JSON.stringify(shown);
}

export function parseCellValue(raw: string, decimalComma: boolean, isMissing: (s: string) => boolean): CellValue {
  const s = raw.trim();
  if (isMissing(s)) return MISSING;
  let x: number;
  if (decimalComma) {
    if (NUMBER_COMMA.test(s)) x = Number(s.replace(',', '.'));
    else if (NUMBER_DOT.test(s) && s.includes('.')) {
      return { kind: 'error', message: `${quoteForMessage(s)} uses "." but this file uses a decimal comma` };
    } else x = NaN;
  } else if (NUMBER_DOT.test(s)) {
    x = Number(s);
  } else if (NUMBER_COMMA.test(s)) {
    return {
      kind: 'error',
      message: `${quoteForMessage(s)} is not a number (decimal comma? turn on the decimal comma option)`,
    };
  } else x = NaN;
  if (Number.isNaN(x)) {
    if (NON_FINITE_WORD.test(s)) {
      return { kind: 'error', message: `${quoteForMessage(s)} is not a finite number; ratings must be finite` };
    }
    return { kind: 'error', message: `${quoteForMessage(s)} is not a number` };
  }
  if (!Number.isFinite(x) || Math.abs(x) > MAX_ABS_VALUE) {
    return {
      kind: 'error',
      message: `${quoteForMessage(s)} is implausible as a rating (allowed magnitude up to 1e15)`,
    };
  }
  return { kind: 'number', value: x === 0 ? 0 : x };
}
