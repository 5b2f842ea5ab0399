/**
 * Finds the first syntax error in a JSON text (RFC 8259), for messages that point at
 * the exact place. JSON.parse says only that the text is invalid — and for some errors
 * (an unexpected word such as NaN or Infinity) gives no position at all and quotes a
 * slice of the file instead. This scanner walks the text once, without building values
 * and without recursion (deep nesting cannot overflow the stack), and answers the offset
 * of the first offending character and a short reason that quotes at most the offending
 * token (20 characters), never the surrounding file text.
 *
 * Grammar (RFC 8259 §2–§7):
 *   value  = object / array / string / number / true / false / null
 *   object = "{" [ string ":" value *( "," string ":" value ) ] "}"
 *   array  = "[" [ value *( "," value ) ] "]"
 *   number = [ "-" ] ( "0" / 1-9 *DIGIT ) [ "." 1*DIGIT ] [ ( "e" / "E" ) [ "+" / "-" ] 1*DIGIT ]
 *   string = quotation-mark *char quotation-mark, control characters U+0000–U+001F escaped
 */

export interface JsonSyntaxError {
  /** 0-based offset of the first offending character (text.length when the text ends early). */
  offset: number;
  reason: string;
  /** The text ends before the value is complete (truncated file). */
  endsEarly: boolean;
}

const WS = new Set([0x20, 0x09, 0x0a, 0x0d]);
const NOT_JSON_WORDS: Record<string, string> = {
  NaN: 'NaN is not a JSON value; a missing value is written null',
  Infinity: 'Infinity is not a JSON value',
  '-Infinity': '-Infinity is not a JSON value',
  undefined: 'undefined is not a JSON value; a missing value is written null',
};

/** The offending token at `at`, for quoting: a word, or one character; at most 20 characters. */
function tokenAt(text: string, at: number): string {
  const m = /^-?[A-Za-z0-9_$.+-]+/.exec(text.slice(at, at + 40));
  const t = m ? m[0] : text.slice(at, at + 1);
  return t.length > 20 ? t.slice(0, 20) + '…' : t;
}

function describeChar(text: string, at: number): string {
  const c = text.charCodeAt(at);
  if (c < 0x20) return `control character U+${c.toString(16).toUpperCase().padStart(4, '0')}`;
  if (c === 0x22) {
    // A quoted text: show it as written (up to 20 characters inside the quotes).
    const m = /^"(?:[^"\\\n\r]|\\.){0,20}"?/.exec(text.slice(at, at + 60))!;
    return m[0].endsWith('"') && m[0].length > 1 ? m[0] : m[0] + '…';
  }
  return JSON.stringify(tokenAt(text, at));
}

/** Called when a list or object closes; answer true to stop the scan there. */
type OnClose = (depth: number, path: () => (string | number)[], isList: boolean, count: number) => boolean;

export function findJsonSyntaxError(text: string): JsonSyntaxError | null {
  const r = scanJson(text);
  return r === 'stopped' ? null : r;
}

/**
 * Walks the text; answers the first syntax error, null for valid JSON, or 'stopped'
 * when `onClose` asked to stop (the rest is not looked at).
 */
function scanJson(text: string, onClose?: OnClose): JsonSyntaxError | null | 'stopped' {
  const n = text.length;
  let i = 0;
  // Container stack: kind, and (for paths) the current key or the element count.
  const stack: number[] = [];
  const keys: (string | null)[] = [];
  const counts: number[] = [];
  const OBJ = 1;
  const ARR = 2;
  const pathOf = (depth: number) => () => {
    const p: (string | number)[] = [];
    for (let d = 0; d < depth; d++) p.push(stack[d] === OBJ ? (keys[d] ?? '') : counts[d] - 1);
    return p;
  };
  const fail = (offset: number, reason: string): JsonSyntaxError => ({ offset, reason, endsEarly: offset >= n });
  const early = (what: string): JsonSyntaxError => ({
    offset: n,
    reason: `the text ends inside ${what}`,
    endsEarly: true,
  });

  const skipWs = () => {
    while (i < n && WS.has(text.charCodeAt(i))) i++;
  };

  /** Scans a string starting at the quote; returns an error or null. */
  const scanString = (): JsonSyntaxError | null => {
    const start = i;
    i++; // opening quote
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 0x22) {
        i++;
        return null;
      }
      if (c === 0x5c) {
        const e = text[i + 1];
        if (e === undefined) break;
        if (e === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6)))
            return fail(i, 'a \\u escape needs four hexadecimal digits');
          i += 6;
          continue;
        }
        if (!'"\\/bfnrt'.includes(e))
          return fail(i, `unknown escape \\${e.length === 1 && e.charCodeAt(0) >= 0x20 ? e : '?'} in a text value`);
        i += 2;
        continue;
      }
      if (c < 0x20)
        return fail(
          i,
          c === 0x0a || c === 0x0d
            ? 'a line break inside a text value (a quote is missing?)'
            : `${describeChar(text, i)} inside a text value`,
        );
      i++;
    }
    return {
      ...early('a text value'),
      offset: n,
      reason: `the text ends inside a text value that starts at character ${start + 1}`,
    };
  };

  const isDigit = (k: number) => {
    const c = text.charCodeAt(k);
    return c >= 0x30 && c <= 0x39;
  };
  /** Scans a number; a bad one is reported at its first offending character (as V8 does). */
  const scanNumber = (): JsonSyntaxError | null => {
    const word = tokenAt(text, i);
    if (NOT_JSON_WORDS[word]) return fail(i, NOT_JSON_WORDS[word]);
    let j = i;
    if (text[j] === '-') j++;
    if (text[j] === '0') j++;
    else if (isDigit(j)) while (isDigit(j)) j++;
    else
      return j >= n
        ? early('a number')
        : fail(j, `${JSON.stringify(word)} is not a number (no digit after the minus sign)`);
    if (text[j] === '.') {
      j++;
      if (!isDigit(j))
        return j >= n
          ? early('a number')
          : fail(j, `${JSON.stringify(word)} is not a number (no digit after the decimal point)`);
      while (isDigit(j)) j++;
    }
    if (text[j] === 'e' || text[j] === 'E') {
      j++;
      if (text[j] === '+' || text[j] === '-') j++;
      if (!isDigit(j))
        return j >= n
          ? early('a number')
          : fail(j, `${JSON.stringify(word)} is not a number (no digit in the exponent)`);
      while (isDigit(j)) j++;
    }
    i = j;
    return null;
  };

  /** Scans one value (scalar, or opens a container). */
  const scanValue = (): JsonSyntaxError | null => {
    skipWs();
    if (i >= n) return early(stack.length ? 'a list or object' : 'the file');
    const c = text[i];
    if (c === '{' || c === '[') {
      stack.push(c === '{' ? OBJ : ARR);
      keys.push(null);
      counts.push(0);
      i++;
      return null;
    }
    if (c === '"') return scanString();
    if (c === '-' || (c >= '0' && c <= '9')) return scanNumber();
    const lit = c === 't' ? 'true' : c === 'f' ? 'false' : c === 'n' ? 'null' : null;
    if (lit) {
      // As V8 does: the literal is read letter by letter and the first wrong letter is the place.
      for (let k = 1; k < lit.length; k++) {
        if (i + k >= n) return early('a value');
        if (text[i + k] !== lit[k])
          return fail(i + k, `unexpected ${JSON.stringify(tokenAt(text, i))} where a value should be`);
      }
      i += lit.length;
      return null;
    }
    const word = tokenAt(text, i);
    return fail(i, NOT_JSON_WORDS[word] ?? `unexpected ${describeChar(text, i)} where a value should be`);
  };

  // State after a value or an opening bracket.
  let err = scanValue();
  if (err) return err;
  let justOpened = stack.length > 0;
  for (;;) {
    skipWs();
    if (stack.length === 0) {
      if (i < n) return fail(i, `unexpected ${describeChar(text, i)} after the end of the data`);
      return null;
    }
    const top = stack[stack.length - 1];
    if (i >= n) return early(top === OBJ ? 'an object (a } is missing)' : 'a list (a ] is missing)');
    const c = text[i];
    const close = top === OBJ ? '}' : ']';
    if (c === close) {
      const count = counts[counts.length - 1];
      if (onClose && onClose(stack.length - 1, pathOf(stack.length - 1), top === ARR, count)) return 'stopped';
      stack.pop();
      keys.pop();
      counts.pop();
      i++;
      justOpened = false;
      continue;
    }
    if (!justOpened) {
      if (c !== ',') {
        return fail(i, `expected , or ${close} after a value, found ${describeChar(text, i)}`);
      }
      i++;
      skipWs();
      if (text[i] === close) return fail(i, `a comma before ${close}: remove the last comma`);
    }
    if (top === OBJ) {
      skipWs();
      if (i >= n) return early('an object');
      if (text[i] !== '"') return fail(i, `expected a quoted key, found ${describeChar(text, i)}`);
      const keyStart = i;
      err = scanString();
      if (err) return err;
      if (onClose) keys[keys.length - 1] = JSON.parse(text.slice(keyStart, i)) as string;
      skipWs();
      if (i >= n) return early('an object');
      if (text[i] !== ':') return fail(i, `expected : after a key, found ${describeChar(text, i)}`);
      i++;
    }
    const depth = stack.length;
    counts[depth - 1]++;
    err = scanValue();
    if (err) return err;
    justOpened = stack.length > depth;
  }
}

/**
 * The matrix shape of a project text — the lengths of `matrix.rowLabels` and
 * `matrix.colLabels` — found by scanning only as far as those two lists (our writer puts
 * them before the values), so limits can be checked before the body is parsed.
 * Null when the text is not valid JSON up to there or the lists are absent.
 */
export function peekMatrixShape(text: string): { rows: number; cols: number } | null {
  let rows = -1;
  let cols = -1;
  scanJson(text, (depth, path, isList, count) => {
    if (depth !== 2 || !isList) return false;
    const p = path();
    if (p[0] !== 'matrix') return false;
    if (p[1] === 'rowLabels') rows = count;
    else if (p[1] === 'colLabels') cols = count;
    return rows >= 0 && cols >= 0;
  });
  return rows >= 0 && cols >= 0 ? { rows, cols } : null;
}
