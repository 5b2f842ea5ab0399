/**
 * Conversions between in-memory objects (typed arrays, NaN = missing) and their
 * JSON-safe wire form in api.ts (plain arrays, null = missing).
 */
import type {
  CrossValidationPayload,
  FitResultPayload,
  IntervalCalibrationPayload,
  MatrixPayload,
  TrustPayload,
  TunePayload,
} from './api';
import type { IntervalCalibration } from './engine/cellIntervals';
import type { CrossValidationResult } from './engine/crossValidation';
import type { CellTrust } from './engine/trust';
import type { TuneResult } from './engine/tuning';
import type { FitResult, FitSettings } from './engine/types';
import type { RatingMatrix } from './matrix/ratingMatrix';

function toNullable(a: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(a.length);
  for (let i = 0; i < a.length; i++) {
    const x = a[i];
    out[i] = Number.isFinite(x) ? x : null;
  }
  return out;
}

export function fromNullable(a: readonly (number | null)[]): Float64Array {
  const out = new Float64Array(a.length);
  for (let i = 0; i < a.length; i++) {
    const x = a[i];
    out[i] = x === null ? NaN : x;
  }
  return out;
}

export function matrixToPayload(m: RatingMatrix): MatrixPayload {
  return {
    rowLabels: m.rowLabels.slice(),
    colLabels: m.colLabels.slice(),
    values: toNullable(m.values),
    scale: { ...m.scale },
    ...(m.rowHeader !== undefined ? { rowHeader: m.rowHeader } : {}),
  };
}

export function matrixFromPayload(p: MatrixPayload): RatingMatrix {
  return {
    rowLabels: p.rowLabels.slice(),
    colLabels: p.colLabels.slice(),
    values: fromNullable(p.values),
    scale: { ...p.scale },
    ...(p.rowHeader !== undefined ? { rowHeader: p.rowHeader } : {}),
  };
}

export function fitResultToPayload(r: FitResult): FitResultPayload {
  return {
    settings: r.settings,
    rows: r.rows,
    cols: r.cols,
    predictions: toNullable(r.predictions),
    baseline: toNullable(r.baseline),
    rowBaseline: toNullable(r.rowBaseline),
    colBaseline: toNullable(r.colBaseline),
    globalMean: Number.isFinite(r.globalMean) ? r.globalMean : null,
    rowFactors: toNullable(r.rowFactors),
    colFactors: toNullable(r.colFactors),
    rank: r.rank,
    objectiveTrace: toNullable(r.objectiveTrace),
    iterations: r.iterations,
    converged: r.converged,
    elapsedMs: r.elapsedMs,
    ...(r.spread ? { spread: toNullable(r.spread) } : {}),
    ...(r.covariance ? { covariance: toNullable(r.covariance) } : {}),
  };
}

export function fitResultFromPayload(p: FitResultPayload): FitResult {
  const trace = p.objectiveTrace.map((x) => (x === null ? NaN : x));
  return {
    settings: p.settings as FitSettings,
    rows: p.rows,
    cols: p.cols,
    predictions: fromNullable(p.predictions),
    baseline: fromNullable(p.baseline),
    rowBaseline: fromNullable(p.rowBaseline),
    colBaseline: fromNullable(p.colBaseline),
    globalMean: p.globalMean === null ? NaN : p.globalMean,
    rowFactors: fromNullable(p.rowFactors),
    colFactors: fromNullable(p.colFactors),
    rank: p.rank,
    objectiveTrace: trace,
    iterations: p.iterations,
    converged: p.converged,
    elapsedMs: p.elapsedMs,
    ...(p.spread ? { spread: fromNullable(p.spread) } : {}),
    ...(p.covariance ? { covariance: fromNullable(p.covariance) } : {}),
  };
}

// ----- evaluation results ------------------------------------------------------------

const fin = (x: number): number | null => (Number.isFinite(x) ? x : null);

function intervalsToPayload(c: IntervalCalibration): IntervalCalibrationPayload {
  return {
    method: c.method,
    scaleSource: c.scaleSource,
    coefficients: c.coefficients.slice(),
    k: c.heldOut.k,
    fold: Array.from(c.heldOut.fold),
    estimate: toNullable(c.heldOut.estimate),
    observed: Array.from(c.heldOut.observed),
    sigma: toNullable(c.heldOut.sigma),
    errorScale: toNullable(c.errorScale),
  };
}

function intervalsFromPayload(p: IntervalCalibrationPayload): IntervalCalibration {
  return {
    method: p.method,
    scaleSource: p.scaleSource,
    coefficients: p.coefficients.slice(),
    heldOut: {
      k: p.k,
      fold: Int32Array.from(p.fold),
      estimate: fromNullable(p.estimate),
      observed: Float64Array.from(p.observed),
      sigma: fromNullable(p.sigma),
    },
    errorScale: fromNullable(p.errorScale),
  };
}

export function trustToPayload(t: CellTrust): TrustPayload {
  return {
    spread: toNullable(t.spread),
    rowSupport: Array.from(t.rowSupport),
    colSupport: Array.from(t.colSupport),
    weakRows: t.weakRows.slice(),
    weakCols: t.weakCols.slice(),
    ...(t.intervals ? { intervals: intervalsToPayload(t.intervals) } : {}),
  };
}

export function trustFromPayload(p: TrustPayload): CellTrust {
  return {
    spread: fromNullable(p.spread),
    rowSupport: Int32Array.from(p.rowSupport),
    colSupport: Int32Array.from(p.colSupport),
    weakRows: p.weakRows.slice(),
    weakCols: p.weakCols.slice(),
    ...(p.intervals ? { intervals: intervalsFromPayload(p.intervals) } : {}),
  };
}

export function crossValidationToPayload(r: CrossValidationResult): CrossValidationPayload {
  return {
    folds: r.folds.map((f) => ({ rmse: fin(f.rmse), mae: fin(f.mae), n: f.n })),
    meanRmse: fin(r.meanRmse),
    sdRmse: fin(r.sdRmse),
    meanMae: fin(r.meanMae),
    sdMae: fin(r.sdMae),
  };
}

export function tuneToPayload(r: TuneResult): TunePayload {
  return {
    k: r.k,
    seed: r.seed,
    table: r.table.map((row) => ({
      settings: row.settings,
      ...crossValidationToPayload(row),
      ...(row.error ? { error: row.error } : {}),
    })),
    bestIndex: r.bestIndex,
    oneStandardErrorIndex: r.oneStandardErrorIndex,
    threshold: fin(r.threshold),
  };
}
