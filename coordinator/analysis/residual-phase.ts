// The residual phase of a run along range: what is left of Ez's phase after the free-space delay, unwrapped, so
// that runs can be compared and analysed (the sensitivity outputs) and drawn (the report's phase plots).
import { C0 } from '../../solver/constants.js';
import { unwrapSequenceDeg } from '../../solver/phase.js';

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
  const pts = [...series.points].sort((a, b) => a.range_m - b.range_m);
  const unwrapped = unwrapSequenceDeg(pts.map((p) => wrapDeg(p.ez_phase_deg + (360 * series.frequency_hz * p.range_m) / C0)));
  return pts.map((p, k) => ({ range_m: p.range_m, value: unwrapped[k] }));
}

