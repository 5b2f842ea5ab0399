/**
 * The Rankfill project file, format version 2 (extension `.rankfill`, UTF-8 JSON).
 *
 * {
 *   "format": "rankfill-project",      // tag: anything else is not our file
 *   "version": 2,                      // integer; files from a newer version are refused,
 *                                      // version 1 files are migrated (projectMigration.ts)
 *   "createdAt": ISO-8601 time, "modifiedAt": ISO-8601 time,
 *   "matrix": {
 *     "rowLabels": [string...], "colLabels": [string...],   // unique, non-empty
 *     "values": [[number|null per column] per row],          // null = missing
 *     "scale": { "min": number, "max": number, "step": number }, // max > min, step ≥ 0 (0 = continuous)
 *     "rowHeader"?: string                                   // title of the row-label column (v2)
 *   },
 *   "settings": model settings (same shape as the API's fit settings) or null,
 *   "runs": [ { "id", "number", "name", "fittedAt", "savedAt", "settings", "metrics": {name: number|null},
 *              "predictions"?: [[number|null per column] per row] } ],
 *            // number: the run's number in the Runs tab ("Run 11"); name: the name the user gave
 *            // it ("" when none); fittedAt: when its Fill finished (v2); savedAt: when it was kept
 *   "notes": string
 * }
 *
 * Values are finite and |x| ≤ 1e15 (the same plausibility limit as the CSV import).
 */
import { z } from 'zod';
import { fitSettingsSchema, scaleSchema } from '../api';

export const PROJECT_FORMAT_TAG = 'rankfill-project';
export const PROJECT_FORMAT_VERSION = 2;
export const PROJECT_FILE_EXTENSION = '.rankfill';

const cell = z.number().finite().min(-1e15).max(1e15).nullable();
/** ISO-8601 date and time with a zone, e.g. 2026-01-31T12:00:00.000Z (what toISOString writes). */
const ISO_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:\d{2})$/;
const isoTime = z
  .string()
  .max(64)
  .refine((s) => ISO_TIME.test(s) && Number.isFinite(Date.parse(s)), {
    message: 'not a valid time (expected ISO-8601 with a zone, e.g. 2026-01-31T12:00:00.000Z)',
  });

const labelList = (what: string) =>
  z.array(z.string().min(1, `${what} label must not be empty`)).superRefine((labels, ctx) => {
    const seen = new Map<string, number>();
    labels.forEach((l, i) => {
      const first = seen.get(l);
      if (first !== undefined) {
        ctx.addIssue({
          code: 'custom',
          path: [i],
          message: `duplicate ${what} label ${JSON.stringify(l)} (also at index ${first})`,
        });
      } else seen.set(l, i);
    });
  });

const gridOf = (rowsPath: string) => z.array(z.array(cell)).describe(rowsPath);

const projectMatrixSchema = z
  .object({
    rowLabels: labelList('row'),
    colLabels: labelList('column'),
    values: gridOf('values'),
    scale: scaleSchema,
    rowHeader: z.string().max(500).optional(),
  })
  .superRefine((m, ctx) => {
    if (m.values.length !== m.rowLabels.length) {
      ctx.addIssue({
        code: 'custom',
        path: ['values'],
        message: `has ${m.values.length} rows but there are ${m.rowLabels.length} row labels`,
      });
      return;
    }
    m.values.forEach((row, i) => {
      if (row.length !== m.colLabels.length) {
        ctx.addIssue({
          code: 'custom',
          path: ['values', i],
          message: `row ${i + 1} has ${row.length} values but there are ${m.colLabels.length} columns`,
        });
      }
    });
    // Observed values lie on the project's own scale (as the window enforces on entry).
    const { min, max } = m.scale;
    if (!(max > min)) return; // reported by the scale schema
    let outside = 0;
    for (let i = 0; i < m.values.length && outside < 10; i++) {
      const row = m.values[i];
      for (let j = 0; j < row.length && outside < 10; j++) {
        const x = row[j];
        if (x !== null && (x < min || x > max)) {
          outside++;
          ctx.addIssue({
            code: 'custom',
            path: ['values', i, j],
            message: `value ${x} is outside the project's scale ${min} to ${max}`,
          });
        }
      }
    }
  });

const savedRunSchema = z.object({
  id: z.string().min(1).max(200),
  number: z.number().int().min(1).max(1_000_000),
  name: z.string().max(500),
  fittedAt: isoTime,
  savedAt: isoTime,
  settings: fitSettingsSchema,
  metrics: z.record(z.string(), z.number().nullable()),
  predictions: z.array(z.array(z.number().nullable())).optional(),
});

export const projectFileSchema = z
  .object({
    format: z.literal(PROJECT_FORMAT_TAG),
    version: z.literal(PROJECT_FORMAT_VERSION),
    createdAt: isoTime,
    modifiedAt: isoTime,
    matrix: projectMatrixSchema,
    settings: fitSettingsSchema.nullable(),
    runs: z.array(savedRunSchema),
    notes: z.string(),
  })
  .superRefine((p, ctx) => {
    p.runs.forEach((run, k) => {
      if (!run.predictions) return;
      if (
        run.predictions.length !== p.matrix.rowLabels.length ||
        run.predictions.some((r) => r.length !== p.matrix.colLabels.length)
      ) {
        ctx.addIssue({
          code: 'custom',
          path: ['runs', k, 'predictions'],
          message: 'predictions do not match the matrix size',
        });
      }
    });
  });

export type ProjectFile = z.infer<typeof projectFileSchema>;
