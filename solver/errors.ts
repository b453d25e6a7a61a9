// Typed failures of a solve, so callers branch on the class, never on message text.

/** The run produced non-finite or exploding fields: deterministic, retrying will not help. */
export class SolverDivergedError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'SolverDivergedError';
  }
}

/** The caller asked the solve to stop (shouldStop returned true). */
export class SolveCancelledError extends Error {
  constructor() {
    super('solve cancelled');
    this.name = 'SolveCancelledError';
  }
}
