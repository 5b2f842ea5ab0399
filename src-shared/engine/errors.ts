/** Errors the engine raises on purpose; their messages are shown to users as-is. */

/** The caller asked the fit to stop (shouldStop returned true). */
export class FitCancelledError extends Error {
  constructor() {
    super('fit cancelled');
    this.name = 'FitCancelledError';
  }
}

/** The fit cannot proceed or went wrong numerically (non-finite values, divergence, bad settings). */
export class FitFailedError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'FitFailedError';
  }
}
