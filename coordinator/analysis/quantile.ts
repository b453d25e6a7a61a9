// Sample quantiles of a set of numbers, for the report's spread of field strength and phase over runs. One method
// only, named wherever a quantile is shown: Hyndman & Fan type 7. Pure; no I/O.

/** The method's name as the report states it. */
export const QUANTILE_METHOD =
  'linear interpolation between order statistics (Hyndman & Fan 1996, type 7; the default of R and NumPy)';

/**
 * Quantile p of `sorted` (ascending, finite, at least one value), Hyndman & Fan type 7:
 * h = (n − 1)·p, Q(p) = x[⌊h⌋] + (h − ⌊h⌋)·(x[⌊h⌋ + 1] − x[⌊h⌋]) with x 0-based
 * (R. J. Hyndman and Y. Fan, "Sample quantiles in statistical packages", The American Statistician 50(4), 1996,
 * pp. 361–365, doi:10.1080/00031305.1996.10473566, definition 7).
 * Special cases: p = 0 gives the smallest value, p = 1 the largest, one value gives that value. The caller sorts
 * once and asks for several p; no argument checks here (see `quantiles`).
 */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  if (lo >= sorted.length - 1) return sorted[sorted.length - 1];
  return sorted[lo] + (h - lo) * (sorted[lo + 1] - sorted[lo]);
}

/** Quantiles `ps` (each in [0, 1]) of `values` (finite numbers, at least one), by `quantileSorted`. */
export function quantiles(values: ArrayLike<number>, ps: readonly number[]): number[] {
  if (values.length === 0) throw new Error('quantiles: values must hold at least one number (got none)');
  for (const p of ps) {
    if (!(p >= 0 && p <= 1)) throw new Error(`quantiles: each p must be in [0, 1] (got ${p})`);
  }
  const sorted = Float64Array.from(values).sort();
  if (!Number.isFinite(sorted[0]) || !Number.isFinite(sorted[sorted.length - 1])) {
    throw new Error('quantiles: values must be finite numbers (got NaN or ±∞)');
  }
  return ps.map((p) => quantileSorted(sorted, p));
}
