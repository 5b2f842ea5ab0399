/**
 * The one contract between the renderer and the main side.
 *
 * Every request, reply and event is described by a zod schema here; both hosts
 * (Electron IPC and the loopback HTTP host) validate requests and replies with
 * these schemas through the same router, and the renderer's bridge validates
 * replies and events again on arrival. Numbers cross the boundary as JSON, so a
 * missing cell travels as `null` (never NaN, never 0).
 */
import { parseCommand } from './commands';
import { MAX_CELLS } from './io/importCommon';
import { z } from 'zod';

/** Bumped when the contract changes incompatibly. */
export const API_VERSION = 1;

// ---------------------------------------------------------------------------
// Building blocks
// ---------------------------------------------------------------------------

export const scaleSchema = z
  .object({
    min: z.number().finite(),
    max: z.number().finite(),
    step: z.number().finite().min(0),
  })
  .refine((s) => s.max > s.min, { message: 'scale maximum must be greater than its minimum' });

/** A rating matrix on the wire: row-major values, null = missing. */
const matrixPayloadSchema = z
  .object({
    rowLabels: z.array(z.string()),
    colLabels: z.array(z.string()),
    values: z.array(z.number().finite().nullable()),
    scale: scaleSchema,
    /** Title of the row-label column, when the file gave one. */
    rowHeader: z.string().max(500).optional(),
  })
  .refine((m) => m.rowLabels.length * m.colLabels.length <= MAX_CELLS, {
    message: `matrix has more than ${MAX_CELLS} cells`,
  })
  .refine((m) => m.values.length === m.rowLabels.length * m.colLabels.length, {
    message: 'values length must equal rows × columns',
  });
export type MatrixPayload = z.infer<typeof matrixPayloadSchema>;

const centeringSchema = z.enum(['none', 'row', 'column', 'both']);

const lowRankSettingsSchema = z.object({
  model: z.literal('lowrank'),
  rank: z.number().int().min(0).max(200),
  lambda: z.number().finite().min(0),
  centering: centeringSchema,
  scaleLambdaByCount: z.boolean(),
  maxIterations: z.number().int().min(1).max(100_000),
  tolerance: z.number().finite().min(0),
  seed: z.number().int(),
  init: z.enum(['spectral', 'random']),
  offsetLambda: z.number().finite().min(0),
  clipToScale: z.boolean(),
  snapToStep: z.boolean(),
});

const gaussianSettingsSchema = z.object({
  model: z.literal('gaussian'),
  shrinkage: z.number().finite().min(0).lt(1),
  transpose: z.boolean(),
  maxIterations: z.number().int().min(1).max(100_000),
  tolerance: z.number().finite().min(0),
  seed: z.number().int(),
  clipToScale: z.boolean(),
  snapToStep: z.boolean(),
});

export const fitSettingsSchema = z.discriminatedUnion('model', [lowRankSettingsSchema, gaussianSettingsSchema]);

/** Numbers that may be NaN on the main side travel as null. */
const nullableNumbers = z.array(z.number().nullable());

const fitResultPayloadSchema = z.object({
  settings: fitSettingsSchema,
  rows: z.number().int().min(0),
  cols: z.number().int().min(0),
  predictions: nullableNumbers,
  baseline: nullableNumbers,
  rowBaseline: nullableNumbers,
  colBaseline: nullableNumbers,
  globalMean: z.number().nullable(),
  rowFactors: nullableNumbers,
  colFactors: nullableNumbers,
  rank: z.number().int().min(0),
  objectiveTrace: nullableNumbers,
  iterations: z.number().int().min(0),
  converged: z.boolean(),
  elapsedMs: z.number(),
  spread: nullableNumbers.optional(),
  covariance: nullableNumbers.optional(),
});
export type FitResultPayload = z.infer<typeof fitResultPayloadSchema>;

const trustRequestSchema = z.discriminatedUnion('method', [
  z.object({ method: z.literal('folds'), k: z.number().int().min(2).max(20) }),
  z.object({ method: z.literal('bootstrap'), B: z.number().int().min(2).max(200) }),
]);

/** Calibration of a fit's intervals (engine/cellIntervals.ts): held-out cells and σ̂ per cell. */
const intervalCalibrationPayloadSchema = z.object({
  method: z.literal('cross-validated normalized conformal'),
  scaleSource: z.enum(['conditional sd', 'error model']),
  coefficients: z.array(z.number()),
  k: z.number().int().min(2),
  fold: z.array(z.number().int()),
  estimate: nullableNumbers,
  observed: z.array(z.number()),
  sigma: nullableNumbers,
  errorScale: nullableNumbers,
});
export type IntervalCalibrationPayload = z.infer<typeof intervalCalibrationPayloadSchema>;

/** Per-cell trust of a fit: ensemble spread and support; weak rows/columns have fewer observations than the rank. */
const trustPayloadSchema = z.object({
  spread: nullableNumbers,
  rowSupport: z.array(z.number().int()),
  colSupport: z.array(z.number().int()),
  weakRows: z.array(z.number().int()),
  weakCols: z.array(z.number().int()),
  intervals: intervalCalibrationPayloadSchema.optional(),
});
export type TrustPayload = z.infer<typeof trustPayloadSchema>;

const foldScoreSchema = z.object({ rmse: z.number().nullable(), mae: z.number().nullable(), n: z.number().int() });

const crossValidationPayloadSchema = z.object({
  folds: z.array(foldScoreSchema),
  meanRmse: z.number().nullable(),
  sdRmse: z.number().nullable(),
  meanMae: z.number().nullable(),
  sdMae: z.number().nullable(),
});
export type CrossValidationPayload = z.infer<typeof crossValidationPayloadSchema>;

const tuneRowPayloadSchema = crossValidationPayloadSchema.extend({
  settings: fitSettingsSchema,
  error: z.string().optional(),
});

const tunePayloadSchema = z.object({
  k: z.number().int(),
  seed: z.number().int(),
  table: z.array(tuneRowPayloadSchema),
  bestIndex: z.number().int(),
  oneStandardErrorIndex: z.number().int(),
  threshold: z.number().nullable(),
});
export type TunePayload = z.infer<typeof tunePayloadSchema>;

const sampleInfoSchema = z.object({
  id: z.string(),
  title: z.string(),
  description: z.string(),
  scale: scaleSchema,
});
export type SampleInfo = z.infer<typeof sampleInfoSchema>;

const problemSchema = z.object({
  file: z.string(),
  line: z.number().int(),
  column: z.number().int(),
  message: z.string(),
});

const documentPayloadSchema = z.object({
  /** Where the document came from: a sample id, a file path, or an uploaded file name. */
  source: z.object({ kind: z.enum(['sample', 'file', 'upload', 'new']), name: z.string() }),
  title: z.string(),
  matrix: matrixPayloadSchema,
  warnings: z.array(problemSchema),
});
export type DocumentPayload = z.infer<typeof documentPayloadSchema>;

// --- documents and projects (issue 4): building blocks ---

/** What the import preview shows besides the matrix. */
const importInfoSchema = z.object({
  delimiter: z.enum([',', '\t', ';']),
  layout: z.enum(['wide', 'long']),
  decimalComma: z.boolean(),
  hadBom: z.boolean(),
  rows: z.number().int(),
  cols: z.number().int(),
  observed: z.number().int(),
  detectedScale: z.object({ min: z.number(), max: z.number(), step: z.number() }),
  duplicatePairs: z.number().int(),
  lines: z.number().int(),
  rowHeader: z.string().optional(),
  /** Whether the matrix's scale was given in the preview or guessed from the values. */
  scaleSource: z.enum(['given', 'guessed']).optional(),
  /** True when the parse ran in a worker thread. */
  offThread: z.boolean(),
});

const recoveryId = z.string().regex(/^[A-Za-z0-9_-]{1,100}$/);

const recoveryEntrySchema = z.object({
  id: z.string(),
  title: z.string(),
  sourcePath: z.string().nullable(),
  savedAt: z.string(),
  bytes: z.number().int(),
});
export type RecoveryEntryPayload = z.infer<typeof recoveryEntrySchema>;

// ---------------------------------------------------------------------------
// Requests and replies, one entry per method
// ---------------------------------------------------------------------------

const empty = z.object({}).strict();
const jobId = z.string().min(1).max(100);
/** A job id the page chooses itself (the job is then `fit:<id>` or `eval:<id>`), so it can follow events before the reply. */
const clientJobId = z.string().regex(/^[A-Za-z0-9_-]{1,60}$/);

export const apiMethods = {
  /** Who answers, and under which host. */
  'app.info': {
    request: empty,
    reply: z.object({
      name: z.string(),
      version: z.string(),
      apiVersion: z.number().int(),
      host: z.enum(['electron', 'browser']),
    }),
  },
  /** The invented demo matrices shipped in samples/. */
  'samples.list': {
    request: empty,
    reply: z.object({ samples: z.array(sampleInfoSchema) }),
  },
  'samples.open': {
    request: z.object({ id: z.string().min(1).max(200) }).strict(),
    reply: documentPayloadSchema,
  },
  // --- documents and projects (issue 4) ---
  /**
   * Parse delimited text (off the UI thread where the host allows) and answer with
   * what an import would open, for the import preview: size, observed count,
   * detected delimiter/layout/scale, warnings, or every problem. Nothing is opened.
   */
  'document.previewImport': {
    request: z
      .object({
        fileName: z.string().min(1).max(1000),
        text: z.string(),
        layout: z.enum(['auto', 'wide', 'long']).optional(),
        delimiter: z.enum(['auto', ',', '\t', ';']).optional(),
        decimalComma: z.union([z.literal('auto'), z.boolean()]).optional(),
        missingTokens: z.array(z.string().max(20)).max(50).optional(),
        duplicates: z.enum(['refuse', 'last', 'average']).optional(),
        /** The scale set in the preview; values outside it or between its steps are problems. */
        scale: scaleSchema.optional(),
        /** Long layout: columns as read (first appearance) or sorted by label. */
        columnOrder: z.enum(['as-read', 'sorted']).optional(),
      })
      .strict(),
    reply: z.union([
      z.object({ ok: z.literal(true), document: documentPayloadSchema, info: importInfoSchema }),
      z.object({ ok: z.literal(false), problems: z.array(problemSchema) }),
    ]),
  },
  /** Read and validate a project file (never partly loaded); answers with its JSON text. */
  'project.open': {
    request: z.object({ path: z.string().min(1).max(4096) }).strict(),
    reply: z.union([
      z.object({ ok: z.literal(true), path: z.string(), projectText: z.string() }),
      z.object({ ok: z.literal(false), problems: z.array(problemSchema) }),
    ]),
  },
  /** Validate and save a project atomically (temporary file, flush, rename; previous version kept as .bak). */
  'project.save': {
    request: z.object({ path: z.string().min(1).max(4096), projectText: z.string() }).strict(),
    reply: z.union([
      z.object({ ok: z.literal(true), path: z.string(), bytes: z.number().int() }),
      z.object({ ok: z.literal(false), problems: z.array(problemSchema) }),
    ]),
  },
  /** A native file dialog (Electron); the browser host answers `supported: false` and the page asks itself. */
  'project.choosePath': {
    request: z
      .object({ purpose: z.enum(['open-project', 'save-project']), suggestedName: z.string().max(255).optional() })
      .strict(),
    reply: z.union([
      z.object({ supported: z.literal(false) }),
      z.object({ supported: z.literal(true), path: z.string().nullable() }),
    ]),
  },
  /** Where relative paths typed in the page's path dialog resolve, and a default folder. */
  'project.defaultFolder': {
    request: empty,
    reply: z.object({ folder: z.string() }),
  },
  /** Write the recovery snapshot of unsaved work (the page debounces the calls). */
  'recovery.write': {
    request: z
      .object({
        id: recoveryId,
        title: z.string().max(1000),
        sourcePath: z.string().max(4096).nullable(),
        projectText: z.string(),
      })
      .strict(),
    reply: z.object({ file: z.string() }),
  },
  /** Snapshots left behind (after a crash), newest first. */
  'recovery.list': {
    request: empty,
    reply: z.object({ entries: z.array(recoveryEntrySchema) }),
  },
  'recovery.restore': {
    request: z.object({ id: recoveryId }).strict(),
    reply: z.union([
      z.object({ ok: z.literal(true), projectText: z.string(), entry: recoveryEntrySchema }),
      z.object({ ok: z.literal(false), problems: z.array(problemSchema) }),
    ]),
  },
  'recovery.discard': {
    request: z.object({ id: recoveryId }).strict(),
    reply: z.object({ discarded: z.boolean() }),
  },
  /** Recently opened or saved project files, newest first. */
  'recent.list': {
    request: empty,
    reply: z.object({ files: z.array(z.object({ path: z.string(), openedAt: z.string() })) }),
  },
  'recent.clear': {
    request: empty,
    reply: z.object({ cleared: z.boolean() }),
  },
  /** The desktop Edit menu shows what Undo and Redo would do. Browser host: `supported: false`. */
  'app.setEditLabels': {
    request: z.object({ undo: z.string().max(200).nullable(), redo: z.string().max(200).nullable() }).strict(),
    reply: z.object({ supported: z.boolean() }),
  },
  /** Close the window without asking again (the page has already asked). Browser host: `supported: false`. */
  'app.closeWindow': {
    request: empty,
    reply: z.object({ supported: z.boolean() }),
  },
  // --- fitting, evaluation, export (issue 5) ---
  /**
   * Start a fit in the worker; progress and the result arrive as events. With
   * `trust`, the result also carries the per-cell spread over an ensemble.
   * `warmStart` continues from a previous run's factors (live refit after an edit).
   * Fits run on their own worker, so a long evaluation never delays them.
   */
  'fit.start': {
    request: z
      .object({
        matrix: matrixPayloadSchema,
        settings: fitSettingsSchema,
        trust: trustRequestSchema.optional(),
        warmStart: z.object({ rowFactors: z.array(z.number()), colFactors: z.array(z.number()) }).optional(),
        clientId: clientJobId.optional(),
      })
      .strict(),
    reply: z.object({ jobId }),
  },
  /** k-fold cross-validation of one setting; answers with a `fit.evaluated` event. */
  'fit.evaluate': {
    request: z
      .object({
        matrix: matrixPayloadSchema,
        settings: fitSettingsSchema,
        folds: z.number().int().min(2).max(20),
        seed: z.number().int(),
        clientId: clientJobId.optional(),
      })
      .strict(),
    reply: z.object({ jobId }),
  },
  /** Several settings on the same folds; answers with a `fit.tuned` event. */
  'fit.tune': {
    request: z
      .object({
        matrix: matrixPayloadSchema,
        settingsList: z.array(fitSettingsSchema).min(1).max(2000),
        folds: z.number().int().min(2).max(20),
        seed: z.number().int(),
        clientId: clientJobId.optional(),
      })
      .strict(),
    reply: z.object({ jobId }),
  },
  'fit.cancel': {
    request: z.object({ jobId }).strict(),
    reply: z.object({ cancelled: z.boolean() }),
  },
  /** Where exports go by default: a folder in the user's home, and a free file name there. */
  'export.suggestPath': {
    request: z.object({ fileName: z.string().min(1).max(255) }).strict(),
    reply: z.object({ path: z.string() }),
  },
  /** Write an export (and optionally its settings sidecar) atomically; never overwrites silently. */
  'export.write': {
    request: z
      .object({
        path: z.string().min(1).max(4096),
        text: z.string(),
        sidecar: z.string().optional(),
        /** Companion mask (NAME.mask.csv: observed / filled per cell) of a wide export. */
        mask: z.string().optional(),
        overwrite: z.boolean(),
      })
      .strict(),
    reply: z.union([
      z.object({
        ok: z.literal(true),
        path: z.string(),
        sidecarPath: z.string().nullable(),
        maskPath: z.string().nullable().optional(),
        bytes: z.number().int(),
      }),
      z.object({ ok: z.literal(false), reason: z.enum(['exists', 'invalid-path']), message: z.string() }),
    ]),
  },
} as const;

export type ApiMethod = keyof typeof apiMethods;
export type ApiRequest<M extends ApiMethod> = z.infer<(typeof apiMethods)[M]['request']>;
export type ApiReply<M extends ApiMethod> = z.infer<(typeof apiMethods)[M]['reply']>;

export function isApiMethod(name: unknown): name is ApiMethod {
  return typeof name === 'string' && Object.prototype.hasOwnProperty.call(apiMethods, name);
}

// ---------------------------------------------------------------------------
// Events pushed from the main side
// ---------------------------------------------------------------------------

export const apiEvents = {
  'fit.progress': z.object({
    jobId,
    iteration: z.number().int().min(0),
    objective: z.number().nullable(),
    elapsedMs: z.number(),
  }),
  /** Folds or grid points done, for evaluate and tune jobs. */
  'fit.step': z.object({ jobId, done: z.number().int().min(0), total: z.number().int().min(0), elapsedMs: z.number() }),
  'fit.result': z.object({ jobId, result: fitResultPayloadSchema, trust: trustPayloadSchema.optional() }),
  'fit.evaluated': z.object({ jobId, result: crossValidationPayloadSchema }),
  'fit.tuned': z.object({ jobId, result: tunePayloadSchema }),
  'fit.cancelled': z.object({ jobId }),
  'fit.error': z.object({ jobId, message: z.string() }),
  /** A menu command chosen in the Electron application menu. */
  'menu.command': z.object({
    command: z
      .string()
      .min(1)
      .max(100)
      .refine((c) => parseCommand(c) !== undefined, 'not a Rankfill command'),
  }),
} as const;

export type ApiEventName = keyof typeof apiEvents;
export type ApiEventPayload<E extends ApiEventName> = z.infer<(typeof apiEvents)[E]>;

export const eventEnvelopeSchema = z.object({
  event: z.enum(Object.keys(apiEvents) as [ApiEventName, ...ApiEventName[]]),
  payload: z.unknown(),
});
export type EventEnvelope = { [E in ApiEventName]: { event: E; payload: ApiEventPayload<E> } }[ApiEventName];

// ---------------------------------------------------------------------------
// Reply envelope: every call answers with one of these, never throws across the boundary
// ---------------------------------------------------------------------------

type ApiErrorCode = 'bad-method' | 'bad-request' | 'failed' | 'bad-reply' | 'unauthorized' | 'transport';

export type ApiResult<T> = { ok: true; data: T } | { ok: false; error: { code: ApiErrorCode; message: string } };

export const apiResultSchema = z.union([
  z.object({ ok: z.literal(true), data: z.unknown() }),
  z.object({
    ok: z.literal(false),
    error: z.object({
      code: z.enum(['bad-method', 'bad-request', 'failed', 'bad-reply', 'unauthorized', 'transport']),
      message: z.string(),
    }),
  }),
]);

/** Render a zod error as one readable line: "path: message; path: message". */
export function describeIssues(error: z.ZodError, limit = 5): string {
  const parts = error.issues.slice(0, limit).map((i) => {
    const where = i.path.length ? i.path.join('.') : '(root)';
    return `${where}: ${i.message}`;
  });
  if (error.issues.length > limit) parts.push(`and ${error.issues.length - limit} more`);
  return parts.join('; ');
}

export { TOKEN_HEADER } from './ipcChannels';
