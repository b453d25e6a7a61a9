// The CW source: a smoothly ramped current and the normalisation of phasors to the requested radiated power.
import type { Case } from '../schemas/case.js';
import { C0, ETA0 } from './constants.js';

/**
 * Source current (peak 1 A after the ramp) at time t: the time derivative of a smooth charge,
 * I(t) = d/dt[r(t)·sin(ωt)/ω] = r·cos(ωt) + r′·sin(ωt)/ω, so no static charge is left at the source
 * (docs/references.md, Numerical notes). r is the quintic smoothstep 10τ³ − 15τ⁴ + 6τ⁵ over the ramp (common practice).
 */
export function sourceCurrent(tS: number, omega: number, rampS: number): number {
  if (tS <= 0) return 0;
  if (tS >= rampS) return Math.cos(omega * tS);
  const tau = tS / rampS;
  const r = tau * tau * tau * (10 - 15 * tau + 6 * tau * tau);
  const dr = (30 * tau * tau * (1 - 2 * tau + tau * tau)) / rampS;
  return r * Math.cos(omega * tS) + (dr * Math.sin(omega * tS)) / omega;
}

/**
 * Peak current moment (A·m; A for planar, per metre of line) that radiates `power_w` over a perfect ground.
 * Axisymmetric and spherical: P = 80π²(I·l/λ)² for a short element standing on a perfect plane with its image (from the Hertzian
 * dipole's radiation resistance 80π²(l/λ)², doubled field over half the sphere: Balanis, Antenna Theory, ch. 4).
 * Planar: P′ = η0·p²·k/8 per metre for a line of vertical elements on a perfect plane (derived from the 2-D
 * Green's function −(j/4)H0⁽²⁾(kρ); derivation in solver/references/dipole.ts).
 */
export function targetMoment(c: Case): number {
  const lambdaM = C0 / c.frequency_hz;
  const P = c.source.power_w;
  // the sphere's radius is ≫ λ, so the element and its image radiate as over a plane (the same moment)
  if (c.geometry === 'axisymmetric' || c.geometry === 'spherical') return lambdaM * Math.sqrt(P / (80 * Math.PI * Math.PI));
  const k = (2 * Math.PI) / lambdaM;
  return Math.sqrt((8 * P) / (ETA0 * k));
}
