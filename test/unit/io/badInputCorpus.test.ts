/**
 * The bad-input corpus: every file in test/fixtures/bad/ must be refused with a
 * clear "FILE:LINE:COLUMN: reason" first problem, without throwing. The expected
 * line/column of each entry was checked by hand against the fixture's bytes
 * (line = physical line, column = field number for delimited files, character
 * column for project JSON).
 */
import { mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { promises as fs } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { formatProblem } from '../../../src-shared/io/problem';
import { parseDelimited } from '../../../src-shared/io/parseDelimited';
import { importDelimitedFile, openProjectFile } from '../../../src-main/services/projectStore';

const BAD = path.resolve(__dirname, '../../fixtures/bad');

// [file, expected first problem]. Source for each: the fixture's own bytes, read by hand.
const EXPECTED: [string, string][] = [
  ['bad-scale.rankfill', 'bad-scale.rankfill:9:14: matrix.scale: scale maximum must be greater than its minimum'],
  ['bad-settings.rankfill', 'bad-settings.rankfill:16:41: settings.rank: Too small: expected number to be >=0'],
  ['binary-nul.csv', 'binary-nul.csv:3:1: contains a NUL byte: this looks like a binary file, not delimited text'],
  [
    'decimal-comma-in-comma-file.csv',
    'decimal-comma-in-comma-file.csv:2:2: "4,5" is not a number (decimal comma? turn on the decimal comma option)',
  ],
  [
    'dot-in-decimal-comma-file.csv',
    'dot-in-decimal-comma-file.csv:3:2: "2.5" uses "." but this file uses a decimal comma',
  ],
  ['duplicate-col-labels.csv', 'duplicate-col-labels.csv:1:4: duplicate column label "alpha" (also in field 2)'],
  [
    'duplicate-labels.rankfill',
    'duplicate-labels.rankfill:7:31: matrix.rowLabels[2]: duplicate row label "ann" (also at index 0)',
  ],
  ['duplicate-row-labels.csv', 'duplicate-row-labels.csv:4:1: duplicate row label "ann" (first on line 2)'],
  ['empty-col-label.csv', 'empty-col-label.csv:1:3: empty column label for a column that holds values'],
  ['empty-row-label.csv', 'empty-row-label.csv:3:1: empty row label'],
  ['empty.csv', 'empty.csv:1:1: file is empty: expected a header row and data rows'],
  ['empty.rankfill', 'empty.rankfill:1:1: the project file is empty'],
  [
    'future-version.rankfill',
    'future-version.rankfill:3:14: made by a newer Rankfill (format v7); this version reads up to v2',
  ],
  ['header-only.csv', 'header-only.csv:1:1: the file has a header row but no data rows'],
  [
    'implausible-1e16.tsv',
    'implausible-1e16.tsv:3:2: "1e16" is implausible as a rating (allowed magnitude up to 1e15)',
  ],
  [
    'invalid-json.rankfill',
    'invalid-json.rankfill:9:5: the project file is not valid JSON (expected , or } after a value, found "scale"); it may be damaged',
  ],
  ['invalid-utf8.csv', 'invalid-utf8.csv:3:1: contains bytes that are not valid UTF-8 text (save the file as UTF-8)'],
  [
    'long-duplicate-pairs.csv',
    'long-duplicate-pairs.csv:5:1: duplicate pair (row "ann", column "alpha"): first given on line 2; choose keep last or average to merge (on the command line: --duplicates last or --duplicates average)',
  ],
  [
    'long-missing-field.csv',
    'long-missing-field.csv:3:3: too few fields: found 2, long layout needs 3 (row, column, value)',
  ],
  [
    'mixed-delimiters.csv',
    'mixed-delimiters.csv:3:2: too few fields: found 1, the header has 3 (this line seems to use semicolon as the delimiter instead of comma)',
  ],
  ['nan-text.csv', 'nan-text.csv:2:2: "NaN" is not a finite number; ratings must be finite'],
  ['negative-inf.csv', 'negative-inf.csv:3:2: "-inf" is not a finite number; ratings must be finite'],
  ['no-observed-values.csv', 'no-observed-values.csv:1:1: no observed values: every cell is missing'],
  [
    'not-a-project.rankfill',
    'not-a-project.rankfill:1:1: not a Rankfill project file (format tag missing; expected "rankfill-project")',
  ],
  ['overflow-1e308.csv', 'overflow-1e308.csv:2:3: "1e308" is implausible as a rating (allowed magnitude up to 1e15)'],
  ['ragged-too-few.csv', 'ragged-too-few.csv:3:4: too few fields: found 3, the header has 4'],
  ['ragged-too-many.csv', 'ragged-too-many.csv:3:4: too many fields: found 5, the header has 3'],
  [
    'ragged-values.rankfill',
    'ragged-values.rankfill:12:7: matrix.values[1]: row 2 has 2 values but there are 3 columns',
  ],
  [
    'single-column.csv',
    'single-column.csv:1:1: the header row has only one field (delimiter comma): expected a row-label column and at least one value column',
  ],
  [
    'text-after-quote.csv',
    'text-after-quote.csv:2:1: unexpected text after a closing quote (a quote inside a quoted field must be doubled: "")',
  ],
  ['text-in-numeric.csv', 'text-in-numeric.csv:3:2: "good" is not a number'],
  ['thousands-separator.csv', 'thousands-separator.csv:2:2: "1.234,5" is not a number'],
  [
    'truncated.rankfill',
    'truncated.rankfill:17:3: the project file ends too early (the text ends inside an object); it may be truncated or damaged',
  ],
  [
    'unbalanced-quote.csv',
    'unbalanced-quote.csv:3:1: unbalanced quote: the quote that opens this field is never closed',
  ],
  ['whitespace-only.csv', 'whitespace-only.csv:1:1: file is empty: expected a header row and data rows'],
  [
    'wrong-types.rankfill',
    'wrong-types.rankfill:12:10: matrix.values[1][1]: Invalid input: expected number, received string',
  ],
  [
    'nan-value.rankfill',
    'nan-value.rankfill:12:10: the project file is not valid JSON (NaN is not a JSON value; a missing value is written null); it may be damaged',
  ],
  [
    'infinity-value.rankfill',
    'infinity-value.rankfill:13:15: the project file is not valid JSON (Infinity is not a JSON value); it may be damaged',
  ],
  [
    'trailing-comma.rankfill',
    'trailing-comma.rankfill:14:5: the project file is not valid JSON (a comma before ]: remove the last comma); it may be damaged',
  ],
  [
    'bare-word.rankfill',
    'bare-word.rankfill:20:13: the project file is not valid JSON (unexpected "tasting" where a value should be); it may be damaged',
  ],
  [
    'line-break-in-text.rankfill',
    'line-break-in-text.rankfill:20:20: the project file is not valid JSON (a line break inside a text value (a quote is missing?)); it may be damaged',
  ],
  [
    'outside-scale.rankfill',
    "outside-scale.rankfill:12:10: matrix.values[1][1]: value 99 is outside the project's scale 1 to 9",
  ],
  [
    'bad-date.rankfill',
    'bad-date.rankfill:4:16: createdAt: not a valid time (expected ISO-8601 with a zone, e.g. 2026-01-31T12:00:00.000Z)',
  ],
  [
    'unknown-key.rankfill',
    'unknown-key.rankfill:9:49: matrix.scale.colour: unknown key "colour" (not part of the project format)',
  ],
  [
    'proto-metric.rankfill',
    'proto-metric.rankfill:18:339: runs[0].metrics.__proto__: unknown key "__proto__" (not part of the project format)',
  ],
  [
    'invalid-utf8.rankfill',
    'invalid-utf8.rankfill:20:21: byte 966 is not valid UTF-8 text; the file may be damaged or saved in another encoding',
  ],
  [
    'over-cell-limit.rankfill',
    'over-cell-limit.rankfill:7:18: matrix: 4600 rows × 4600 columns = 21160000 cells; the limit is 20000000 cells',
  ],
];

async function openAny(file: string) {
  const full = path.join(BAD, file);
  return file.endsWith('.rankfill') ? openProjectFile(full) : importDelimitedFile(full);
}

describe('bad-input corpus (test/fixtures/bad)', () => {
  const results: { file: string; message: string; crashed: boolean }[] = [];

  afterAll(() => {
    const crashes = results.filter((r) => r.crashed).length;
    console.log(
      `bad-input corpus: ${results.length} files tried, ${results.filter((r) => !r.crashed).length} refused with a message, crashes: ${crashes}`,
    );
  });

  it('has at least 25 inputs and an expectation for every file', () => {
    const files = readdirSync(BAD).sort();
    expect(files.length).toBeGreaterThanOrEqual(25);
    expect(files).toEqual(EXPECTED.map(([f]) => f).sort());
  });

  it.each(EXPECTED)('%s is refused with a located message', async (file, expected) => {
    let result: Awaited<ReturnType<typeof openAny>> | undefined;
    let crashed = false;
    try {
      result = await openAny(file);
    } catch {
      crashed = true;
    }
    results.push({ file, message: result && !result.ok ? formatProblem(result.problems[0]) : '', crashed });
    expect(crashed).toBe(false);
    expect(result?.ok).toBe(false);
    if (!result || result.ok) return;
    expect(formatProblem(result.problems[0])).toBe(expected);
    for (const p of result.problems) {
      expect(p.file).toBe(file);
      expect(p.line).toBeGreaterThanOrEqual(1);
      expect(p.column).toBeGreaterThanOrEqual(1);
    }
  });
});

describe('generated large inputs', () => {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'rankfill-io-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('a 1 MB single line is refused quickly and politely', async () => {
    const file = path.join(dir, 'one-line.csv');
    writeFileSync(file, 'x'.repeat(1024 * 1024));
    const t0 = performance.now();
    const r = await importDelimitedFile(file);
    const ms = performance.now() - t0;
    expect(r.ok).toBe(false);
    if (!r.ok)
      expect(formatProblem(r.problems[0])).toBe(
        'one-line.csv:1:1: the header row has only one field (delimiter comma): expected a row-label column and at least one value column',
      );
    expect(ms).toBeLessThan(2000); // common practice, no source: a 1 MB line must not stall the app
  });

  it('a 1 MB header line with 200k columns and no data is "header only"', async () => {
    const file = path.join(dir, 'wide-header.csv');
    writeFileSync(file, 'row' + ',c'.repeat(200_000) + '\n');
    const r = await importDelimitedFile(file);
    expect(r.ok).toBe(false);
    if (!r.ok)
      expect(formatProblem(r.problems[0])).toBe('wide-header.csv:1:1: the file has a header row but no data rows');
  });

  it('a file over the 50 MB limit is refused before reading (sparse file)', async () => {
    const file = path.join(dir, 'huge.csv');
    const h = await fs.open(file, 'w');
    await h.truncate(60 * 1024 * 1024);
    await h.close();
    const r = await importDelimitedFile(file);
    expect(r.ok).toBe(false);
    if (!r.ok)
      expect(formatProblem(r.problems[0])).toBe('huge.csv:1:1: file is too large to open (60 MB; the limit is 50 MB)');
  });

  it('the in-memory parser applies the same limit to text', () => {
    const r = parseDelimited('a,b\nx,1\n'.repeat(20), { fileName: 'small-limit.csv', maxBytes: 100 });
    expect(r.ok).toBe(false);
    if (!r.ok)
      expect(formatProblem(r.problems[0])).toBe(
        'small-limit.csv:1:1: file is too large to import (160 bytes; the limit is 100 bytes)',
      );
  });

  it('caps the problem list at 200 with a final "and N more" entry', () => {
    const text = 'row,a\n' + Array.from({ length: 300 }, (_, i) => `r${i},bad`).join('\n');
    const r = parseDelimited(text, { fileName: 'many.csv' });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems).toHaveLength(201);
    expect(r.problems[200].message).toBe('and 100 more problems not shown');
  });
});
