/**
 * RFC 4180 style tokenizer for delimited text, with exact line tracking.
 *
 * - A field that starts with `"` is quoted: it runs to the next lone `"`;
 *   `""` inside it stands for one quote; delimiters and line breaks inside are data.
 * - Records end at CRLF, LF or a lone CR. Line numbers count physical lines,
 *   so a quoted field with embedded line breaks spans several lines.
 * - Unquoted fields are returned with surrounding spaces/tabs trimmed (unless the
 *   delimiter is a tab, where only spaces are trimmed); quoted fields are returned verbatim.
 * - A quote that is never closed, or text right after a closing quote, is reported
 *   through `onProblem` and the tokenizer carries on (never throws).
 */

export interface RawRecord {
  /** Field texts (unquoted fields trimmed). */
  fields: string[];
  /** True where the field was quoted. */
  quoted: boolean[];
  /** 1-based line on which each field starts. */
  lines: number[];
  /** 1-based line on which the record starts. */
  line: number;
}

type TokenProblemKind = 'unclosed-quote' | 'text-after-quote';

export interface TokenizeHandlers {
  /** Return false to stop tokenizing early. */
  onRecord(rec: RawRecord): boolean | void;
  onProblem?(kind: TokenProblemKind, line: number, column: number): void;
}

const QUOTE = 34;
const CR = 13;
const LF = 10;

function trimField(s: string, delimiterIsTab: boolean): string {
  if (s.length === 0) return s;
  const first = s.charCodeAt(0);
  const last = s.charCodeAt(s.length - 1);
  const ws = (c: number) => c === 32 || (!delimiterIsTab && c === 9);
  if (!ws(first) && !ws(last)) return s;
  return delimiterIsTab ? s.replace(/^ +| +$/g, '') : s.replace(/^[ \t]+|[ \t]+$/g, '');
}

/** Counts line breaks in text[from, to) treating CRLF as one; also reports whether the slice ends on a CR. */
function countBreaks(text: string, from: number, to: number): number {
  let n = 0;
  for (let i = from; i < to; i++) {
    const c = text.charCodeAt(i);
    if (c === LF) n++;
    else if (c === CR && text.charCodeAt(i + 1) !== LF) n++;
  }
  return n;
}

export function tokenizeDelimited(text: string, delimiter: string, handlers: TokenizeHandlers, start = 0): void {
  const n = text.length;
  const d = delimiter.charCodeAt(0);
  const isTab = delimiter === '\t';
  let pos = start;
  let line = 1;
  while (pos < n) {
    const rec: RawRecord = { fields: [], quoted: [], lines: [], line };
    for (;;) {
      const fieldLine = line;
      const column = rec.fields.length + 1;
      let value: string;
      let quoted = false;
      // Skip leading spaces before an opening quote (`a, "b"`).
      let q = pos;
      while (q < n && (text.charCodeAt(q) === 32 || (!isTab && text.charCodeAt(q) === 9))) q++;
      if (q < n && text.charCodeAt(q) === QUOTE) {
        quoted = true;
        pos = q + 1;
        let buf = '';
        let segStart = pos;
        let closed = false;
        for (;;) {
          const idx = text.indexOf('"', pos);
          if (idx < 0) {
            buf += text.slice(segStart);
            line += countBreaks(text, pos, n);
            pos = n;
            break;
          }
          line += countBreaks(text, pos, idx);
          if (text.charCodeAt(idx + 1) === QUOTE) {
            buf += text.slice(segStart, idx + 1);
            pos = idx + 2;
            segStart = pos;
            continue;
          }
          buf += text.slice(segStart, idx);
          pos = idx + 1;
          closed = true;
          break;
        }
        if (!closed) handlers.onProblem?.('unclosed-quote', fieldLine, column);
        // Anything between the closing quote and the next delimiter / line break.
        let e = pos;
        while (e < n) {
          const c = text.charCodeAt(e);
          if (c === d || c === CR || c === LF) break;
          e++;
        }
        if (e > pos) {
          const tail = text.slice(pos, e);
          if (tail.trim().length > 0) {
            handlers.onProblem?.('text-after-quote', line, column);
            buf += tail;
          }
          pos = e;
        }
        value = buf;
      } else {
        let e = pos;
        while (e < n) {
          const c = text.charCodeAt(e);
          if (c === d || c === CR || c === LF) break;
          e++;
        }
        value = trimField(text.slice(pos, e), isTab);
        pos = e;
      }
      rec.fields.push(value);
      rec.quoted.push(quoted);
      rec.lines.push(fieldLine);
      if (pos >= n) break;
      const c = text.charCodeAt(pos);
      if (c === d) {
        pos++;
        continue;
      }
      // Line break ends the record.
      pos++;
      if (c === CR && text.charCodeAt(pos) === LF) pos++;
      line++;
      break;
    }
    if (handlers.onRecord(rec) === false) return;
  }
}

/** True for a record that is an empty line (or only spaces). */
export function isBlankRecord(rec: RawRecord): boolean {
  return rec.fields.length === 1 && !rec.quoted[0] && rec.fields[0] === '';
}
