// The solver's version: the major number is part of every job id, so a change that alters numbers bumps it.
export const SOLVER_VERSION = '1.2.0';
export const SOLVER_MAJOR = SOLVER_VERSION.split('.')[0];
