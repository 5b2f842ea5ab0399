/**
 * Text helpers for the static report: escaping for HTML/SVG text and attributes,
 * a tiny element builder, and number formatting in plain words. Everything the
 * report prints passes through `esc`, so labels from the data cannot inject markup.
 */

export function esc(text: string | number): string {
  return String(text).replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!,
  );
}

type AttrValue = string | number | boolean | undefined | null;

/** `<name a="…">children</name>`; attributes that are undefined, null or false are left out. Children are raw markup. */
export function tag(name: string, attrs: Record<string, AttrValue>, ...children: string[]): string {
  let a = '';
  for (const [k, v] of Object.entries(attrs)) {
    if (v === undefined || v === null || v === false) continue;
    a += v === true ? ` ${k}` : ` ${k}="${esc(typeof v === 'number' ? round(v) : v)}"`;
  }
  return `<${name}${a}>${children.join('')}</${name}>`;
}

/** Coordinates in SVG: two decimals are plenty and keep the file small. */
export function round(x: number): string {
  return String(Math.round(x * 100) / 100);
}

/** A number for the reader: fixed decimals, "n/a" when not a number. */
export function fmt(x: number | null | undefined, digits = 3): string {
  return x === null || x === undefined || !Number.isFinite(x) ? 'n/a' : x.toFixed(digits);
}

/** 0.6312 → "63.1 %". */
export function percent(share: number, digits = 1): string {
  return Number.isFinite(share) ? `${(share * 100).toFixed(digits)} %` : 'n/a';
}

/** "a" or "an" before a number written in digits, as it is read aloud (an 80 %, an 11, a 90 %). */
export function articleFor(digits: string): string {
  const n = /^\d+/.exec(digits)?.[0] ?? '';
  return n.startsWith('8') || n === '11' || n === '18' ? 'an' : 'a';
}

/** 12345 → "12,345". */
export function count(n: number): string {
  return Math.round(n)
    .toString()
    .replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/** "a", "a and b", "a, b and c". */
export function listWords(items: string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/** Up to `limit` names quoted, then "and N more". */
export function nameList(names: string[], limit = 40): string {
  const shown = names.slice(0, limit).map((n) => `“${n}”`);
  const rest = names.length - shown.length;
  return rest > 0 ? `${shown.join(', ')} and ${count(rest)} more` : listWords(shown);
}

/** Round tick values covering [lo, hi], about `n` of them (1, 2 or 5 × 10^k apart). */
export function niceTicks(lo: number, hi: number, n = 4): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / Math.max(1, n);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((f) => f * mag).find((s) => s >= raw) ?? 10 * mag;
  const ticks: number[] = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-9; v += step)
    ticks.push(Number(v.toPrecision(12)));
  return ticks;
}
