/**
 * Finds where a value sits in JSON text, for error messages: given a path of
 * keys / indexes (as zod reports it), returns the 1-based line and character
 * column where that value starts, or of the deepest parent found. Expects text
 * that JSON.parse accepted; on anything odd it falls back to line 1, column 1.
 */

export interface TextPosition {
  line: number;
  column: number;
}

/** 1-based line and character column of a 0-based offset. */
export function positionOfOffset(text: string, offset: number): TextPosition {
  let line = 1;
  let lineStart = 0;
  const end = Math.min(Math.max(0, offset), text.length);
  for (let i = 0; i < end; i++) {
    const c = text.charCodeAt(i);
    if (c === 10) {
      line++;
      lineStart = i + 1;
    } else if (c === 13 && text.charCodeAt(i + 1) !== 10) {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: end - lineStart + 1 };
}

function skipWs(t: string, i: number): number {
  while (i < t.length) {
    const c = t.charCodeAt(i);
    if (c === 32 || c === 9 || c === 10 || c === 13 || c === 0xfeff) i++;
    else break;
  }
  return i;
}

function skipString(t: string, i: number): number {
  // t[i] === '"'
  i++;
  while (i < t.length) {
    const c = t.charCodeAt(i);
    if (c === 92) i += 2;
    else if (c === 34) return i + 1;
    else i++;
  }
  return i;
}

/** Offset just past the value starting at i. */
function skipValue(t: string, i: number): number {
  i = skipWs(t, i);
  const c = t[i];
  if (c === '"') return skipString(t, i);
  if (c === '{' || c === '[') {
    let depth = 0;
    while (i < t.length) {
      const ch = t[i];
      if (ch === '"') {
        i = skipString(t, i);
        continue;
      }
      if (ch === '{' || ch === '[') depth++;
      else if (ch === '}' || ch === ']') {
        depth--;
        if (depth === 0) return i + 1;
      }
      i++;
    }
    return i;
  }
  while (i < t.length && !/[,\]}\s]/.test(t[i])) i++;
  return i;
}

export function locateJsonPath(text: string, path: readonly PropertyKey[]): TextPosition {
  try {
    let i = skipWs(text, 0);
    for (const key of path) {
      const c = text[i];
      if (c === '{' && typeof key === 'string') {
        let j = skipWs(text, i + 1);
        let found = -1;
        while (j < text.length && text[j] !== '}') {
          const keyEnd = skipString(text, j);
          const name = JSON.parse(text.slice(j, keyEnd)) as string;
          j = skipWs(text, keyEnd) + 1; // past ':'
          j = skipWs(text, j);
          if (name === key) {
            found = j;
            break;
          }
          j = skipWs(text, skipValue(text, j));
          if (text[j] === ',') j = skipWs(text, j + 1);
        }
        if (found < 0) break;
        i = found;
      } else if (c === '[' && typeof key === 'number') {
        let j = skipWs(text, i + 1);
        let idx = 0;
        while (j < text.length && text[j] !== ']' && idx < key) {
          j = skipWs(text, skipValue(text, j));
          if (text[j] === ',') j = skipWs(text, j + 1);
          idx++;
        }
        if (idx !== key || text[j] === ']') break;
        i = j;
      } else break;
    }
    return positionOfOffset(text, i);
  } catch {
    return { line: 1, column: 1 };
  }
}
