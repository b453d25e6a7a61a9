// The residual phase of a run along range: what is left of Ez's phase after the free-space delay, unwrapped, so
// that runs can be compared and analysed (the sensitivity outputs) and drawn (the report's phase plots).
import { C0 } from '../../solver/constants.js';
import { unwrapNearDeg } from '../../solver/phase.js';

/** The points of one run, as the analysis and the report hold them. */
export interface PhaseSeries {
  frequency_hz: number;
  points: ReadonlyArray<{ range_m: number; ez_phase_deg: number }>;
}

/** Wrap degrees into (−180, 180]. */
function wrapDeg(deg: number): number {
  const w = ((((deg + 180) % 360) + 360) % 360) - 180;
  return w === -180 ? 180 : w;
}

/**
 * Phase of Ez relative to the free-space delay, unwrapped along range: φ + 360°·f·r/c (with e^{jωt}, propagation
 * alone gives −k·r; common practice in VLF phase work to show what is left, which varies slowly with range).
 */
export function residualPhaseDeg(series: PhaseSeries): Array<{ range_m: number; value: number }> {
  const range = Float64Array.from(series.points, (p) => p.range_m);
  const phase = Float64Array.from(series.points, (p) => p.ez_phase_deg);
  const res = residualPhaseColumns(series.frequency_hz, range, phase);
  return Array.from(res.value, (value, k) => ({ range_m: res.range_m[k], value }));
}

/**
 * The same for one run held as columns (ranges and principal phases, degrees): the points taken in order of range
 * (a stable sort, so equal ranges keep their order; no sort when already in order). Returns the ranges in that
 * order and the unwrapped residual phase at each.
 */
export function residualPhaseColumns(
  frequencyHz: number,
  range: ArrayLike<number>,
  phaseDeg: ArrayLike<number>,
): { range_m: ArrayLike<number>; value: Float64Array } {
  const n = range.length;
  let inOrder = true;
  for (let i = 1; i < n && inOrder; i++) if (!(range[i] - range[i - 1] >= 0)) inOrder = false;
  let r: ArrayLike<number> = range;
  let ph: ArrayLike<number> = phaseDeg;
  if (!inOrder) {
    const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => range[a] - range[b] || a - b);
    r = Float64Array.from(order, (i) => range[i]);
    ph = Float64Array.from(order, (i) => phaseDeg[i]);
  }
  const value = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const w = wrapDeg(ph[k] + (360 * frequencyHz * r[k]) / C0);
    value[k] = k === 0 ? w : unwrapNearDeg(w, value[k - 1]);
  }
  return { range_m: r, value };
}
