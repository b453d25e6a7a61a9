// Seeded Latin hypercube samples in [0, 1)^d for sampled sweep designs and regression-based sensitivity.
// Definition: McKay, Beckman & Conover, Technometrics 21(2), 1979: each coordinate takes one point in each of the
// n equal strata, strata paired at random across coordinates. Pure and deterministic for a given seed.
import { createPrng, shuffleInPlace } from './prng.js';

export interface LatinHypercubeOptions {
  /** Put each point at the centre of its stratum instead of uniformly inside it. @defaultValue false */
  readonly centred?: boolean;
}

/** n points in [0, 1)^d; point i is `points[i]`, coordinate j of it `points[i][j]`. */
export function latinHypercube(n: number, d: number, seed: number, options: LatinHypercubeOptions = {}): Float64Array[] {
  if (!Number.isInteger(n) || n < 1) throw new Error(`latinHypercube: n must be a positive integer (got ${n})`);
  if (!Number.isInteger(d) || d < 1) throw new Error(`latinHypercube: d must be a positive integer (got ${d})`);
  const rng = createPrng(seed);
  const points = Array.from({ length: n }, () => new Float64Array(d));
  const strata = Array.from({ length: n }, (_, i) => i);
  for (let j = 0; j < d; j++) {
    shuffleInPlace(strata, rng);
    for (let i = 0; i < n; i++) {
      // x_ij = (π_j(i) + U_ij)/n (McKay et al. 1979, §2.3); U = 1/2 for the centred variant.
      const u = options.centred ? 0.5 : rng.nextFloat();
      points[i][j] = (strata[i] + u) / n;
    }
  }
  return points;
}
