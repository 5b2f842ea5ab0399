/**
 * Wide layout: the header row holds column labels (its first field, the corner, is
 * ignored); each following record is a row label then one value per column.
 * Ragged records, empty or duplicate labels and bad values are problems; empty
 * fields after the last column, and unlabelled columns without values, are dropped
 * with a warning.
 */
import type { Delimiter } from './detectDelimiter';
import { delimiterName } from './detectDelimiter';
import { parseCellValue } from './parseCellValue';
import type { ProblemCollector } from './problem';
import type { RawRecord } from './tokenizeDelimited';
import { checkCells, EMPTY_SCALE, otherDelimiterHint, show, type Built, type ValueRefusal } from './importCommon';

export function buildWide(
  records: RawRecord[],
  decimalComma: boolean,
  isMissing: (s: string) => boolean,
  problems: ProblemCollector,
  warnings: ProblemCollector,
  delimiter: Delimiter,
  refuse?: ValueRefusal,
): Built | undefined {
  const header = records[0];
  const width = header.fields.length;
  if (width < 2) {
    problems.add(
      header.line,
      1,
      `the header row has only one field (delimiter ${delimiterName(delimiter)}): expected a row-label column and at least one value column`,
    );
    return undefined;
  }
  if (records.length === 1) {
    problems.add(header.line, 1, 'the file has a header row but no data rows');
    return undefined;
  }
  const nCols = width - 1;
  const colLabels = header.fields.slice(1);
  const colSeen = new Map<string, number>();
  const emptyLabelCols: number[] = [];
  for (let j = 0; j < nCols; j++) {
    const label = colLabels[j];
    if (label === '') {
      emptyLabelCols.push(j);
      continue;
    }
    const first = colSeen.get(label);
    if (first !== undefined) {
      problems.add(header.lines[j + 1], j + 2, `duplicate column label ${show(label)} (also in field ${first + 2})`);
    } else colSeen.set(label, j);
  }

  const nRows = records.length - 1;
  if (!checkCells(nRows, nCols, problems)) return undefined;
  const values = new Float64Array(nRows * nCols).fill(NaN);
  const colHasValue = new Uint8Array(nCols);
  const rowLabels: string[] = new Array(nRows);
  const rowSeen = new Map<string, number>();
  let trailingIgnored = 0;
  for (let r = 0; r < nRows; r++) {
    const rec = records[r + 1];
    const f = rec.fields;
    const label = f[0];
    rowLabels[r] = label;
    if (label === '') {
      problems.add(rec.line, 1, 'empty row label');
    } else {
      const first = rowSeen.get(label);
      if (first !== undefined) problems.add(rec.line, 1, `duplicate row label ${show(label)} (first on line ${first})`);
      else rowSeen.set(label, rec.line);
    }
    if (f.length < width) {
      problems.add(
        rec.lines[f.length - 1],
        f.length + 1,
        `too few fields: found ${f.length}, the header has ${width}${otherDelimiterHint(rec, delimiter, width)}`,
      );
    } else if (f.length > width) {
      let extraEmpty = true;
      for (let j = width; j < f.length; j++) if (f[j] !== '' || rec.quoted[j]) extraEmpty = false;
      if (extraEmpty) trailingIgnored++;
      else problems.add(rec.lines[width], width + 1, `too many fields: found ${f.length}, the header has ${width}`);
    }
    const m = Math.min(f.length, width);
    for (let j = 1; j < m; j++) {
      const v = parseCellValue(f[j], decimalComma, isMissing);
      const refusal = v.kind === 'number' && refuse ? refuse(v.value, f[j].trim()) : undefined;
      if (refusal !== undefined) problems.add(rec.lines[j], j + 1, refusal);
      else if (v.kind === 'number') {
        values[r * nCols + j - 1] = v.value;
        colHasValue[j - 1] = 1;
      } else if (v.kind === 'error') problems.add(rec.lines[j], j + 1, v.message);
    }
  }
  if (trailingIgnored > 0) {
    warnings.add(
      records[1].line,
      width + 1,
      `ignored empty fields after the last column on ${trailingIgnored} line(s)`,
    );
  }
  // Unlabelled columns: dropped with a warning when they hold no values, a problem otherwise.
  const drop = new Set<number>();
  for (const j of emptyLabelCols) {
    if (colHasValue[j]) problems.add(header.lines[j + 1], j + 2, 'empty column label for a column that holds values');
    else {
      drop.add(j);
      warnings.add(header.lines[j + 1], j + 2, 'ignored a column with an empty label and no values');
    }
  }
  if (problems.count > 0) return undefined;
  if (drop.size === 0) {
    return {
      matrix: { rowLabels, colLabels, values, scale: { ...EMPTY_SCALE } },
      duplicatePairs: 0,
      rowHeader: header.fields[0],
    };
  }
  const keep: number[] = [];
  for (let j = 0; j < nCols; j++) if (!drop.has(j)) keep.push(j);
  if (keep.length === 0) {
    problems.add(header.line, 2, 'no labelled value columns');
    return undefined;
  }
  const packed = new Float64Array(nRows * keep.length);
  for (let r = 0; r < nRows; r++)
    for (let k = 0; k < keep.length; k++) packed[r * keep.length + k] = values[r * nCols + keep[k]];
  return {
    matrix: { rowLabels, colLabels: keep.map((j) => colLabels[j]), values: packed, scale: { ...EMPTY_SCALE } },
    duplicatePairs: 0,
    rowHeader: header.fields[0],
  };
}
