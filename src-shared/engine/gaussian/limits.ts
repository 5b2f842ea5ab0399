/**
 * When the Gaussian model refuses to run. Each variable needs enough observed
 * values for its mean and variance to mean something, and the p × p covariance
 * (p³ work per iteration, p² memory per pattern) must stay small enough to fit
 * interactively. Outside these limits the low-rank model is the right tool.
 */

import { FitFailedError } from '../errors';

export const GAUSSIAN_MAX_VARIABLES = 300;
const GAUSSIAN_MIN_OBSERVED_PER_VARIABLE = 3;

export type VariableKind = 'column' | 'row';

/**
 * Why the Gaussian model cannot run on this n × p block (variables are its
 * columns), or undefined when it can. `labels` name the variables (length p).
 */
export function gaussianRefusalReason(
  data: Float64Array,
  n: number,
  p: number,
  labels: readonly string[],
  kind: VariableKind,
): string | undefined {
  const plural = kind === 'column' ? 'columns' : 'rows';
  const other = kind === 'column' ? 'rows' : 'columns';
  if (p === 0)
    return `The Gaussian model needs at least one variable (${plural}); this matrix has none. Use the low-rank model instead.`;
  if (p > GAUSSIAN_MAX_VARIABLES) {
    return (
      `The Gaussian model handles at most ${GAUSSIAN_MAX_VARIABLES} variables, but this matrix has ${p} ${plural}. ` +
      `Use the low-rank model instead${n <= GAUSSIAN_MAX_VARIABLES ? ` (or make the ${other} the variables: there are ${n} of them)` : ''}.`
    );
  }
  for (let j = 0; j < p; j++) {
    let c = 0;
    for (let i = 0; i < n && c < GAUSSIAN_MIN_OBSERVED_PER_VARIABLE; i++) {
      const x = data[i * p + j];
      if (x === x) c++;
    }
    if (c < GAUSSIAN_MIN_OBSERVED_PER_VARIABLE) {
      const name = labels[j] !== undefined && labels[j] !== '' ? `"${labels[j]}"` : `number ${j + 1}`;
      return (
        `The Gaussian model needs at least ${GAUSSIAN_MIN_OBSERVED_PER_VARIABLE} observed values for every variable, ` +
        `but ${kind} ${name} has only ${c} (across ${n} ${other}). Use the low-rank model instead.`
      );
    }
  }
  return undefined;
}

/** Throw a FitFailedError with a plain message when the Gaussian model cannot run. */
export function assertGaussianLimits(
  data: Float64Array,
  n: number,
  p: number,
  labels: readonly string[],
  kind: VariableKind,
): void {
  const reason = gaussianRefusalReason(data, n, p, labels, kind);
  if (reason !== undefined) throw new FitFailedError(reason);
}

/**
 * Work of one EM iteration in multiply–adds, estimated from the missingness patterns
 * (see conditional.ts for the two routes; the cheaper one is used per pattern):
 *   per pattern  covariance route  o³/6 + o²m/2 + m²o/2,  precision route  5m³/6
 *   per row      o² + om + m² + p²/2 (fill, log-likelihood, sufficient statistics)
 *   per iteration p³ (factor and invert Σ).
 */
export function emWorkPerIteration(
  patterns: readonly { observed: ArrayLike<number>; missing: ArrayLike<number>; rows: ArrayLike<number> }[],
  p: number,
): number {
  let work = p * p * p;
  for (const pat of patterns) {
    const o = pat.observed.length;
    const m = pat.missing.length;
    const factor = m <= o ? (5 * m * m * m) / 6 : (o * o * o) / 6 + (o * o * m) / 2 + (m * m * o) / 2;
    work += factor + pat.rows.length * (o * o + o * m + m * m + (p * p) / 2);
  }
  return work;
}

/** Above this many multiply–adds per iteration (about 3 s in plain JavaScript here) the fit is refused. */
export const GAUSSIAN_MAX_WORK_PER_ITERATION = 1e9;

export function emWorkloadRefusal(work: number, limit = GAUSSIAN_MAX_WORK_PER_ITERATION): string | undefined {
  if (work <= limit) return undefined;
  return (
    `The Gaussian model would need about ${(work / 1e9).toFixed(1)} billion operations per EM iteration here ` +
    `(many variables, missing in many different combinations), too slow to fit. Use the low-rank model instead.`
  );
}
