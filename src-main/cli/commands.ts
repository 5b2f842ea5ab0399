/**
 * The three commands. Each fits only through the engine's fitModel (directly or via
 * crossValidate / tune) and returns an exit code plus what to print; nothing is
 * written before the fit has succeeded.
 */
import { existsSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { fitModel } from '../../src-shared/engine/fitModel';
import { FitFailedError } from '../../src-shared/engine/errors';
import { expandLowRankGrid, type TuneResult } from '../../src-shared/engine/tuning';
import { tuneDefault } from '../../src-shared/engine/defaultTune';
import { describeSeedStability } from '../../src-shared/engine/seedStability';
import { autoSettings, type AutoChoice } from '../../src-shared/engine/autoSettings';
import type { FitSettings, ModelFamily } from '../../src-shared/engine/types';
import { gaussianRefusal } from '../../src-shared/engine/gaussian/fitGaussian';
import { observedCount, type RatingMatrix } from '../../src-shared/matrix/ratingMatrix';
import {
  buildExport,
  buildMask,
  buildSidecar,
  matrixFingerprintText,
  sidecarIntervals,
  type ExportKind,
  type ExportOptions,
} from '../../src-shared/io/exportFilled';
import { cellTrust } from '../../src-shared/engine/trust';
import { intervalsAtLevel, type IntervalsAtLevel } from '../../src-shared/engine/cellIntervals';
import { DEFAULT_INTERVAL_LEVEL, INTERVAL_METHOD } from '../../src-shared/engine/intervals';
import {
  isSparseMatrix,
  toDenseMatrix,
  toSparseMatrix,
  type SparseMatrix,
} from '../../src-shared/matrix/sparseRatings';
import { GAUSSIAN_MAX_VARIABLES } from '../../src-shared/engine/gaussian/limits';
import type { EnginePool } from '../pool/enginePool';
import { evaluateOnPool, seedStabilityOnPool, tuneOnPool } from '../pool/poolJobs';
import { maskPathFor, sidecarPathFor } from '../services/exportPaths';
import type { CliOptions, FillLayout } from './args';
import { appVersion } from './version';
import { atomicWriteSync } from '../services/atomicWrite';
import { describeFsError } from '../services/readTextFile';
import { fitSettingsFromOptions, gaussianSettingsFromOptions, settingsFromOptions } from './modelSettings';

export interface CommandOutput {
  code: number;
  stdout: string[];
  stderr: string[];
}

function fmt(x: number, digits = 4): string {
  return Number.isFinite(x) ? x.toFixed(digits) : 'n/a';
}

function settingsLabel(s: FitSettings): string {
  return s.model === 'lowrank'
    ? `rank ${s.rank}, lambda ${s.lambda}, centering ${s.centering}`
    : `gaussian, shrinkage ${s.shrinkage}${s.transpose ? ', rows are the variables' : ''}`;
}

/**
 * Every file the command line writes goes through the one atomic writer
 * (src-main/services/atomicWrite.ts): random exclusive temp in the target's folder,
 * no link followed, fsync, a link at the target updates the file it points to.
 */
function writeAtomically(path: string, text: string): void {
  atomicWriteSync(path, text);
}

const EXPORT_KIND: Record<FillLayout, ExportKind> = {
  filled: 'filled-wide',
  estimates: 'estimates-wide',
  long: 'long',
};

/** The files `fill` writes: the output, and the sidecar / mask when asked for. */
function fillOutputs(o: CliOptions): string[] {
  const out = o.out!;
  return [out, ...(o.sidecar ? [sidecarPathFor(out)] : []), ...(o.mask ? [maskPathFor(out)] : [])];
}

export function runFill(
  o: CliOptions,
  input: RatingMatrix | SparseMatrix,
  timings: Record<string, number>,
  startedAt: number,
): CommandOutput {
  const m = isSparseMatrix(input) ? toDenseMatrix(input) : input;
  const outputs = fillOutputs(o);
  const existing = o.force ? undefined : outputs.find((p) => existsSync(p));
  if (existing !== undefined) {
    return {
      code: 2,
      stdout: [],
      stderr: [`rankfill: ${existing} already exists; nothing written (add --force to replace it)`],
    };
  }
  let settings = fitSettingsFromOptions(o);
  let auto: AutoChoice | undefined;
  if (!o.modelOptionsGiven && settings.model === 'lowrank') {
    // No model options: choose by a quick cross-validation (engine/autoSettings.ts).
    const ta = performance.now();
    auto = autoSettings(m, settings);
    settings = auto.settings;
    timings.chooseMs = performance.now() - ta;
  }
  const t0 = performance.now();
  const fit = fitModel(m, settings);
  timings.fitMs = performance.now() - t0;
  let intervals: IntervalsAtLevel | undefined;
  if (o.level !== undefined) {
    // The 5 fold fits give the calibration (the same ensemble the workbench's spread uses).
    const t2 = performance.now();
    const trust = cellTrust(m, settings, { method: 'folds', k: 5, seed: settings.seed }, { full: fit });
    intervals = intervalsAtLevel(trust.intervals!, fit.predictions, m.scale, o.level);
    timings.intervalsMs = performance.now() - t2;
  }
  const rows = m.rowLabels.length;
  const cols = m.colLabels.length;
  // The window's writers: observed cells are written as read; only estimates are rounded by --decimals.
  const options: ExportOptions = {
    kind: EXPORT_KIND[o.layout],
    roundToStep: false,
    decimals: o.decimals ?? null,
    delimiter: ',',
    formulaGuard: !o.rawLabels,
  };
  const t1 = performance.now();
  const text = buildExport(m, fit, fit.spread, options, intervals);
  const observedCells = observedCount(m);
  const finalObjective = fit.objectiveTrace.length > 0 ? fit.objectiveTrace[fit.objectiveTrace.length - 1] : null;
  const files: [string, string][] = [[o.out!, text]];
  if (o.sidecar) {
    files.push([
      sidecarPathFor(o.out!),
      buildSidecar({
        app: { name: 'Rankfill (command line)', version: appVersion() },
        exportedAt: new Date(),
        file: o.out!,
        options,
        document: { title: o.input, rows, cols, observed: observedCells, filled: rows * cols - observedCells },
        settings: fit.settings,
        run: { iterations: fit.iterations, converged: fit.converged, finalObjective, refitsAfterEdits: 0 },
        metrics: null,
        ...(intervals ? { intervals: sidecarIntervals(intervals) } : {}),
        inputSha256: createHash('sha256').update(matrixFingerprintText(m)).digest('hex'),
      }),
    ]);
  }
  if (o.mask) files.push([maskPathFor(o.out!), buildMask(m, ',', '\r\n', !o.rawLabels)]);
  for (const [path, body] of files) {
    try {
      writeAtomically(path, body);
    } catch (err) {
      const e = err as NodeJS.ErrnoException;
      const hint = e.code === 'ENOENT' ? 'its folder does not exist (create it first)' : describeFsError(err);
      return { code: 2, stdout: [], stderr: [`rankfill: cannot write ${path}: ${hint}; nothing was written`] };
    }
  }
  timings.writeMs = performance.now() - t1;
  const observed = observedCount(m);
  const objective = fit.objectiveTrace.length > 0 ? fit.objectiveTrace[fit.objectiveTrace.length - 1] : NaN;
  timings.totalMs = performance.now() - startedAt;
  if (o.json) {
    return {
      code: 0,
      stderr: [],
      stdout: [
        JSON.stringify({
          command: 'fill',
          input: o.input,
          output: o.out,
          layout: o.layout,
          files: files.map(([p]) => p),
          rows,
          cols,
          observed,
          filled: rows * cols - observed,
          scale: m.scale,
          settings: fit.settings,
          ...(auto
            ? {
                chosen: {
                  reason: auto.reason,
                  folds: auto.folds,
                  candidates: auto.candidates,
                  meanRmse: auto.rmse,
                  baselineMeanRmse: auto.baselineRmse,
                },
              }
            : {}),
          iterations: fit.iterations,
          converged: fit.converged,
          objective,
          objectiveTrace: fit.objectiveTrace,
          ...(intervals
            ? {
                intervals: {
                  ...sidecarIntervals(intervals),
                  written: o.layout === 'long' ? 'lower,upper columns' : 'not written (wide layout; use --layout long)',
                },
              }
            : {}),
          timings,
        }),
      ],
    };
  }
  return {
    code: 0,
    stderr: [],
    stdout: [
      ...(auto ? [`settings chosen: ${auto.reason}`] : []),
      `filled ${rows * cols - observed} of ${rows * cols} cells (${rows} rows × ${cols} columns) with model estimates → ${files.map(([p]) => p).join(', ')}`,
      `model: ${settingsLabel(fit.settings)}; ${fit.iterations} iterations${fit.converged ? ' (converged)' : ' (iteration limit)'}, objective ${objective.toPrecision(6)}`,
      ...(intervals ? intervalLines(intervals, o.layout === 'long') : []),
    ],
  };
}

const pct = (x: number): string => (Number.isFinite(x) ? `${(100 * x).toFixed(1)} %` : 'n/a');

function intervalLines(iv: IntervalsAtLevel, long: boolean): string[] {
  return [
    `intervals: ${pct(iv.level)} (${iv.method}; scale from the ${iv.scaleSource}); bounds inclusive, clipped to the scale; ` +
      (long ? 'written as lower,upper' : 'not written in a wide layout (use --layout long)'),
    `  on the held-out folds: coverage ${pct(iv.heldOut.coverage)}, mean width ${fmt(iv.heldOut.meanWidth, 3)} ` +
      `(constant-width intervals: coverage ${pct(iv.constantWidth.coverage)}, mean width ${fmt(iv.constantWidth.meanWidth, 3)})`,
    '  an interval holds the true rating in about that share of cells like the held-out ones, on average; not for each cell',
  ];
}

/** `pool`: the engine pool that runs the folds in parallel (absent: in this thread, same numbers). */
export async function runEvaluate(
  o: CliOptions,
  input: RatingMatrix | SparseMatrix,
  timings: Record<string, number>,
  startedAt: number,
  pool?: EnginePool,
): Promise<CommandOutput> {
  const settings = fitSettingsFromOptions(o);
  const t0 = performance.now();
  const m = toSparseMatrix(input);
  const level = o.level ?? DEFAULT_INTERVAL_LEVEL;
  // The folds and seed stability's two fits on all the data (seeds s and s + 1,
  // engine/seedStability.ts) share the pool: seven tasks on every core.
  const [cv, stability] = await Promise.all([
    evaluateOnPool(pool, m, settings, o.folds, settings.seed, { intervalLevels: [level] }),
    seedStabilityOnPool(pool, m, settings),
  ]);
  timings.evaluateMs = performance.now() - t0;
  const iv = cv.intervals?.[0];
  const table = cv.folds.map((f, t) => ({
    fold: t + 1,
    rmse: f.rmse,
    mae: f.mae,
    n: f.n,
    coverage: iv ? iv.normalized.folds[t].coverage : NaN,
    meanWidth: iv ? iv.normalized.folds[t].meanWidth : NaN,
  }));
  const intervalSummary = iv
    ? {
        level,
        method: INTERVAL_METHOD,
        coverage: iv.normalized.coverage,
        meanWidth: iv.normalized.meanWidth,
        constantWidth: { coverage: iv.constantWidth.coverage, meanWidth: iv.constantWidth.meanWidth },
      }
    : null;
  timings.totalMs = performance.now() - startedAt;
  if (o.json) {
    return {
      code: 0,
      stderr: [],
      stdout: [
        JSON.stringify({
          command: 'evaluate',
          input: o.input,
          scale: m.scale,
          settings,
          folds: o.folds,
          seed: settings.seed,
          table,
          meanRmse: cv.meanRmse,
          sdRmse: cv.sdRmse,
          meanMae: cv.meanMae,
          sdMae: cv.sdMae,
          intervals: intervalSummary,
          seedStability: stability,
          timings,
        }),
      ],
    };
  }
  const lines = [
    `${o.folds}-fold cross-validation of ${settingsLabel(settings)}; ${pct(level)} intervals calibrated on the other folds`,
    'fold  rmse    mae     cells  coverage  mean width',
  ];
  for (const r of table)
    lines.push(
      `${String(r.fold).padEnd(5)} ${fmt(r.rmse)}  ${fmt(r.mae)}  ${String(r.n).padEnd(6)} ${pct(r.coverage).padEnd(9)} ${fmt(r.meanWidth, 3)}`,
    );
  lines.push(`mean  ${fmt(cv.meanRmse)}  ${fmt(cv.meanMae)}   (sd ${fmt(cv.sdRmse)} / ${fmt(cv.sdMae)})`);
  if (iv) {
    lines.push(
      `intervals: coverage ${pct(iv.normalized.coverage)}, mean width ${fmt(iv.normalized.meanWidth, 3)}; ` +
        `constant-width ones: ${pct(iv.constantWidth.coverage)}, ${fmt(iv.constantWidth.meanWidth, 3)}`,
    );
  }
  const unstable = describeSeedStability(stability);
  if (unstable) lines.push(`caution: ${unstable}`);
  return { code: 0, stderr: [], stdout: lines };
}

/** The fill/evaluate options that reproduce one setting. */
function fillArguments(s: FitSettings): string[] {
  if (s.model === 'lowrank')
    return ['--model', 'lowrank', '--rank', String(s.rank), '--lambda', String(s.lambda), '--centering', s.centering];
  return ['--model', 'gaussian', '--shrinkage', String(s.shrinkage), ...(s.transpose ? ['--transpose'] : [])];
}

/**
 * Which families `tune` compares. Asked for with --models: those (the Gaussian one left out,
 * with its reason, when it refuses the matrix). By default: low-rank, plus the Gaussian model
 * when it accepts the matrix and the panel is tall (at least 2 rows per variable: below that
 * its p(p+3)/2 means and covariances are poorly determined).
 */
/**
 * What gaussianRefusal reads: too many variables is decided on the shape alone (no values
 * needed); otherwise the Gaussian block is small enough to make dense.
 */
function denseForGaussian(m: RatingMatrix | SparseMatrix, transpose: boolean): RatingMatrix {
  if (!isSparseMatrix(m)) return m;
  const p = transpose ? m.rowLabels.length : m.colLabels.length;
  if (p > GAUSSIAN_MAX_VARIABLES)
    return { rowLabels: m.rowLabels, colLabels: m.colLabels, scale: m.scale, values: new Float64Array(0) };
  return toDenseMatrix(m);
}

function tuneFamilies(
  o: CliOptions,
  m: RatingMatrix | SparseMatrix,
): { families: ModelFamily[]; skipped: { model: ModelFamily; reason: string }[] } {
  const asked = o.models ?? ['lowrank', 'gaussian'];
  const families: ModelFamily[] = [];
  const skipped: { model: ModelFamily; reason: string }[] = [];
  for (const f of asked) {
    if (f !== 'gaussian') {
      families.push(f);
      continue;
    }
    const refusal = gaussianRefusal(denseForGaussian(m, o.transpose), o.transpose);
    const n = o.transpose ? m.colLabels.length : m.rowLabels.length;
    const p = o.transpose ? m.rowLabels.length : m.colLabels.length;
    if (refusal !== undefined) skipped.push({ model: 'gaussian', reason: refusal });
    else if (o.models === undefined && n < 2 * p) {
      skipped.push({
        model: 'gaussian',
        reason: `The panel is not tall enough for the Gaussian model by default (${n} draws for ${p} variables; it is tried from 2 per variable). Ask for it with --models lowrank,gaussian.`,
      });
    } else families.push('gaussian');
  }
  return { families, skipped };
}

export async function runTune(
  o: CliOptions,
  input: RatingMatrix | SparseMatrix,
  timings: Record<string, number>,
  startedAt: number,
  pool?: EnginePool,
): Promise<CommandOutput> {
  const base = settingsFromOptions(o);
  const m = toSparseMatrix(input);
  const { families, skipped } = tuneFamilies(o, m);
  if (families.length === 0) throw new FitFailedError(skipped.map((x) => x.reason).join(' '));
  const gaussians: FitSettings[] = [];
  if (families.includes('gaussian')) {
    const g = gaussianSettingsFromOptions(o);
    for (const shrinkage of o.shrinkages) gaussians.push({ ...g, shrinkage });
  }
  const t0 = performance.now();
  let result: TuneResult;
  let grid: { ranks: number[]; lambdas: number[]; centerings: string[]; refinedLambdas: number[] } | undefined;
  if (families.includes('lowrank') && (o.ranks === undefined || o.lambdas === undefined)) {
    // The data-derived grid with its refinement pass (engine/defaultTune.ts). Without
    // --centering the baselines alone are scored under all four centerings and the factor
    // settings use the best of them.
    // Its passes run on the engine pool like an explicit grid.
    const d = await tuneDefault(
      m,
      {
        folds: o.folds,
        seed: base.seed,
        centerings: o.centerings,
        ranks: o.ranks,
        lambdas: o.lambdas,
        base,
        extra: gaussians,
      },
      (list, k, seed) => tuneOnPool(pool, m, list, k, seed),
    );
    result = d;
    grid = {
      ranks: d.grid.ranks,
      lambdas: d.grid.lambdas,
      centerings: d.grid.centerings,
      refinedLambdas: d.refinedLambdas,
    };
  } else {
    const list: FitSettings[] = [];
    if (families.includes('lowrank'))
      list.push(
        ...expandLowRankGrid({
          ranks: o.ranks!,
          lambdas: o.lambdas!,
          centerings: o.centerings ?? ['none', 'row', 'column', 'both'],
          base,
        }),
      );
    list.push(...gaussians);
    // An explicit grid runs on the engine pool too.
    result = await tuneOnPool(pool, m, list, o.folds, base.seed);
  }
  const list = result.table;
  timings.tuneMs = performance.now() - t0;
  const row = (r: (typeof result.table)[number]) => ({
    model: r.settings.model,
    ...(r.settings.model === 'lowrank'
      ? { rank: r.settings.rank, lambda: r.settings.lambda, centering: r.settings.centering }
      : { shrinkage: r.settings.shrinkage, transpose: r.settings.transpose }),
    meanRmse: r.meanRmse,
    sdRmse: r.sdRmse,
    meanMae: r.meanMae,
    sdMae: r.sdMae,
    ...(r.error ? { error: r.error } : {}),
  });
  // The choice: the family with the lowest mean RMSE, its simplest setting within one SE.
  const chosen = result.oneStandardError;
  const bestOf = (f: ModelFamily) =>
    result.table
      .filter((r) => r.settings.model === f && Number.isFinite(r.meanRmse))
      .reduce<number>((a, r) => Math.min(a, r.meanRmse), Infinity);
  const rival: ModelFamily = chosen.settings.model === 'lowrank' ? 'gaussian' : 'lowrank';
  const why =
    families.includes(rival) && Number.isFinite(bestOf(rival))
      ? `lowest cross-validated RMSE: ${fmt(bestOf(chosen.settings.model))} for the best ${chosen.settings.model} setting against ${fmt(bestOf(rival))} for the best ${rival} one`
      : families.includes(rival)
        ? `every ${rival} setting failed to fit`
        : (skipped.find((x) => x.model === rival)?.reason ?? `only the ${chosen.settings.model} family was asked for`);
  const choice = {
    ...row(chosen),
    settings: chosen.settings,
    fillArguments: fillArguments(chosen.settings),
    reason: why,
  };
  timings.totalMs = performance.now() - startedAt;
  if (o.json) {
    return {
      code: 0,
      stderr: [],
      stdout: [
        JSON.stringify({
          command: 'tune',
          scale: m.scale,
          models: families,
          skipped,
          choice,
          input: o.input,
          folds: o.folds,
          seed: base.seed,
          table: result.table.map(row),
          best: { ...row(result.best), settings: result.best.settings },
          oneStandardError: { ...row(result.oneStandardError), settings: result.oneStandardError.settings },
          threshold: result.threshold,
          ...(grid ? { grid } : {}),
          timings,
        }),
      ],
    };
  }
  const lines = [`${o.folds}-fold cross-validation of ${list.length} settings (same folds for all)`];
  if (grid) {
    lines.push(
      `grid from the data: ranks ${grid.ranks.join(', ')}; lambdas ${grid.lambdas.join(', ')}; centering ${grid.centerings.join(', ')}` +
        (grid.refinedLambdas.length ? `; refined around the best with lambda ${grid.refinedLambdas.join(', ')}` : ''),
    );
  }
  for (const x of skipped) lines.push(`${x.model} model not tried: ${x.reason}`);
  if (families.includes('lowrank')) lines.push('rank  lambda  centering  mean rmse  sd rmse  mean mae');
  for (const r of result.table) {
    const s = r.settings;
    if (s.model !== 'lowrank') continue;
    lines.push(
      `${String(s.rank).padEnd(5)} ${String(s.lambda).padEnd(7)} ${s.centering.padEnd(10)} ${fmt(r.meanRmse).padEnd(10)} ${fmt(r.sdRmse).padEnd(8)} ${fmt(r.meanMae)}${r.error ? `  (failed: ${r.error})` : ''}`,
    );
  }
  if (families.includes('gaussian')) lines.push('gaussian shrinkage  mean rmse  sd rmse  mean mae');
  for (const r of result.table) {
    const s = r.settings;
    if (s.model !== 'gaussian') continue;
    lines.push(
      `${String(s.shrinkage).padEnd(18)} ${fmt(r.meanRmse).padEnd(10)} ${fmt(r.sdRmse).padEnd(8)} ${fmt(r.meanMae)}${r.error ? `  (failed: ${r.error})` : ''}`,
    );
  }
  lines.push(`best: ${settingsLabel(result.best.settings)} (mean RMSE ${fmt(result.best.meanRmse)})`);
  lines.push(
    `simplest within one standard error (≤ ${fmt(result.threshold)}): ${settingsLabel(result.oneStandardError.settings)} (mean RMSE ${fmt(result.oneStandardError.meanRmse)})`,
  );
  lines.push(`choice: ${chosen.settings.model} (${why}); fill with: ${fillArguments(chosen.settings).join(' ')}`);
  return { code: 0, stderr: [], stdout: lines };
}
