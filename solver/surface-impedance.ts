// Surface impedance of a homogeneous ground at one frequency, and its time-domain coefficients.
// The Leontovich condition E_tan = Zs·(n̂ × H) is applied at the ground row as E = −(R·H + L·dH/dt).
import { EPS0, ETA0, MU0 } from './constants.js';
import { impedanceRow, type ImpedanceRow } from './fdtd-kernel.js';

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

/** How the impedance row samples H at the surface (the case's `ground.impedance_sampling`). */
export type ImpedanceSampling = 'extrapolated' | 'half_cell';

/**
 * The surface-impedance row of the kernels (applySurfaceImpedance) from each column's surface resistance R (Ω) and
 * inductance L (H): a = R/2, b = L/Δt, and the weights of H at the surface from the two H rows above it:
 * `extrapolated` H(0) ≈ 1.5·H(Δz/2) − 0.5·H(3Δz/2) (linear extrapolation, second order), `half_cell`
 * H(0) ≈ H(Δz/2) (first order). `rowScale` multiplies each row's weight (default 1, 1): on the sphere the rows hold
 * H̃ = (ρ/a)·H, so H at the surface is 1.5·(a/ρ½)·H̃0 − 0.5·(a/ρ_{3/2})·H̃1 and the scales are a/ρ½, a/ρ_{3/2}.
 * The one builder for the solver, the normal-incidence column and the kernel benchmark.
 */
export function buildImpedanceRow(
  resistanceOhm: ArrayLike<number>,
  inductanceH: ArrayLike<number>,
  dtS: number,
  sampling: ImpedanceSampling,
  rowScale: readonly [number, number] = [1, 1],
): ImpedanceRow {
  const n = resistanceOhm.length;
  const halfR = new Float64Array(n);
  const lOverDt = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    halfR[i] = resistanceOhm[i] / 2;
    lOverDt[i] = inductanceH[i] / dtS;
  }
  const extrapolated = sampling === 'extrapolated';
  const wNear = extrapolated ? 1.5 : 1;
  const wFar = extrapolated ? -0.5 : 0;
  // (x·1 is x exactly in IEEE 754, so the flat grids' weights are the plain 1.5 and −0.5)
  return impedanceRow({ halfR, lOverDt, wNear: wNear * rowScale[0], wFar: wFar * rowScale[1], hsPrev: new Float64Array(n) });
}
