// Unit-cube rows of the sampled sweep designs, each with its role in the design: a thin adapter over the analysis
// room's Latin hypercube and Saltelli samplers (wired in as soon as they are committed; until then sampled
// designs are refused with a clear message). Pure and deterministic for a given seed.
import { UserError } from '../schemas/errors.js';
import { SOBOL_MAX_DIMENSION } from './analysis/sobol-sequence.js';

export interface UnitRow {
  /** Coordinates in [0, 1)^d, one per vary path in the order written. */
  u: ArrayLike<number>;
  /** `LHS`, or for Saltelli `A`, `B`, `AB_<i>` (i = 0-based index of the vary path taken from B). */
  role: string;
  /** Index of the base sample (0..n−1) the row belongs to. */
  sample: number;
}

/** The largest number of varied parameters a Saltelli design supports (its Sobol' sequence has 2d dimensions). */
export const SALTELLI_MAX_PARAMETERS = Math.floor(SOBOL_MAX_DIMENSION / 2);

export function latinHypercubeUnit(_n: number, _d: number, _seed: number): UnitRow[] {
  throw new UserError('design.kind: latin_hypercube is not available in this build yet; use full_factorial');
}

export function saltelliUnit(_d: number, _n: number, _seed: number): UnitRow[] {
  throw new UserError('design.kind: saltelli is not available in this build yet; use full_factorial');
}
