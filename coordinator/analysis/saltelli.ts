// The estimators of variance-based (Sobol') sensitivity indices on a Saltelli design, with seeded bootstrap
// intervals. First-order estimator: Saltelli et al., "Variance based sensitivity analysis of model output", Comput.
// Phys. Commun. 181(2), 2010; total-order estimator: Jansen, Comput. Phys. Commun. 117, 1999. The design and its
// layout are in sampling/saltelli-layout.ts.
import { createPrng } from '../sampling/prng.js';
import { saltelliRow, type SaltelliLayout } from '../sampling/saltelli-layout.js';
import { type SensitivityRow } from '../../schemas/analysis-rows.js';

export interface IndexEstimate {
  value: number;
  ci_low: number;
  ci_high: number;
}

export interface SaltelliIndices {
  /** First-order indices S_i, one per parameter. */
  firstOrder: IndexEstimate[];
  /** Total-order indices S_Ti, one per parameter. */
  totalOrder: IndexEstimate[];
  /** Variance of the output over A and B. */
  variance: number;
  confidence: number;
  bootstrapResamples: number;
}

export interface SaltelliIndicesOptions {
  /** Bootstrap resamples for the intervals. @defaultValue 500 */
  readonly resamples?: number;
  /** Two-sided confidence level of the percentile intervals. @defaultValue 0.95 */
  readonly confidence?: number;
  /** Seed of the bootstrap's generator. @defaultValue 1 */
  readonly seed?: number;
}

/** Point estimates of S_i and S_Ti from the runs j listed in `idx` (all runs when idx is the identity). */
function estimate(y: ArrayLike<number>, layout: SaltelliLayout, idx: ArrayLike<number>): { s1: number[]; st: number[]; variance: number } {
  const { n, d } = layout;
  const m = idx.length;
  // Total variance over the union of f(A) and f(B) (Saltelli et al. 2010, §4), in two passes so that a constant
  // output gives exactly 0 rather than rounding noise (Chan, Golub & LeVeque, Am. Stat. 37(3), 1983).
  let sum = 0;
  for (let k = 0; k < m; k++) sum += y[idx[k]] + y[n + idx[k]];
  const mean = sum / (2 * m);
  let sumSq = 0;
  for (let k = 0; k < m; k++) sumSq += (y[idx[k]] - mean) ** 2 + (y[n + idx[k]] - mean) ** 2;
  const variance = sumSq / (2 * m);
  const s1: number[] = [];
  const st: number[] = [];
  for (let i = 0; i < d; i++) {
    let first = 0;
    let total = 0;
    const off = (2 + i) * n;
    for (let k = 0; k < m; k++) {
      const j = idx[k];
      const fa = y[j];
      const fb = y[n + j];
      const fab = y[off + j];
      // V_i ≈ mean(f(B)·(f(A_B^i) − f(A))) (Saltelli et al. 2010, Table 2, eq. (b)).
      first += fb * (fab - fa);
      // V_Ti ≈ mean((f(A) − f(A_B^i))²)/2 (Jansen 1999; Saltelli et al. 2010, Table 2, eq. (f)).
      total += (fa - fab) * (fa - fab);
    }
    s1.push(first / m / variance);
    st.push(total / (2 * m) / variance);
  }
  return { s1, st, variance };
}

/** Percentile of a sorted array, linear interpolation between order statistics (Hyndman & Fan 1996, type 7). */
export function percentileSorted(sorted: ArrayLike<number>, q: number): number {
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * S_i and S_Ti of one output from the n·(d + 2) model values `y` of a Saltelli design, with bootstrap percentile
 * intervals (Efron & Tibshirani, "An introduction to the bootstrap", 1993, ch. 13) over the base runs j.
 */
export function saltelliIndices(y: ArrayLike<number>, layout: SaltelliLayout, options: SaltelliIndicesOptions = {}): SaltelliIndices {
  const { n, d } = layout;
  if (y.length !== n * (d + 2)) throw new Error(`saltelliIndices: expected ${n * (d + 2)} values, got ${y.length}`);
  for (let k = 0; k < y.length; k++) if (!Number.isFinite(y[k])) throw new Error(`saltelliIndices: value ${k} is not finite`);
  const resamples = options.resamples ?? 500;
  const confidence = options.confidence ?? 0.95;
  const all = Uint32Array.from({ length: n }, (_, j) => j);
  const point = estimate(y, layout, all);
  // A variance at rounding level (relative 1e-12 of the largest value) is no variance: the output is constant.
  let scale = 0;
  for (let k = 0; k < 2 * n; k++) scale = Math.max(scale, Math.abs(y[k]));
  if (!(point.variance > (1e-12 * scale) ** 2)) {
    throw new Error('saltelliIndices: the output does not vary over A and B, so it has no variance to apportion');
  }
  const rng = createPrng(options.seed ?? 1);
  const bootS1 = Array.from({ length: d }, () => new Float64Array(resamples));
  const bootST = Array.from({ length: d }, () => new Float64Array(resamples));
  const idx = new Uint32Array(n);
  for (let r = 0; r < resamples; r++) {
    for (let k = 0; k < n; k++) idx[k] = rng.nextInt(n);
    const e = estimate(y, layout, idx);
    for (let i = 0; i < d; i++) {
      bootS1[i][r] = e.s1[i];
      bootST[i][r] = e.st[i];
    }
  }
  const lowQ = (1 - confidence) / 2;
  const interval = (value: number, boot: Float64Array): IndexEstimate => {
    const sorted = Float64Array.from(boot).sort();
    return resamples > 0
      ? { value, ci_low: percentileSorted(sorted, lowQ), ci_high: percentileSorted(sorted, 1 - lowQ) }
      : { value, ci_low: value, ci_high: value };
  };
  return {
    firstOrder: point.s1.map((v, i) => interval(v, bootS1[i])),
    totalOrder: point.st.map((v, i) => interval(v, bootST[i])),
    variance: point.variance,
    confidence,
    bootstrapResamples: resamples,
  };
}

/** The long-form table rows of one output's Sobol' indices. */
export function saltelliRows(output: string, parameters: readonly string[], indices: SaltelliIndices, n: number): SensitivityRow[] {
  const rows: SensitivityRow[] = [];
  const push = (measure: 'first_order' | 'total_order', list: IndexEstimate[]) =>
    list.forEach((e, i) =>
      rows.push({
        output,
        parameter: parameters[i],
        measure,
        value: e.value,
        ci_low: e.ci_low,
        ci_high: e.ci_high,
        confidence: indices.confidence,
        samples: n,
        r_squared: null,
      }),
    );
  push('first_order', indices.firstOrder);
  push('total_order', indices.totalOrder);
  return rows;
}
