import { isBlankRecord, tokenizeDelimited } from './tokenizeDelimited';

export type Delimiter = ',' | '\t' | ';';
export const DELIMITERS: readonly Delimiter[] = [',', '\t', ';'];

/** Human name of a delimiter for messages. */
export function delimiterName(d: string): string {
  return d === '\t' ? 'tab' : d === ';' ? 'semicolon' : d === ',' ? 'comma' : JSON.stringify(d);
}

/** Field counts of the first `limit` non-blank records when split on `d`. */
function sampleFieldCounts(text: string, d: Delimiter, start: number, limit = 50): number[] {
  const counts: number[] = [];
  tokenizeDelimited(
    text,
    d,
    {
      onRecord(rec) {
        if (!isBlankRecord(rec)) counts.push(rec.fields.length);
        return counts.length < limit;
      },
    },
    start,
  );
  return counts;
}

/**
 * Picks the delimiter whose split of the first 50 records is most consistent:
 * score = share of records having the most common field count, counted only
 * when that count is above 1. Ties go to the larger field count, then to the
 * order comma, tab, semicolon. With no candidate above 1 field, comma.
 */
export function detectDelimiter(text: string, start = 0): Delimiter {
  let best: Delimiter = ',';
  let bestScore = 0;
  let bestWidth = 0;
  for (const d of DELIMITERS) {
    const counts = sampleFieldCounts(text, d, start);
    if (counts.length === 0) continue;
    const freq = new Map<number, number>();
    for (const c of counts) freq.set(c, (freq.get(c) ?? 0) + 1);
    let mode = 0;
    let modeN = 0;
    for (const [c, k] of freq) if (k > modeN || (k === modeN && c > mode)) [mode, modeN] = [c, k];
    if (mode <= 1) continue;
    const score = modeN / counts.length;
    if (score > bestScore + 1e-12 || (Math.abs(score - bestScore) <= 1e-12 && mode > bestWidth)) {
      best = d;
      bestScore = score;
      bestWidth = mode;
    }
  }
  return best;
}
