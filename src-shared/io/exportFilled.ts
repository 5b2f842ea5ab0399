/**
 * Exports of a completed matrix, and the settings sidecar that records how it
 * was made. Observed ratings are always written exactly as they are; rounding
 * options touch filled values only. Filled values are model estimates: the wide
 * exports say so in their corner cell, the long export marks every record's
 * source, and the sidecar states it in words.
 */
import type { FitResult, FitSettings } from '../engine/types';
import type { IntervalsAtLevel } from '../engine/cellIntervals';
import type { RatingMatrix } from '../matrix/ratingMatrix';
import type { Delimiter } from './detectDelimiter';
import { textField, writeFilledLongCsv, writeWideCsv } from './writeDelimited';

export type ExportKind = 'filled-wide' | 'estimates-wide' | 'long';

export interface ExportOptions {
  kind: ExportKind;
  /** Snap filled values to the scale's step. */
  roundToStep: boolean;
  /** Round filled values to this many decimals (null = full precision). */
  decimals: number | null;
  delimiter: Delimiter;
  /**
   * Labels that a spreadsheet would run as a formula (starting with = + - @, tab or CR)
   * get a leading apostrophe (default true; OWASP, "CSV Injection"; see writeDelimited.ts).
   */
  formulaGuard?: boolean;
}

/** The two halves of the caution, also shown apart (study report); ESTIMATE_CAUTION is both, as exported. */
export const MODEL_ESTIMATE_CAUTION =
  'Filled values are model estimates computed from the other ratings, not measurements.';
export const PEOPLE_JUDGED_CAUTION =
  'Where rows or columns are people being judged (grades, hiring or award panels), a filled value is not that person’s score: ' +
  'follow your organisation’s own rules and review.';
export const ESTIMATE_CAUTION = `${MODEL_ESTIMATE_CAUTION} ${PEOPLE_JUDGED_CAUTION}`;

const CORNER_LABEL: Record<Exclude<ExportKind, 'long'>, string> = {
  'filled-wide': 'row \\ column (blank cells filled with model estimates)',
  'estimates-wide': 'row \\ column (model estimates only; observed cells left blank)',
};

/** A filled value as exported: clipped results from the fit, then the chosen rounding. */
export function exportedEstimate(
  x: number,
  matrix: RatingMatrix,
  opts: Pick<ExportOptions, 'roundToStep' | 'decimals'>,
): number {
  if (!opts.roundToStep && opts.decimals === null) return x;
  let v = x;
  const { min, max, step } = matrix.scale;
  if (opts.roundToStep && step > 0) v = Math.min(max, Math.max(min, min + Math.round((v - min) / step) * step));
  if (opts.decimals !== null) {
    const f = 10 ** opts.decimals;
    v = Math.round(v * f) / f;
  }
  // Remove float noise from the step arithmetic (e.g. 3.5000000000000004).
  return Number(v.toPrecision(12));
}

function roundTo(x: number, decimals: number): number {
  const f = 10 ** decimals;
  return Number((Math.round(x * f) / f).toPrecision(12));
}

/** Interval bounds of a run's cells (row-major, NaN on observed cells), written by the long layout. */
export interface ExportIntervals {
  lower: ArrayLike<number>;
  upper: ArrayLike<number>;
}

export function buildExport(
  matrix: RatingMatrix,
  result: FitResult,
  spread: ArrayLike<number> | undefined,
  opts: ExportOptions,
  intervals?: ExportIntervals,
): string {
  const cols = matrix.colLabels.length;
  if (result.rows !== matrix.rowLabels.length || result.cols !== cols) {
    throw new Error('the run does not match the matrix shape; fill again before exporting');
  }
  const estimate = (i: number, j: number) => exportedEstimate(result.predictions[i * cols + j], matrix, opts);
  if (opts.kind === 'long') {
    const predictions = new Float64Array(result.predictions.length);
    for (let c = 0; c < predictions.length; c++) predictions[c] = estimate(Math.floor(c / cols), c % cols);
    // Baseline and spread are model output too: the decimals asked for apply to them.
    const rounded = (a: ArrayLike<number> | undefined) =>
      a === undefined || opts.decimals === null ? a : Float64Array.from(a, (x) => roundTo(x, opts.decimals!));
    return writeFilledLongCsv(
      matrix,
      {
        predictions,
        baseline: rounded(result.baseline),
        spread: rounded(spread),
        ...(intervals ? { lower: rounded(intervals.lower), upper: rounded(intervals.upper) } : {}),
      },
      { delimiter: opts.delimiter, formulaGuard: opts.formulaGuard ?? true },
    );
  }
  const onlyEstimates = opts.kind === 'estimates-wide';
  return writeWideCsv(matrix, {
    delimiter: opts.delimiter,
    formulaGuard: opts.formulaGuard ?? true,
    cornerLabel: CORNER_LABEL[opts.kind],
    layer: (i, j) => {
      const y = matrix.values[i * cols + j];
      if (y === y) return onlyEstimates ? undefined : y;
      return estimate(i, j);
    },
  });
}

/** Corner text of the companion mask file. */
const MASK_CORNER_LABEL = 'row \\ column (observed = rating as entered, filled = model estimate)';

/**
 * Companion mask of a wide export: the same rows and columns, each cell `observed` or
 * `filled`, so a reader of the wide file knows per cell which values are estimates.
 */
export function buildMask(
  matrix: RatingMatrix,
  delimiter: Delimiter,
  lineEnding: '\r\n' | '\n' = '\r\n',
  formulaGuard = true,
): string {
  const d = delimiter;
  const cols = matrix.colLabels.length;
  const out = [[MASK_CORNER_LABEL, ...matrix.colLabels].map((s) => textField(s, d, formulaGuard)).join(d)];
  for (let i = 0; i < matrix.rowLabels.length; i++) {
    const parts = [textField(matrix.rowLabels[i], d, formulaGuard)];
    for (let j = 0; j < cols; j++) {
      const y = matrix.values[i * cols + j];
      parts.push(y === y ? 'observed' : 'filled');
    }
    out.push(parts.join(d));
  }
  return out.join(lineEnding) + lineEnding;
}

/** Canonical text of a matrix for hashing: labels, scale and values, independent of file format. */
export function matrixFingerprintText(matrix: RatingMatrix): string {
  const parts = [
    JSON.stringify(matrix.rowLabels),
    JSON.stringify(matrix.colLabels),
    JSON.stringify(matrix.scale),
    Array.from(matrix.values, (v) => (v === v ? String(v) : '')).join(','),
  ];
  return parts.join('\n');
}

export interface SidecarIntervals {
  level: number;
  method: string;
  scaleFrom: string;
  meaning: string;
  boundsInclusive: true;
  clippedToScale: true;
  /** Measured on the held-out folds: each fold's cells against a quantile from the other folds. */
  heldOutCoverage: number | null;
  heldOutMeanWidth: number | null;
  folds: { n: number; coverage: number | null; meanWidth: number | null }[];
  constantWidth: { coverage: number | null; meanWidth: number | null };
}

const finite = (x: number): number | null => (Number.isFinite(x) ? x : null);

/** What the sidecar records about a run's intervals at its level. */
export function sidecarIntervals(iv: IntervalsAtLevel): SidecarIntervals {
  return {
    level: iv.level,
    method: iv.method,
    scaleFrom: iv.scaleSource,
    meaning:
      `Each filled cell's interval is meant to hold the true rating in ${Math.round(iv.level * 100)} % of cells like the held-out ones, ` +
      'on average over cells, not for each cell. Bounds are inclusive and clipped to the scale.',
    boundsInclusive: true,
    clippedToScale: true,
    heldOutCoverage: finite(iv.heldOut.coverage),
    heldOutMeanWidth: finite(iv.heldOut.meanWidth),
    folds: iv.heldOut.folds.map((f) => ({ n: f.n, coverage: finite(f.coverage), meanWidth: finite(f.meanWidth) })),
    constantWidth: { coverage: finite(iv.constantWidth.coverage), meanWidth: finite(iv.constantWidth.meanWidth) },
  };
}

export interface SidecarInput {
  app: { name: string; version: string };
  exportedAt: Date;
  file: string;
  options: ExportOptions;
  document: { title: string; rows: number; cols: number; observed: number; filled: number };
  settings: FitSettings;
  run: { iterations: number; converged: boolean; finalObjective: number | null; refitsAfterEdits: number };
  metrics: {
    folds: number;
    seed: number;
    meanRmse: number | null;
    sdRmse: number | null;
    meanMae: number | null;
    sdMae: number | null;
  } | null;
  /** The run's intervals, when it has them (see sidecarIntervals). */
  intervals?: SidecarIntervals;
  /** SHA-256 of matrixFingerprintText(matrix), hex. */
  inputSha256: string;
}

export function buildSidecar(s: SidecarInput): string {
  return (
    JSON.stringify(
      {
        format: 'rankfill-export-settings',
        formatVersion: 1,
        caution: ESTIMATE_CAUTION,
        app: s.app,
        exportedAt: s.exportedAt.toISOString(),
        file: s.file,
        export: s.options,
        input: { ...s.document, sha256: s.inputSha256, hashOf: 'labels, scale and values (see matrixFingerprintText)' },
        model: { family: s.settings.model, settings: s.settings, seed: s.settings.seed },
        run: s.run,
        crossValidation: s.metrics,
        ...(s.intervals ? { intervals: s.intervals } : {}),
      },
      null,
      2,
    ) + '\n'
  );
}
