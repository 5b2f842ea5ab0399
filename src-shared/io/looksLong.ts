/**
 * Whether a file that failed to read as a wide table looks like long data instead:
 * every one of its first records (up to 50) has three fields, the first field repeats
 * (a row label given for several columns), and the second holds column labels (it
 * repeats too, or holds text). Used for a one-line hint only.
 */
import { detectDelimiter } from './detectDelimiter';
import { isBlankRecord, tokenizeDelimited } from './tokenizeDelimited';

const NUMBER = /^[+-]?(?:\d+[.,]?\d*|[.,]\d+)(?:[eE][+-]?\d+)?$/;

export function looksLong(text: string): boolean {
  const start = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  const delimiter = detectDelimiter(text, start);
  const firsts: string[] = [];
  const seconds: string[] = [];
  let threeFields = true;
  tokenizeDelimited(
    text,
    delimiter,
    {
      onRecord(rec) {
        if (isBlankRecord(rec)) return true;
        if (rec.fields.length !== 3) threeFields = false;
        firsts.push(rec.fields[0].trim());
        seconds.push((rec.fields[1] ?? '').trim());
        return threeFields && firsts.length < 51;
      },
      onProblem() {
        threeFields = false;
      },
    },
    start,
  );
  // The first record may be a header; the repeat must be among the data records.
  const data = (a: string[]) => a.slice(1);
  const repeats = (a: string[]) => new Set(data(a)).size < data(a).length;
  const labelsInSecond = repeats(seconds) || data(seconds).some((s) => s !== '' && !NUMBER.test(s));
  return threeFields && firsts.length >= 3 && repeats(firsts) && labelsInSecond;
}
