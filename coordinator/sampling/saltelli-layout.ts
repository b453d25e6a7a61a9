// The Saltelli design for variance-based sensitivity indices (Saltelli et al., "Variance based sensitivity analysis
// of model output", Comput. Phys. Commun. 181(2), 2010, §3) and its layout: which row of the design each run is, and
// the role (`A`, `B`, `AB_<i>`) a run carries in the ledger and runs.parquet. The one place that maps between them.
import { z } from 'zod';
import { createPrng } from './prng.js';
import { SOBOL_MAX_DIMENSION, sobolPoints } from './sobol.js';

/**
 * Where each run of a Saltelli design sits. Runs come in blocks of n: A (rows 0..n−1), B (n..2n−1), then A_B^i for
 * i = 0..d−1 (rows (2+i)·n .. (3+i)·n−1), where A_B^i is A with column i taken from B. Total n·(d + 2) runs.
 */
export const SaltelliLayoutSchema = z.strictObject({
  n: z.number().int().positive(),
  d: z.number().int().positive(),
  /** Leading Sobol' points skipped before A and B were taken. */
  skip: z.number().int().min(0),
  /** Seed of the random digital shift, or null for the plain sequence. */
  seed: z.number().int().nullable(),
});
export type SaltelliLayout = z.infer<typeof SaltelliLayoutSchema>;

export interface SaltelliDesign {
  /** n·(d + 2) points in [0, 1)^d, in the block order of `layout`. */
  points: Float64Array[];
  layout: SaltelliLayout;
}

export interface SaltelliDesignOptions {
  /** Leading points of the 2d-dimensional Sobol' sequence to skip. @defaultValue 0 */
  readonly skip?: number;
}

/** Row index of run j (0..n−1) of block A, B or A_B^i. */
export function saltelliRow(layout: SaltelliLayout, block: 'A' | 'B' | number, j: number): number {
  if (block === 'A') return j;
  if (block === 'B') return layout.n + j;
  return (2 + block) * layout.n + j;
}

/**
 * The Saltelli design: A and B from the two halves of one 2d-dimensional Sobol' sequence (Saltelli et al. 2010,
 * §3), and A_B^i for each i. With `seed`, every coordinate is XORed by a seeded random shift word per dimension.
 */
export function saltelliDesign(d: number, n: number, seed?: number, options: SaltelliDesignOptions = {}): SaltelliDesign {
  if (!Number.isInteger(d) || d < 1 || 2 * d > SOBOL_MAX_DIMENSION) {
    throw new Error(`saltelliDesign: d must be an integer in [1, ${Math.floor(SOBOL_MAX_DIMENSION / 2)}] (got ${d})`);
  }
  if (!Number.isInteger(n) || n < 2) throw new Error(`saltelliDesign: n must be an integer >= 2 (got ${n})`);
  const skip = options.skip ?? 0;
  let shift: Uint32Array | undefined;
  if (seed !== undefined) {
    const rng = createPrng(seed);
    shift = Uint32Array.from({ length: 2 * d }, () => rng.nextUint32());
  }
  const base = sobolPoints(n, 2 * d, skip, shift);
  const points: Float64Array[] = new Array(n * (d + 2));
  for (let j = 0; j < n; j++) {
    const a = base[j].subarray(0, d);
    const b = base[j].subarray(d, 2 * d);
    points[j] = Float64Array.from(a);
    points[n + j] = Float64Array.from(b);
    for (let i = 0; i < d; i++) {
      const ab = Float64Array.from(a);
      ab[i] = b[i];
      points[(2 + i) * n + j] = ab;
    }
  }
  return { points, layout: { n, d, skip, seed: seed ?? null } };
}


/** The role a row of the design carries: `A`, `B` or `AB_<i>` (i = 0-based index of the column taken from B). */
export function saltelliRole(n: number, row: number): string {
  const block = Math.floor(row / n);
  return block === 0 ? 'A' : block === 1 ? 'B' : `AB_${block - 2}`;
}

/** The row of the design a run with this role and sample index sits in; undefined for a role of no Saltelli block. */
export function saltelliRowOfRole(layout: SaltelliLayout, role: string, sample: number): number | undefined {
  const m = /^(A|B|AB_(\d+))$/.exec(role);
  if (!m || !Number.isInteger(sample) || sample < 0 || sample >= layout.n) return undefined;
  if (m[2] === undefined) return saltelliRow(layout, m[1] as 'A' | 'B', sample);
  const i = Number(m[2]);
  return i < layout.d ? saltelliRow(layout, i, sample) : undefined;
}
