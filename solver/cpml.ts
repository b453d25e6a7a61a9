// Convolutional PML (Roden & Gedney, Microwave Opt. Technol. Lett. 27(5), 2000) coefficients for one axis.
// Each absorbing cell keeps an auxiliary ψ per field: ψ ← b·ψ + a·(difference of the field across the cell),
// and the update adds ψ to the plain curl. κ = 1 (the grid is many cells per wavelength; stretching buys little).
import { EPS0, ETA0 } from './constants.js';
import { cpmlState, type CpmlState } from './fdtd-kernel.js';

export interface CpmlProfile {
  /** Coefficient b at depth position j (half-integer positions for H, integer for E; see `positions`). */
  b: Float64Array;
  a: Float64Array;
}

/** Polynomial grading order m (cubic: common practice, Taflove & Hagness ch. 7). */
const GRADING_ORDER = 3;
/** ln of the nominal normal-incidence reflection of the layer (docs/references.md, Numerical notes: ln R0 = −40 measured). */
const LN_R0 = -40;

/**
 * Profile for `count` positions at depths ρ_j = offsetCells + j (in cells) into a layer `thickness` cells deep:
 * σ(ρ) = σmax (ρ/L)^m with σmax = −(m+1)·ln R0/(2η0·L) (Taflove & Hagness, eq. 7.60 family),
 * α(ρ) = αmax (1 − ρ/L) (complex-frequency-shifted form; αmax a small fraction of ωε0 so the layer keeps
 * absorbing the propagating wave at the source frequency), b = exp(−(σ + α)Δt/ε0), a = σ/(σ + α)·(b − 1).
 */
export function cpmlProfile(
  count: number,
  offsetCells: number,
  thickness: number,
  cellM: number,
  dtS: number,
  frequencyHz: number,
): CpmlProfile {
  const L = thickness * cellM;
  const sigmaMax = (-(GRADING_ORDER + 1) * LN_R0) / (2 * ETA0 * L);
  const alphaMax = 0.05 * 2 * Math.PI * frequencyHz * EPS0;
  const b = new Float64Array(count);
  const a = new Float64Array(count);
  for (let j = 0; j < count; j++) {
    const rho = Math.min(Math.max((offsetCells + j) / thickness, 0), 1);
    const sigma = sigmaMax * Math.pow(rho, GRADING_ORDER);
    const alpha = alphaMax * (1 - rho);
    const bj = Math.exp(-((sigma + alpha) * dtS) / EPS0);
    b[j] = bj;
    a[j] = sigma + alpha > 0 ? (sigma / (sigma + alpha)) * (bj - 1) : 0;
  }
  return { b, a };
}

/**
 * The CPML state of an nx × nz grid with a `px`-cell layer at the far side and a `pz`-row layer at the top
 * (either may be 0): H sits half a cell deeper into each layer than the E it is paired with.
 */
export function buildCpmlState(
  nx: number,
  nz: number,
  px: number,
  pz: number,
  cellM: number,
  dtS: number,
  frequencyHz: number,
): CpmlState {
  const S = nz + 1;
  const hx = cpmlProfile(px, 0.5, px, cellM, dtS, frequencyHz);
  const ez = cpmlProfile(px, 0, px, cellM, dtS, frequencyHz);
  const hz = cpmlProfile(pz, 0.5, pz, cellM, dtS, frequencyHz);
  const ex = cpmlProfile(pz, 0, pz, cellM, dtS, frequencyHz);
  return cpmlState({
    ix0: nx - px,
    px,
    kz0: nz - pz,
    pz,
    bHx: hx.b,
    aHx: hx.a,
    bEz: ez.b,
    aEz: ez.a,
    bHz: hz.b,
    aHz: hz.a,
    bEx: ex.b,
    aEx: ex.a,
    psiHx: new Float64Array(px * S),
    psiEz: new Float64Array(px * S),
    psiHz: new Float64Array(nx * pz),
    psiEx: new Float64Array(nx * pz),
  });
}
