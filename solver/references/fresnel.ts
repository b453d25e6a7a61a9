// Plane-wave facts of a homogeneous lossy ground: complex permittivity, intrinsic (Leontovich surface) impedance,
// its good-conductor form, skin depth, and the normal-incidence reflection coefficient. The exact references the
// surface-impedance ground of the solver is checked against. Time convention e^{jωt}; SI units; no I/O.
import { EPS0, ETA0, MU0 } from '../constants.js';
import { type C, add, c, div, scale, sqrt, sub } from './complex.js';

/**
 * Complex relative permittivity ε_c = ε_r − jσ/(ωε0) of a ground with conductivity σ (S/m) and relative
 * permittivity ε_r at frequency f (e^{jωt}: loss makes Im ε_c negative; Balanis, Advanced Engineering
 * Electromagnetics, 1989, ch. 2 on lossy media, from memory). σ/(ωε0ε_r) is the loss tangent.
 */
export function complexPermittivity(frequencyHz: number, conductivitySPerM: number, relativePermittivity: number): C {
  const omega = 2 * Math.PI * frequencyHz;
  return c(relativePermittivity, -conductivitySPerM / (omega * EPS0)); // ε_c = ε_r − jσ/(ωε0)
}

/**
 * Intrinsic impedance of the ground, η2 = √(jωμ0/(σ + jωε0ε_r)) = η0/√ε_c (Ω; Balanis 1989, ch. 2, from memory),
 * principal root, so Re η2 > 0 and 0 ≤ arg η2 < π/4 (inductive) for any passive ground. Used as the Leontovich
 * surface impedance Zs of a homogeneous ground: E_tan = Zs·(n̂ × H), n̂ out of the ground. Exact for a plane wave
 * at normal incidence; for other incidence its relative error is about 1/|N|², N = √ε_c the refractive index
 * (the condition is usually taken as valid for |N| ≳ 10: T. B. A. Senior's reports on impedance boundary
 * conditions, from memory).
 */
export function surfaceImpedance(frequencyHz: number, conductivitySPerM: number, relativePermittivity: number): C {
  const epsC = complexPermittivity(frequencyHz, conductivitySPerM, relativePermittivity);
  return div(c(ETA0), sqrt(epsC)); // η2 = η0/√ε_c
}

/**
 * Skin depth δ = √(2/(ωμ0σ)) (m) of a good conductor (Pozar, Microwave Engineering, 4th ed., 2012, ch. 1,
 * from memory). Only meaningful where σ ≫ ωε0ε_r.
 */
export function skinDepthM(frequencyHz: number, conductivitySPerM: number): number {
  const omega = 2 * Math.PI * frequencyHz;
  return Math.sqrt(2 / (omega * MU0 * conductivitySPerM)); // δ = √(2/(ωμσ))
}

/** Surface resistance Rs = √(ωμ0/(2σ)) = 1/(σδ) (Ω; Pozar 2012, ch. 1, from memory). */
export function surfaceResistanceOhm(frequencyHz: number, conductivitySPerM: number): number {
  const omega = 2 * Math.PI * frequencyHz;
  return Math.sqrt((omega * MU0) / (2 * conductivitySPerM)); // Rs = √(ωμ/2σ)
}

/** Surface inductance Ls = Rs/ω (H): the reactance of the good-conductor impedance equals its resistance. */
export function surfaceInductanceH(frequencyHz: number, conductivitySPerM: number): number {
  return surfaceResistanceOhm(frequencyHz, conductivitySPerM) / (2 * Math.PI * frequencyHz); // Ls = Rs/ω
}

/**
 * Good-conductor surface impedance Zs ≈ (1 + j)·√(ωμ0/(2σ)) = Rs + jωLs (Ω; Pozar 2012, ch. 1, from memory).
 * It is the leading term of η0/√ε_c for x = σ/(ωε0ε_r) ≫ 1; its relative error is about 1/(2x)
 * (η0/√(ε_r − jσ/(ωε0)) = Zs·(1 + jε_rωε0/σ)^{−1/2}, expanded to first order: derived).
 */
export function goodConductorSurfaceImpedance(frequencyHz: number, conductivitySPerM: number): C {
  const rs = surfaceResistanceOhm(frequencyHz, conductivitySPerM);
  return c(rs, rs); // (1 + j)·Rs
}

/**
 * Reflection coefficient of a plane wave at normal incidence from air onto the lossy half-space,
 * Γ = (η2 − η0)/(η2 + η0) (ratio of reflected to incident tangential E; Balanis 1989, ch. 5, from memory).
 * |Γ| → 1 and Γ → −1 for a perfect conductor (η2 → 0).
 */
export function normalIncidenceReflection(
  frequencyHz: number,
  conductivitySPerM: number,
  relativePermittivity: number,
): C {
  const eta2 = surfaceImpedance(frequencyHz, conductivitySPerM, relativePermittivity);
  const eta0 = c(ETA0);
  return div(sub(eta2, eta0), add(eta2, eta0)); // Γ = (η2 − η0)/(η2 + η0)
}

/** Normalised surface impedance Δ = Zs/η0 = 1/√ε_c (dimensionless), the form the guide and Norton modules take. */
export function normalisedSurfaceImpedance(
  frequencyHz: number,
  conductivitySPerM: number,
  relativePermittivity: number,
): C {
  return scale(surfaceImpedance(frequencyHz, conductivitySPerM, relativePermittivity), 1 / ETA0); // Δ = η/η0
}
