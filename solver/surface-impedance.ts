// Surface impedance of a homogeneous ground at one frequency, and its time-domain coefficients.
// The Leontovich condition E_tan = Zs·(n̂ × H) is applied at the ground row as E = −(R·H + L·dH/dt).
import { EPS0, ETA0, MU0 } from './constants.js';

export interface GroundImpedance {
  /** Surface resistance R = Re(Zs), Ω. */
  resistanceOhm: number;
  /** Surface inductance L = Im(Zs)/ω, H. */
  inductanceH: number;
  /** Loss tangent σ/(ωε0εr), dimensionless. */
  lossTangent: number;
  /** Skin depth √(2/(ωμ0σ)), m (good-conductor form). */
  skinDepthM: number;
}

/**
 * Leontovich impedance of a homogeneous half-space, η = η0/√ε_c with ε_c = ε_r − jσ/(ωε0) (e^{jωt}),
 * split at ω into R + jωL. For a good conductor this tends to (1+j)√(ωμ0/2σ): R = √(ωμ0/2σ), L = R/ω
 * (Senior & Volakis, Approximate Boundary Conditions in Electromagnetics, 1995, ch. 2; Maloney & Smith,
 * IEEE Trans. Antennas Propag. 40(1), 1992).
 */
export function groundImpedance(frequencyHz: number, conductivitySPerM: number, relativePermittivity: number): GroundImpedance {
  const omega = 2 * Math.PI * frequencyHz;
  const epsIm = -conductivitySPerM / (omega * EPS0); // ε_c = εr + j·epsIm
  // principal square root of ε_c
  const mod = Math.hypot(relativePermittivity, epsIm);
  const sRe = Math.sqrt((mod + relativePermittivity) / 2);
  const sIm = -Math.sqrt((mod - relativePermittivity) / 2); // ε_c in the 4th quadrant → √ε_c too
  // η = η0 / (sRe + j sIm)
  const den = sRe * sRe + sIm * sIm;
  const zRe = (ETA0 * sRe) / den;
  const zIm = (-ETA0 * sIm) / den;
  return {
    resistanceOhm: zRe,
    inductanceH: zIm / omega,
    lossTangent: conductivitySPerM / (omega * EPS0 * relativePermittivity),
    skinDepthM: Math.sqrt(2 / (omega * MU0 * conductivitySPerM)),
  };
}
