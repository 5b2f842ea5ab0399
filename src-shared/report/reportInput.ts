/**
 * What the study report is made from: plain data gathered by the window or the
 * command line. The builder (buildReport.ts) turns it into one HTML string and
 * never computes a fit itself.
 */
import type { TunePayload } from '../api';
import type { FitSettings } from '../engine/types';
import type { RatingMatrix } from '../matrix/ratingMatrix';

interface ReportRun {
  /** e.g. "Run 3" or "saved run run-2". */
  label: string;
  settings: FitSettings;
  iterations: number;
  converged: boolean;
  finalObjective: number | null;
  /** Objective (low-rank) or log-likelihood (Gaussian) per iteration. */
  objectiveTrace: number[];
  /** Live refits after edits since the Fill (window only). */
  refitsAfterEdits: number;
}

export interface ReportExport {
  path: string;
  sidecarPath: string | null;
  /** ISO-8601 time. */
  writtenAt: string;
}

/**
 * Prediction intervals for the filled cells, when the run carries them. Rendered as an
 * extra section (between "how well it fills" and the cautions) only when present.
 */
export interface ReportIntervals {
  /** Plain-words name of the method, e.g. "split-conformal intervals". */
  method: string;
  /** Published sources of the method, as full reference lines. */
  sources: string[];
  /** Short citation for the methods paragraph, e.g. "Author & Author, 2005". */
  citation?: string;
  /** Nominal coverage, e.g. 0.9. */
  level: number;
  /** Share of held-out observed cells that fell inside their interval (null when not checked). */
  coverage: number | null;
  /** Mean interval width in rating units (null when unknown). */
  meanWidth: number | null;
  /** One more sentence in plain words, optional. */
  note?: string;
}

export interface ReportInput {
  /** The document's title (sample name, file name or project name). */
  title: string;
  /** Where the data came from, in words or as a path (optional). */
  source?: string;
  app: { name: string; version: string };
  /** ISO-8601 time the report was made. */
  createdAt: string;
  matrix: RatingMatrix;
  /** SHA-256 (hex) of matrixFingerprintText(matrix), the same hash as the export's settings file. */
  inputSha256: string;
  run: ReportRun;
  /**
   * Cross-validation of the run's settings and of the baselines alone on the same folds:
   * the table's rows in the order of reportEvaluationSettings(run.settings). Null when
   * it could not be computed (the report says so).
   */
  evaluation: TunePayload | null;
  /** The centering comparison (four modes, same folds), when it was run on this data. */
  centering: TunePayload | null;
  /** The tuning grid, when it was run on this data. */
  tuning: TunePayload | null;
  intervals?: ReportIntervals | null;
  /** Set when the settings were chosen automatically (no model options given), as `fill` does. */
  choice?: {
    reason: string;
    folds: number;
    candidates: number | null;
    meanRmse: number | null;
    baselineMeanRmse: number | null;
  } | null;
  /** Exports written from this run, oldest first. */
  exports: ReportExport[];
  /** Where the report itself is written (optional). */
  reportPath?: string;
}
