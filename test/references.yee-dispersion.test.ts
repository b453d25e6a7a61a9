// Numerical dispersion of the Yee grid against the derived values of docs/references.md, the exact diagonal and
// magic-time-step cases, and the second-order error expansion.
import { describe, expect, it } from 'vitest';
import { C0 } from '../solver/constants.js';
import {
  yeeMaxTimeStepS,
  yeePhaseVelocityRatio,
  yeePhaseVelocityRatioNormalised,
} from '../solver/references/yee-dispersion.js';
import { expectRealClose } from './references.expect-close.js';

describe('Yee numerical dispersion', () => {
  // Dispersion relation of Taflove & Hagness, Computational Electrodynamics, ch. 4 (memory); values from
  // docs/references.md ("derived"). Tolerance: half a unit of the sixth decimal.
  it.each([
    { dimensions: 2 as const, courant: Math.SQRT1_2, n: 10, want: 0.991485 },
    { dimensions: 2 as const, courant: Math.SQRT1_2, n: 20, want: 0.997926 },
    { dimensions: 1 as const, courant: 0.5, n: 10, want: 0.987264 },
    { dimensions: 1 as const, courant: 0.5, n: 20, want: 0.996892 },
    { dimensions: 1 as const, courant: 0.5, n: 40, want: 0.999227 },
  ])('when the grid is $dimensions-D, S = $courant, $n cells/λ, along an axis then v_p/c = $want', ({ dimensions, courant, n, want }) => {
    const v = yeePhaseVelocityRatioNormalised({ cellsPerWavelength: n, courant, dimensions });
    expectRealClose('v_p/c', v, want, 0, 5e-7);
    // the z axis gives the same on square cells (closed form on the other branch)
    const vz = yeePhaseVelocityRatioNormalised({ cellsPerWavelength: n, courant, dimensions, angleRad: Math.PI / 2 });
    if (dimensions === 2) expectRealClose('v_p/c along z', vz, v, 1e-15);
  });

  it.each([5, 10, 20, 80])('when 2-D square cells at S = 1/√2 carry %s cells/λ along the diagonal then v_p = c', (n) => {
    // Exact: on the diagonal k̃x = k̃z = k̃/√2 and the relation reduces to sin(k̃Δ/(2√2)) = sin(ωΔt/2) with
    // cΔt = Δ/√2 (docs/references.md, "exactly 1", derived). Tolerance: Newton's stop 1e-15 plus rounding.
    const v = yeePhaseVelocityRatioNormalised({ cellsPerWavelength: n, courant: Math.SQRT1_2, angleRad: Math.PI / 4 });
    expectRealClose('v_p/c', v, 1, 3e-15);
  });

  it.each([3, 10, 40])('when a 1-D grid runs at the magic time step S = 1 with %s cells/λ then v_p = c', (n) => {
    // Taflove & Hagness 2005, ch. 2 ("magic time step", memory): at S = 1 the 1-D scheme is dispersionless.
    expectRealClose('v_p/c', yeePhaseVelocityRatioNormalised({ cellsPerWavelength: n, courant: 1, dimensions: 1 }), 1, 1e-15);
  });

  it.each([
    { dimensions: 1 as const, courant: 0.5, n: 40 },
    { dimensions: 1 as const, courant: 0.9, n: 100 },
    { dimensions: 2 as const, courant: 0.5, n: 60 },
  ])('when the grid is fine ($n cells/λ, $dimensions-D, S = $courant) then the lag is (kΔ)²(1 − S²)/24 along an axis', ({ dimensions, courant, n }) => {
    // Second-order expansion of the axis closed form: k̃/k = 1 + (kΔ)²(1 − S²)/24 + O((kΔ)⁴) (derived; the
    // well-known second-order accuracy of the scheme, Taflove & Hagness ch. 4). Tolerance: the O((kΔ)⁴) rest,
    // whose coefficient (1 − S²)(9 − S²)/1920 − (1 − S²)²/576 is at most 0.003 for 0 ≤ S ≤ 1 (derived by series
    // of the arcsine); (kΔ)⁴/100 bounds it with margin for the higher terms.
    const kd = (2 * Math.PI) / n;
    const v = yeePhaseVelocityRatioNormalised({ cellsPerWavelength: n, courant, dimensions });
    expectRealClose('lag', 1 - v, (kd ** 2 * (1 - courant ** 2)) / 24, 0, kd ** 4 / 100);
  });

  it('when the wave crosses the grid at 30° then v_p lies between the axis and diagonal values', () => {
    // The Yee grid's phase error is largest along the axes and smallest on the diagonal (Taflove & Hagness ch. 4,
    // memory); checked at 10 cells/λ, S = 0.5 on square cells, and the Newton root satisfies the relation.
    const n = 10;
    const [axis, at30, diagonal] = [0, Math.PI / 6, Math.PI / 4].map((angleRad) =>
      yeePhaseVelocityRatioNormalised({ cellsPerWavelength: n, courant: 0.5, angleRad }),
    );
    expect(axis).toBeLessThan(at30);
    expect(at30).toBeLessThan(diagonal);
    // residual of the dispersion relation at the returned root (Δ = 1, so λ = n and ω/c = 2π/n)
    const k = (2 * Math.PI) / n / at30;
    const lhs = (Math.sin((Math.PI * 0.5) / n) / 0.5) ** 2; // [sin(ωΔt/2)/(cΔt)]², ωΔt = 2π·S/n
    const rhs = Math.sin((k * Math.cos(Math.PI / 6)) / 2) ** 2 + Math.sin((k * Math.sin(Math.PI / 6)) / 2) ** 2;
    expectRealClose('relation residual', rhs, lhs, 1e-14);
  });

  it('when Δt is chosen so a whole number of steps fits one period then the dimensional form gives the same v_p', () => {
    // 20 kHz, Δx = 750 m, Δz = 500 m, 100 steps per period (Δt = 0.5 µs, S within the 2-D limit): the
    // dimensional call and the normalised one agree, and the Courant limit 1/(c√(1/Δx² + 1/Δz²)) holds.
    const f = 20e3;
    const dt = 1 / f / 100;
    const limit = yeeMaxTimeStepS(750, 500);
    expectRealClose('Courant limit', limit, 1 / (C0 * Math.sqrt(1 / 750 ** 2 + 1 / 500 ** 2)), 1e-15);
    expect(dt).toBeLessThan(limit);
    const v = yeePhaseVelocityRatio({ frequencyHz: f, timeStepS: dt, cellSizeXM: 750, cellSizeZM: 500 });
    const vn = yeePhaseVelocityRatioNormalised({ cellsPerWavelength: C0 / f / 750, courant: (C0 * dt) / 750, dimensions: 1 });
    expectRealClose('axis x, 2-D vs 1-D form', v, vn, 1e-15);
    const oblique = yeePhaseVelocityRatio({ frequencyHz: f, timeStepS: dt, cellSizeXM: 750, cellSizeZM: 500, angleRad: 0.6 });
    expect(oblique).toBeGreaterThan(0.99);
    expect(oblique).toBeLessThan(1);
  });

  it('when the grid has fewer than two cells per wavelength then no real wavenumber exists and NaN is returned', () => {
    // Along an axis sin(k̃Δ/2) = sin(ωΔt/2)/S must be ≤ 1: at 1.5 cells/λ and S = 0.5 it is sin(π/3)/0.5 = 1.73.
    expect(Number.isNaN(yeePhaseVelocityRatioNormalised({ cellsPerWavelength: 1.5, courant: 0.5 }))).toBe(true);
  });
});
