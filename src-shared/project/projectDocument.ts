/**
 * The in-memory project: what the app edits and saves. Numbers live in typed
 * arrays (NaN = missing); the file form (projectSchema.ts) uses nested arrays with null.
 */
import type { FitSettings } from '../engine/types';
import type { RatingMatrix } from '../matrix/ratingMatrix';

export interface SavedRun {
  id: string;
  /** The run's number in the Runs tab ("Run 11"). */
  number: number;
  /** The name the user gave the run; "" when none. */
  name: string;
  /** ISO-8601 time the run's Fill finished. */
  fittedAt: string;
  /** ISO-8601 time the run was saved. */
  savedAt: string;
  settings: FitSettings;
  /** Named figures (e.g. held-out RMSE); null where not available. */
  metrics: Record<string, number | null>;
  /** Row-major predictions, NaN where none; optional (omitted to keep files small). */
  predictions?: Float64Array;
}

export interface ProjectDocument {
  matrix: RatingMatrix;
  /** Current model settings, or null when none chosen yet. */
  settings: FitSettings | null;
  runs: SavedRun[];
  notes: string;
  /** ISO-8601 times. */
  createdAt: string;
  modifiedAt: string;
}

export function newProjectDocument(matrix: RatingMatrix, now: Date = new Date()): ProjectDocument {
  const t = now.toISOString();
  return { matrix, settings: null, runs: [], notes: '', createdAt: t, modifiedAt: t };
}
