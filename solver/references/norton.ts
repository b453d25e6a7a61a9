// The Sommerfeld–Norton flat-earth attenuation function of the ground wave, its numerical distance, and the
// field ratio over a homogeneous ground against a perfect one: the closed form the FDTD over an impedance
// ground is verified against. Time convention e^{jωt}; no I/O.
import { C0 } from '../constants.js';
import { type C, abs, add, c, div, mul, mulJ, neg, recip, scale, sqrt, sub } from './complex.js';
import { LAPLACE_CONTINUED_FRACTION_MIN_ABS, faddeeva, laplaceContinuedFractionTail } from './faddeeva.js';
import { complexPermittivity } from './fresnel.js';

/**
 * Sommerfeld–Norton attenuation function F(w) = 1 − j√(πw)·e^{−w}·erfc(j√w) for the ground wave of a vertical
 * dipole with both ends at ground level (A. Sommerfeld, Ann. Phys. 28, 1909; K. A. Norton, Proc. IRE 24, 1936;
 * J. R. Wait, "The ancient and modern history of EM ground-wave propagation", IEEE Antennas Propag. Mag. 40(5),
 * 1998), time convention e^{jωt}.
 *
 * Method: e^{−w}·erfc(j√w) is the Faddeeva function at z = −√w (w(z) = e^{−z²}erfc(−iz)), √w the principal
 * root. For a passive ground −π/2 ≤ arg w ≤ 0, so z lies in the closed upper half-plane.
 * - |w| < 64 (|z| < 8), or z below the real axis: F = 1 − j√(πw)·w(z) with w(z) from faddeeva.ts. Measured
 *   against mpmath: relative error ≤ 1e-15·max(1, |w|) (the two terms cancel as F → −1/(2w)).
 * - |w| ≥ 64, z in the upper half-plane: with Laplace's continued fraction w(z) = (i/√π)/(z − r) the difference
 *   is formed exactly: F = 1 − √w/(√w + r) = r/(√w + r), with no cancellation (derived). Measured: ≤ 3e-16.
 *
 * Limits (used by the tests): small |w|: F = 1 − j√(πw) − 2w + j√π·w^{3/2} + (4/3)w² + … (from the power series
 * of w(z), A&S 7.1.5); large |w|: F ~ −Σ (2n−1)!!/(2w)^n = −1/(2w) − 3/(4w²) − … (from the asymptotic series of
 * w(z)). Special cases: F(0) = 1.
 */
export function nortonAttenuation(w: C): C {
  const rootW = sqrt(w);
  const z = neg(rootW);
  if (z.im >= 0 && abs(z) >= LAPLACE_CONTINUED_FRACTION_MIN_ABS) {
    const r = laplaceContinuedFractionTail(z);
    return div(r, add(rootW, r)); // F = r/(√w + r) (derived from the continued fraction)
  }
  const kernel = faddeeva(z); // e^{−w}·erfc(j√w) = w_Faddeeva(−√w)
  const factor = mulJ(scale(rootW, Math.sqrt(Math.PI))); // j√(πw)
  return sub(c(1), mul(factor, kernel)); // F = 1 − j√(πw)·e^{−w}erfc(j√w)
}

/**
 * Which normalised impedance Δ enters the numerical distance:
 * - `grazing`: Δ = √(ε_c − 1)/ε_c, the exact grazing-incidence value in the Sommerfeld–Norton solution
 *   (Norton 1936; Wait 1998);
 * - `surface-impedance`: Δ = 1/√ε_c = Zs/η0, the normal-incidence surface impedance that an impedance-boundary
 *   model (such as the solver's ground row) imposes. The two differ by a relative 1/(2ε_c) to first order.
 */
export type NortonDeltaForm = 'grazing' | 'surface-impedance';

/** Δ of a homogeneous ground in the chosen form (dimensionless; see NortonDeltaForm). */
export function nortonDelta(
  frequencyHz: number,
  conductivitySPerM: number,
  relativePermittivity: number,
  form: NortonDeltaForm = 'grazing',
): C {
  const epsC = complexPermittivity(frequencyHz, conductivitySPerM, relativePermittivity);
  if (form === 'surface-impedance') return recip(sqrt(epsC)); // Δ = 1/√ε_c
  return div(sqrt(sub(epsC, c(1))), epsC); // Δ = √(ε_c − 1)/ε_c
}

/**
 * Numerical distance w = −j·k·d·Δ²/2 (dimensionless; k = ω/c0, d the range in m; Wait 1998, with the e^{jωt}
 * convention). For a good conductor (σ ≫ ωε0ε_r) and Δ = 1/√ε_c it tends to the real πd/(λx), x = σ/(ωε0),
 * Norton's (1936) numerical distance p for vertical polarisation (from memory).
 */
export function numericalDistance(frequencyHz: number, rangeM: number, delta: C): C {
  const k = (2 * Math.PI * frequencyHz) / C0;
  const d2 = mul(delta, delta);
  return scale(mulJ(d2), -(k * rangeM) / 2); // −j·(k d/2)·Δ²
}

export interface NortonOptions {
  /** Which Δ to use in the numerical distance. @defaultValue 'grazing' */
  readonly deltaForm?: NortonDeltaForm;
}

/**
 * Field over a homogeneous flat ground divided by the field over a perfect ground at the same range, both ends
 * at ground level: F(w(d)) (complex, e^{jωt}). The same ratio holds for the 2-D line source over an impedance
 * plane with w = −j·k·x·Δ²/2 (docs/references.md, derived from the exact spectral integral to 0.02–0.6 % for
 * k·x from 10 to 3000). Valid for k·d ≫ 1 (the formula drops near-field terms of relative size 1/(kd)).
 */
export function nortonFieldRatio(
  frequencyHz: number,
  conductivitySPerM: number,
  relativePermittivity: number,
  rangeM: number,
  options: NortonOptions = {},
): C {
  const delta = nortonDelta(frequencyHz, conductivitySPerM, relativePermittivity, options.deltaForm ?? 'grazing');
  return nortonAttenuation(numericalDistance(frequencyHz, rangeM, delta));
}
