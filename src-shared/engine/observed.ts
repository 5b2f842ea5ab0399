/**
 * Checks on the observed cells of a dense row-major matrix (NaN = missing). The engine's
 * sparse storage of those cells is src-shared/matrix/sparseRatings.ts.
 */

/** First non-finite observed value (±Infinity), or undefined. NaN means missing. */
export function findNonFinite(values: Float64Array, cols: number): { row: number; col: number } | undefined {
  for (let c = 0; c < values.length; c++) {
    const x = values[c];
    if (x === x && (x === Infinity || x === -Infinity)) {
      return { row: Math.floor(c / cols), col: c % cols };
    }
  }
  return undefined;
}
