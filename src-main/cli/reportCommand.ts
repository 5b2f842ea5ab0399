/**
 * `rankfill report IN --out REPORT.html`: fit one run (the same model options as `fill`),
 * cross-validate it beside the baselines alone, optionally compare the centering modes
 * (--compare-centering) and tune (--tune, with --ranks / --lambdas), and write the study
 * report built by src-shared/report. IN may be a ratings file or a saved project
 * (`.rankfill`), whose run is picked with --run (its id, e.g. run-2, or its position,
 * 1 = first; default: the last run). --csv FILLED.csv also writes the filled matrix and
 * its settings file, and the report lists them. Nothing is written before every fit has
 * succeeded; each file is written atomically.
 */
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { basename } from 'node:path';
import { tuneToPayload } from '../../src-shared/apiCodec';
import { autoSettings } from '../../src-shared/engine/autoSettings';
import { intervalsAtLevel, type IntervalsAtLevel } from '../../src-shared/engine/cellIntervals';
import { fitModel } from '../../src-shared/engine/fitModel';
import { cellTrust } from '../../src-shared/engine/trust';
import { defaultLowRankSettings } from '../../src-shared/engine/defaults';
import { expandLowRankGrid, tune } from '../../src-shared/engine/tuning';
import { defaultGrid } from '../../src-shared/engine/tuningGrid';
import type { FitSettings, LowRankSettings } from '../../src-shared/engine/types';
import { isSparseMatrix, toDenseMatrix } from '../../src-shared/matrix/sparseRatings';
import {
  buildExport,
  buildSidecar,
  matrixFingerprintText,
  sidecarIntervals,
  type ExportOptions,
} from '../../src-shared/io/exportFilled';
import { observedCount, type RatingMatrix } from '../../src-shared/matrix/ratingMatrix';
import { formatProblem } from '../../src-shared/io';
import { parseProject } from '../../src-shared/project';
import { buildReport } from '../../src-shared/report/buildReport';
import type { ReportExport, ReportInput } from '../../src-shared/report/reportInput';
import { reportIntervals } from '../../src-shared/report/reportIntervals';
import { reportEvaluationSettings } from '../../src-shared/report/reportEvaluation';
import { UsageError, type CliOptions } from './args';
import type { CommandOutput } from './commands';
import { atomicWriteSync as writeAtomically } from '../services/atomicWrite';
import { decodeText, describeFsError, readBoundedFileSync } from '../services/readTextFile';
import { MAX_PROJECT_BYTES } from '../services/projectStore';
import { fitSettingsFromOptions, withScale } from './modelSettings';
import { readMatrix } from './readInput';
import { sidecarPathFor } from '../services/exportService';

/** Options that set the model, refused when a project's saved run already fixes it. */
const MODEL_OPTIONS: (keyof CliOptions)[] = [
  'rank',
  'lambda',
  'centering',
  'shrinkage',
  'iterations',
  'tolerance',
  'seed',
];

interface Loaded {
  matrix: RatingMatrix;
  settings: FitSettings;
  runLabel: string;
  warnings: string[];
  /** No model options and no saved settings: choose them as `fill` does (engine/autoSettings.ts). */
  choose?: boolean;
}

function isProjectPath(path: string): boolean {
  return path.toLowerCase().endsWith('.rankfill');
}

function loadProject(o: CliOptions): Loaded | CommandOutput {
  // Bounded like the window's open: regular files only, at most the project limit.
  const read = readBoundedFileSync(o.input, MAX_PROJECT_BYTES);
  if (!read.ok) return { code: 2, stdout: [], stderr: [`${o.input}:1:1: ${read.reason}`] };
  const text = decodeText(read.bytes);
  const parsed = parseProject(text, o.input);
  if (!parsed.ok) return { code: 2, stdout: [], stderr: parsed.problems.map(formatProblem) };
  const project = parsed.project;
  const matrix = withScale(project.matrix, o);
  const runs = project.runs;
  const given = MODEL_OPTIONS.filter((k) => o[k] !== undefined);
  const anyModelOption = given.length > 0 || o.model !== 'lowrank' || o.transpose;
  if (runs.length === 0) {
    if (o.run !== undefined) throw new UsageError(`${o.input} has no saved runs, so --run ${o.run} cannot be found`);
    // No saved run: the project's model settings, or the options (and defaults) when any are given.
    const settings = project.settings && !anyModelOption ? project.settings : fitSettingsFromOptions(o);
    return {
      matrix,
      settings,
      runLabel: project.settings && !anyModelOption ? 'Project settings' : 'Command-line run',
      warnings: [],
      choose: !project.settings && !o.modelOptionsGiven,
    };
  }
  if (anyModelOption) {
    throw new UsageError(
      `a saved run fixes the model settings; leave out ${given.length ? given.map((k) => `--${k}`).join(', ') : '--model / --transpose'} (or report the ratings file instead)`,
    );
  }
  let index = runs.length - 1;
  if (o.run !== undefined) {
    const byId = runs.findIndex((r) => r.id === o.run);
    const position = /^\d+$/.test(o.run) ? Number(o.run) - 1 : -1;
    index = byId >= 0 ? byId : position >= 0 && position < runs.length ? position : -1;
    if (index < 0)
      throw new UsageError(
        `--run ${o.run} is not in ${o.input} (saved runs: ${runs.map((r, i) => `${i + 1} = ${r.id}`).join(', ')})`,
      );
  }
  const run = runs[index];
  return {
    matrix,
    settings: run.settings,
    runLabel: `Saved run ${run.id}${run.name ? ` (“${run.name}”)` : ` (Run ${run.number})`}`,
    warnings: [],
  };
}

function loadRatings(o: CliOptions): Loaded | CommandOutput {
  const read = readMatrix(o.input, o.long);
  if (!read.ok) return { code: 2, stdout: [], stderr: read.messages };
  // The report draws the whole matrix, so a sparse read is made dense here.
  const matrix = isSparseMatrix(read.matrix) ? toDenseMatrix(read.matrix) : read.matrix;
  return {
    matrix: withScale(matrix, o),
    settings: fitSettingsFromOptions(o),
    runLabel: 'Command-line run',
    warnings: read.warnings,
    choose: !o.modelOptionsGiven,
  };
}

function sha256(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

function lowRankBase(s: FitSettings): LowRankSettings {
  if (s.model === 'lowrank') return s;
  return {
    ...defaultLowRankSettings(),
    maxIterations: s.maxIterations,
    seed: s.seed,
    clipToScale: s.clipToScale,
    snapToStep: s.snapToStep,
  };
}

export function runReport(o: CliOptions, appVersion: string, now: () => Date = () => new Date()): CommandOutput {
  const loaded = isProjectPath(o.input) ? loadProject(o) : loadRatings(o);
  if ('code' in loaded) return loaded;
  const m = loaded.matrix;
  const outputs = [o.out!, ...(o.csv !== undefined ? [o.csv, sidecarPathFor(o.csv)] : [])];
  const existing = o.force ? undefined : outputs.find((p) => existsSync(p));
  if (existing !== undefined)
    return {
      code: 2,
      stdout: [],
      stderr: [`rankfill: ${existing} already exists; nothing written (add --force to replace it)`],
    };
  const t0 = performance.now();
  let settings = loaded.settings;
  let choice: ReportInput['choice'] = null;
  if (loaded.choose && settings.model === 'lowrank') {
    // No model options: the same quick cross-validated choice as `fill` makes.
    const auto = autoSettings(m, settings);
    settings = auto.settings;
    choice = {
      reason: auto.reason,
      folds: auto.folds,
      candidates: auto.candidates,
      meanRmse: auto.rmse,
      baselineMeanRmse: auto.baselineRmse,
    };
  }
  const fit = fitModel(m, settings);
  const evaluation = tuneToPayload(tune(m, { settings: reportEvaluationSettings(settings) }, o.folds, settings.seed));
  const base = lowRankBase(settings);
  const centering = o.compareCentering
    ? tuneToPayload(
        tune(
          m,
          { settings: (['none', 'row', 'column', 'both'] as const).map((c) => ({ ...base, centering: c })) },
          o.folds,
          settings.seed,
        ),
      )
    : null;
  const tuning = o.tune
    ? tuneToPayload(
        tune(
          m,
          {
            settings: expandLowRankGrid({
              ranks: o.ranks ?? defaultGrid(m).ranks,
              lambdas: o.lambdas ?? defaultGrid(m).lambdas,
              centerings: [base.centering],
              base,
            }),
          },
          o.folds,
          settings.seed,
        ),
      )
    : null;
  let intervals: IntervalsAtLevel | undefined;
  if (o.level !== undefined) {
    // The 5 fold fits calibrate the intervals, as `fill --level` does.
    const trust = cellTrust(m, settings, { method: 'folds', k: 5, seed: settings.seed }, { full: fit });
    if (trust.intervals) intervals = intervalsAtLevel(trust.intervals, fit.predictions, m.scale, o.level);
  }
  const computeMs = performance.now() - t0;
  const inputSha256 = sha256(matrixFingerprintText(m));
  const app = { name: 'Rankfill', version: appVersion };
  const finalObjective = fit.objectiveTrace.length ? fit.objectiveTrace[fit.objectiveTrace.length - 1] : null;
  const exports: ReportExport[] = [];
  if (o.csv !== undefined) {
    const options: ExportOptions = {
      kind: 'filled-wide',
      roundToStep: false,
      decimals: o.decimals ?? null,
      delimiter: ',',
      formulaGuard: !o.rawLabels,
    };
    const observed = observedCount(m);
    const sidecarPath = sidecarPathFor(o.csv);
    const writtenAt = now();
    const sidecar = buildSidecar({
      app,
      exportedAt: writtenAt,
      file: o.csv,
      options,
      document: {
        title: basename(o.input),
        rows: m.rowLabels.length,
        cols: m.colLabels.length,
        observed,
        filled: m.values.length - observed,
      },
      settings,
      run: { iterations: fit.iterations, converged: fit.converged, finalObjective, refitsAfterEdits: 0 },
      metrics: {
        folds: evaluation.k,
        seed: evaluation.seed,
        meanRmse: evaluation.table[0].meanRmse,
        sdRmse: evaluation.table[0].sdRmse,
        meanMae: evaluation.table[0].meanMae,
        sdMae: evaluation.table[0].sdMae,
      },
      ...(intervals ? { intervals: sidecarIntervals(intervals) } : {}),
      inputSha256,
    });
    try {
      writeAtomically(o.csv, buildExport(m, fit, fit.spread, options));
      writeAtomically(sidecarPath, sidecar);
    } catch (err) {
      return { code: 2, stdout: [], stderr: [`rankfill: cannot write ${o.csv}: ${describeFsError(err)}`] };
    }
    exports.push({ path: o.csv, sidecarPath, writtenAt: writtenAt.toISOString() });
  }
  const input: ReportInput = {
    title: basename(o.input),
    source: o.input,
    app,
    createdAt: now().toISOString(),
    matrix: m,
    inputSha256,
    run: {
      label: loaded.runLabel,
      settings,
      iterations: fit.iterations,
      converged: fit.converged,
      finalObjective,
      objectiveTrace: fit.objectiveTrace,
      refitsAfterEdits: 0,
    },
    evaluation,
    centering,
    tuning,
    choice,
    intervals: intervals ? reportIntervals(intervals) : null,
    exports,
    reportPath: o.out,
  };
  const html = buildReport(input);
  try {
    writeAtomically(o.out!, html);
  } catch (err) {
    return { code: 2, stdout: [], stderr: [`rankfill: cannot write ${o.out}: ${describeFsError(err)}`] };
  }
  const own = evaluation.table[0];
  if (o.json) {
    return {
      code: 0,
      stderr: loaded.warnings,
      stdout: [
        JSON.stringify({
          command: 'report',
          input: o.input,
          output: o.out,
          bytes: Buffer.byteLength(html),
          run: loaded.runLabel,
          settings,
          evaluation,
          centering: centering !== null,
          tuning: tuning !== null,
          exports,
          inputSha256,
          computeMs,
        }),
      ],
    };
  }
  return {
    code: 0,
    stderr: loaded.warnings,
    stdout: [
      `report of ${loaded.runLabel.toLowerCase()} (${settings.model === 'lowrank' ? `rank ${settings.rank}, lambda ${settings.lambda}, centering ${settings.centering}` : `gaussian, shrinkage ${settings.shrinkage}`}) → ${o.out} (${Math.ceil(Buffer.byteLength(html) / 1024)} KB)`,
      ...(choice ? [`settings chosen: ${choice.reason}`] : []),
      `cross-validated RMSE ${own.meanRmse === null ? 'n/a' : own.meanRmse.toFixed(4)} (${evaluation.k} folds), against ${evaluation.table[1]?.meanRmse?.toFixed(4) ?? 'n/a'} for the row and column baselines alone`,
      ...exports.map((x) => `filled matrix → ${x.path} (settings: ${x.sidecarPath})`),
    ],
  };
}
