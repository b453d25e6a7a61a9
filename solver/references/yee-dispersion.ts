// Numerical dispersion of the Yee scheme on a 2-D (or 1-D) grid: the phase velocity a grid of given cell sizes
// and time step gives a plane wave, against which the solver's grid-convergence and phase checks are read.
// Pure maths, no I/O.
import { C0 } from '../constants.js';

/**
 * Largest stable time step of the 2-D Yee scheme, Δt ≤ 1/(c·√(1/Δx² + 1/Δz²)) (s) (Courant limit; Taflove &
 * Hagness, Computational Electrodynamics, 3rd ed., 2005, ch. 4, from memory).
 */
export function yeeMaxTimeStepS(cellSizeXM: number, cellSizeZM: number): number {
  return 1 / (C0 * Math.sqrt(1 / cellSizeXM ** 2 + 1 / cellSizeZM ** 2)); // Courant limit in 2-D
}

export interface YeeGrid {
  /** Frequency of the plane wave (Hz). */
  readonly frequencyHz: number;
  /** Time step (s). */
  readonly timeStepS: number;
  /** Cell size along x (or r) (m). */
  readonly cellSizeXM: number;
  /** Cell size along z (m); ignored in 1-D. */
  readonly cellSizeZM: number;
  /** Direction of propagation from the x axis (rad). @defaultValue 0 */
  readonly angleRad?: number;
  /** 1 for a 1-D grid (x only), 2 for the x–z grid. @defaultValue 2 */
  readonly dimensions?: 1 | 2;
}

/**
 * Numerical phase velocity over the speed of light, v_p/c = ω/(c·k̃), of a plane wave on the Yee grid, from the
 * dispersion relation (Taflove & Hagness 2005, ch. 4, from memory)
 *   [sin(ωΔt/2)/(cΔt)]² = [sin(k̃·cos φ·Δx/2)/Δx]² + [sin(k̃·sin φ·Δz/2)/Δz]²
 * (1-D: the first term on the right only).
 *
 * Method: along an axis (or in 1-D) the closed form k̃ = (2/Δ)·asin((Δ/(cΔt))·sin(ωΔt/2)); otherwise Newton's
 * iteration on k̃ from k = ω/c, which converges quadratically (the right side grows with k̃ below the grid
 * cut-off); stopped at a step below 1e-15·k̃ (at most 6 iterations, measured from 3 to 1000 cells/λ), so the
 * result is good to a few ulps.
 * Special cases: returns NaN when no real k̃ exists (the wave is evanescent on the grid: |arcsine argument| > 1,
 * e.g. about 3 cells per wavelength or fewer near an axis, or a time step beyond the Courant limit).
 */
export function yeePhaseVelocityRatio(grid: YeeGrid): number {
  const { frequencyHz, timeStepS, cellSizeXM, cellSizeZM } = grid;
  const angle = grid.angleRad ?? 0;
  const omega = 2 * Math.PI * frequencyHz;
  const s = Math.sin((omega * timeStepS) / 2) / (C0 * timeStepS); // left side of the dispersion relation, rooted
  const cosA = Math.cos(angle);
  const sinA = Math.sin(angle);
  const alongX = grid.dimensions === 1 || Math.abs(sinA) < 1e-15;
  const alongZ = grid.dimensions !== 1 && Math.abs(cosA) < 1e-15;
  if (alongX || alongZ) {
    const cell = alongX ? cellSizeXM : cellSizeZM;
    const q = s * cell;
    if (q > 1) return Number.NaN;
    const kNum = (2 / cell) * Math.asin(q); // closed form along an axis
    return omega / (C0 * kNum);
  }
  const ax = (cosA * cellSizeXM) / 2;
  const az = (sinA * cellSizeZM) / 2;
  let k = omega / C0;
  for (let iteration = 0; iteration < 60; iteration++) {
    const g = (Math.sin(ax * k) / cellSizeXM) ** 2 + (Math.sin(az * k) / cellSizeZM) ** 2 - s * s;
    // dg/dk̃ = ax·sin(2ax·k̃)/Δx² + az·sin(2az·k̃)/Δz²
    const dg = (ax * Math.sin(2 * ax * k)) / cellSizeXM ** 2 + (az * Math.sin(2 * az * k)) / cellSizeZM ** 2;
    if (!(dg > 0)) return Number.NaN; // past the grid cut-off: no real root on this branch
    const step = g / dg;
    k -= step;
    if (Math.abs(step) <= 1e-15 * k) return omega / (C0 * k);
  }
  return Number.NaN;
}

export interface YeeNormalisedGrid {
  /** Wavelength over the (square) cell size, λ/Δ. */
  readonly cellsPerWavelength: number;
  /** Courant number S = cΔt/Δ (the 2-D limit on square cells is 1/√2, in 1-D 1). */
  readonly courant: number;
  /** Direction of propagation from the x axis (rad). @defaultValue 0 */
  readonly angleRad?: number;
  /** @defaultValue 2 */
  readonly dimensions?: 1 | 2;
}

/** v_p/c on square cells from the cells per wavelength and the Courant number (see yeePhaseVelocityRatio). */
export function yeePhaseVelocityRatioNormalised(grid: YeeNormalisedGrid): number {
  const frequencyHz = 1; // the ratio depends only on λ/Δ and S; any frequency will do
  const cellM = C0 / frequencyHz / grid.cellsPerWavelength;
  return yeePhaseVelocityRatio({
    frequencyHz,
    timeStepS: (grid.courant * cellM) / C0,
    cellSizeXM: cellM,
    cellSizeZM: cellM,
    angleRad: grid.angleRad,
    dimensions: grid.dimensions,
  });
}
