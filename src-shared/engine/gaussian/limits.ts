/**
 * When the Gaussian model refuses to run. Each variable needs enough observed
 * values for its mean and variance to mean something, and the p × p covariance
 * (p³ work per iteration, p² memory per pattern) must stay small enough to fit
 * interactively. Outside these limits the low-rank model is the right tool.
 */

import { FitFailedError } from '../errors';

export const GAUSSIAN_MAX_VARIABLES = 300;
export const GAUSSIAN_MIN_OBSERVED_PER_VARIABLE = 3;

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
  if (p === 0) return `The Gaussian model needs at least one variable (${plural}); this matrix has none. Use the low-rank model instead.`;
  if (p > GAUSSIAN_MAX_VARIABLES) {
    return (
      `The Gaussian model handles at most ${GAUSSIAN_MAX_VARIABLES} variables, but this matrix has ${p} ${plural}. ` +
      `Use the low-rank model instead${kind === 'column' ? ' (or make the variables the rows, if there are fewer of them)' : ''}.`
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
