// The lowest (quasi-TEM) mode of a planar guide with a perfectly conducting ceiling and an impedance floor: the
// exact reference for the solver's planar geometry under a `pec` upper boundary, where a surface-impedance ground
// must reproduce the guide's attenuation. Time convention e^{jωt}, fields ∝ e^{−γx}; pure maths, no I/O.
import { C0, ETA0 } from '../constants.js';
import { type C, abs, add, c, cos, div, mul, mulJ, neg, scale, sin, sqrt, square, sub } from './complex.js';
import { normalisedSurfaceImpedance } from './fresnel.js';

export interface GuideMode {
  /** Attenuation constant α = Re γ (Np/m). */
  readonly alphaNpPerM: number;
  /** Phase constant β = Im γ (rad/m). */
  readonly betaRadPerM: number;
  /** Propagation constant γ = α + jβ (1/m). */
  readonly gamma: C;
  /** Vertical wavenumber k_z of the mode, Hy ∝ cos(k_z·(z − d)) (1/m). */
  readonly kz: C;
  /** Newton iterations taken. */
  readonly iterations: number;
}

/**
 * Lowest TM mode of the guide 0 < z < d with a perfect conductor at z = d and, at z = 0, the impedance condition
 * E_tan = Zs·(n̂ × H) (n̂ = +z out of the floor), Δ = Zs/η0. With Hy = cos(k_z(z − d)) the exact modal equation is
 *   k_z·tan(k_z·d) = j·k·Δ,   γ = √(k_z² − k²) = α + jβ
 * (derived here from Ampère's law Ex = −(1/(jωε0))∂Hy/∂z and Ex = −Zs·Hy at the floor; docs/references.md).
 *
 * Method: complex Newton iteration on f(k_z) = k_z·sin(k_z d) − jkΔ·cos(k_z d) (the same roots, no poles) from the
 * small-impedance root k_z² ≈ jkΔ/d (tan x ≈ x), stopped at a step below 1e-14·|k_z| (quadratic convergence:
 * 3–6 iterations for k·d·|Δ| ≤ 1, measured). The root of Re γ ≥ 0 is returned (a wave decaying along +x). Throws if Newton
 * fails to converge in 50 steps or lands on a higher mode (|Re k_z·d| ≥ π/2), which happens only for
 * k·d·|Δ| of order 1 or more, outside the quasi-TEM regime.
 * Special cases: Δ = 0 gives the TEM mode γ = jk exactly.
 */
export function parallelPlateGuideMode(frequencyHz: number, heightM: number, delta: C): GuideMode {
  const k = (2 * Math.PI * frequencyHz) / C0;
  const jkDelta = mulJ(scale(delta, k)); // j·k·Δ
  if (delta.re === 0 && delta.im === 0) {
    return { alphaNpPerM: 0, betaRadPerM: k, gamma: c(0, k), kz: c(0), iterations: 0 };
  }
  let kz = sqrt(scale(jkDelta, 1 / heightM)); // k_z² ≈ jkΔ/d for small k_z·d
  for (let iteration = 1; iteration <= 50; iteration++) {
    const arg = scale(kz, heightM);
    const s = sin(arg);
    const co = cos(arg);
    const f = sub(mul(kz, s), mul(jkDelta, co)); // k_z sin(k_z d) − jkΔ cos(k_z d)
    // f' = sin(k_z d) + k_z d cos(k_z d) + jkΔ d sin(k_z d)
    const df = add(add(s, mul(arg, co)), scale(mul(jkDelta, s), heightM));
    const step = div(f, df);
    kz = sub(kz, step);
    if (abs(step) <= 1e-14 * abs(kz)) {
      if (Math.abs(kz.re * heightM) >= Math.PI / 2) {
        throw new Error(`parallelPlateGuideMode: Newton reached a higher mode (k_z·d = ${kz.re * heightM})`);
      }
      let gamma = sqrt(sub(square(kz), c(k * k))); // γ = √(k_z² − k²)
      if (gamma.re < 0) gamma = neg(gamma);
      return { alphaNpPerM: gamma.re, betaRadPerM: gamma.im, gamma, kz, iterations: iteration };
    }
  }
  throw new Error(`parallelPlateGuideMode: no convergence for f = ${frequencyHz} Hz, d = ${heightM} m`);
}

/**
 * The guide over a homogeneous ground of conductivity σ and relative permittivity ε_r, with the floor's
 * normalised impedance Δ = 1/√ε_c (the Leontovich impedance η0/√ε_c over η0; fresnel.ts).
 */
export function parallelPlateGuideModeOverGround(
  frequencyHz: number,
  heightM: number,
  conductivitySPerM: number,
  relativePermittivity: number,
): GuideMode {
  const delta = normalisedSurfaceImpedance(frequencyHz, conductivitySPerM, relativePermittivity);
  return parallelPlateGuideMode(frequencyHz, heightM, delta);
}

/**
 * Perturbation estimate of the TEM attenuation with one lossy wall, α ≈ Rs/(2η0·d) (Np/m). Pozar, Microwave
 * Engineering (4th ed., 2012, the parallel-plate line, from memory) gives α_c = Rs/(η·d) for two lossy walls; one
 * wall dissipates half. It is the exact root's limit when both k·d·|Δ| ≪ 1 and |Δ|/(k·d) ≪ 1. Expanding
 * tan x ≈ x + x³/3 and γ = jk√(1 − k_z²/k²) one order further gives (derived here, checked by the tests)
 *   α ≈ Re Δ/(2d) + Im(Δ²)·(k/6 − 1/(8k·d²)),
 * i.e. for a good conductor (arg Δ = 45°) a relative excess of (√2/3)·k·d·|Δ| − (√2/4)·|Δ|/(k·d).
 */
export function oneLossyWallAttenuationNpPerM(surfaceResistanceOhm: number, heightM: number): number {
  return surfaceResistanceOhm / (2 * ETA0 * heightM); // α = Rs/(2η0 d)
}
