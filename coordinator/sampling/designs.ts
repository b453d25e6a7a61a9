// Unit-cube rows of the sampled sweep designs, each with its role in the design: a thin adapter over the Latin
// hypercube and Saltelli samplers, so that the expansion and the sensitivity estimators agree on one layout
// (saltelli-layout.ts). Pure and deterministic for a given seed.
import { latinHypercube } from './latin-hypercube.js';
import { SOBOL_MAX_DIMENSION } from './sobol.js';
import { saltelliDesign, saltelliRole } from './saltelli-layout.js';

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

/** n Latin hypercube rows in d dimensions (McKay, Beckman & Conover, Technometrics 21(2), 1979). */
export function latinHypercubeUnit(n: number, d: number, seed: number): UnitRow[] {
  return latinHypercube(n, d, seed).map((u, sample) => ({ u, role: 'LHS', sample }));
}

/** n·(d + 2) Saltelli rows in block order A, B, AB_0 … AB_{d−1} (Saltelli et al., Comput. Phys. Commun. 181(2), 2010). */
export function saltelliUnit(d: number, n: number, seed: number): UnitRow[] {
  const { points } = saltelliDesign(d, n, seed);
  return points.map((u, row) => ({ u, role: saltelliRole(n, row), sample: row % n }));
}
