/**
 * Long layout: records `row, column, value` pivoted into a matrix (rows and columns
 * in order of first appearance); see parseDelimited.ts for the duplicate policies.
 */
import type { Delimiter } from './detectDelimiter';
import { parseCellValue } from './parseCellValue';
import type { ProblemCollector } from './problem';
import type { RawRecord } from './tokenizeDelimited';
import { checkCells, EMPTY_SCALE, otherDelimiterHint, show, type Built, type ValueRefusal } from './importCommon';
import type { DuplicatePolicy } from './parseDelimited';

export function buildLong(
  records: RawRecord[],
  decimalComma: boolean,
  isMissing: (s: string) => boolean,
  policy: DuplicatePolicy,
  problems: ProblemCollector,
  warnings: ProblemCollector,
  delimiter: Delimiter,
  refuse?: ValueRefusal,
): Built | undefined {
  const first = records[0];
  if (first.fields.length < 3) {
    problems.add(
      first.line,
      first.fields.length + 1,
      `long layout needs 3 fields (row, column, value); found ${first.fields.length}${otherDelimiterHint(first, delimiter, 3)}`,
    );
    return undefined;
  }
  const third = parseCellValue(first.fields[2], decimalComma, isMissing);
  const hasHeader = third.kind === 'error';
  const width = first.fields.length;
  const startRec = hasHeader ? 1 : 0;
  if (hasHeader && records.length === 1) {
    problems.add(first.line, 1, 'the file has a header row but no data rows');
    return undefined;
  }
  if (width > 3) {
    warnings.add(
      first.line,
      4,
      `long layout uses the first 3 fields (row, column, value); ignored ${width - 3} more field(s) per line`,
    );
  }
  const rowIndex = new Map<string, number>();
  const colIndex = new Map<string, number>();
  const rowLabels: string[] = [];
  const colLabels: string[] = [];
  const n = records.length - startRec;
  const entryRow = new Int32Array(n);
  const entryCol = new Int32Array(n);
  const entryVal = new Float64Array(n).fill(NaN);
  for (let k = 0; k < n; k++) {
    const rec = records[k + startRec];
    const f = rec.fields;
    entryRow[k] = -1;
    if (f.length < 3) {
      problems.add(
        rec.lines[f.length - 1],
        f.length + 1,
        `too few fields: found ${f.length}, long layout needs 3 (row, column, value)${otherDelimiterHint(rec, delimiter, 3)}`,
      );
      continue;
    }
    if (f.length > width) {
      problems.add(rec.lines[width], width + 1, `too many fields: found ${f.length}, expected ${width}`);
      continue;
    }
    let bad = false;
    if (f[0] === '') {
      problems.add(rec.lines[0], 1, 'empty row label');
      bad = true;
    }
    if (f[1] === '') {
      problems.add(rec.lines[1], 2, 'empty column label');
      bad = true;
    }
    const v = parseCellValue(f[2], decimalComma, isMissing);
    const refusal = v.kind === 'number' && refuse ? refuse(v.value, f[2].trim()) : undefined;
    if (v.kind === 'error' || refusal !== undefined) {
      problems.add(rec.lines[2], 3, v.kind === 'error' ? v.message : refusal!);
      bad = true;
    }
    if (bad) continue;
    let ri = rowIndex.get(f[0]);
    if (ri === undefined) {
      ri = rowLabels.length;
      rowIndex.set(f[0], ri);
      rowLabels.push(f[0]);
    }
    let ci = colIndex.get(f[1]);
    if (ci === undefined) {
      ci = colLabels.length;
      colIndex.set(f[1], ci);
      colLabels.push(f[1]);
    }
    entryRow[k] = ri;
    entryCol[k] = ci;
    if (v.kind === 'number') entryVal[k] = v.value;
  }
  if (problems.count > 0) return undefined;
  const nRows = rowLabels.length;
  const nCols = colLabels.length;
  if (nRows === 0) {
    problems.add(first.line, 1, 'no data rows');
    return undefined;
  }
  if (!checkCells(nRows, nCols, problems)) return undefined;
  const values = new Float64Array(nRows * nCols).fill(NaN);
  // Record index (k + 1; 0 = none) of the first value given for each cell.
  const firstEntry = new Int32Array(nRows * nCols);
  let counts: Map<number, number> | undefined;
  let duplicatePairs = 0;
  for (let k = 0; k < n; k++) {
    const x = entryVal[k];
    if (entryRow[k] < 0 || x !== x) continue;
    const cell = entryRow[k] * nCols + entryCol[k];
    const prev = firstEntry[cell];
    if (prev === 0) {
      firstEntry[cell] = k + 1;
      values[cell] = x;
      continue;
    }
    const rec = records[k + startRec];
    const firstLine = records[prev - 1 + startRec].line;
    const pair = `(row ${show(rowLabels[entryRow[k]])}, column ${show(colLabels[entryCol[k]])})`;
    counts ??= new Map();
    const c = counts.get(cell);
    if (c === undefined) duplicatePairs++;
    if (policy === 'refuse') {
      problems.add(
        rec.line,
        1,
        `duplicate pair ${pair}: first given on line ${firstLine}; choose keep last or average to merge (on the command line: --duplicates last or --duplicates average)`,
      );
      counts.set(cell, (c ?? 1) + 1);
    } else if (policy === 'last') {
      values[cell] = x;
      counts.set(cell, (c ?? 1) + 1);
      warnings.add(rec.line, 1, `duplicate pair ${pair}: first given on line ${firstLine}; kept the last value`);
    } else {
      // Running mean: values[cell] holds the mean of the c values seen so far.
      const cnt = (c ?? 1) + 1;
      values[cell] += (x - values[cell]) / cnt;
      counts.set(cell, cnt);
      warnings.add(rec.line, 1, `duplicate pair ${pair}: first given on line ${firstLine}; averaged`);
    }
  }
  if (problems.count > 0) return undefined;
  return {
    matrix: { rowLabels, colLabels, values, scale: { ...EMPTY_SCALE } },
    duplicatePairs,
    ...(hasHeader ? { rowHeader: first.fields[0] } : {}),
  };
}
