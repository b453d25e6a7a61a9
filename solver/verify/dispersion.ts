// Numerical dispersion: the phase velocity the grid gives a wave, measured on the 1-D column and on the 2-D
// planar grid, against the Yee dispersion relation.
import { checkCase } from './check-case.js';
import { C0 } from '../constants.js';
import { solve } from '../index.js';
import { newtonRoot } from '../newton.js';
import { runNormalIncidence } from '../normal-incidence.js';
import { unwrapNearRad } from '../phase.js';
import { hankel2Order1 } from '../references/bessel.js';
import { arg } from '../references/complex.js';
import { yeePhaseVelocityRatio } from '../references/yee-dispersion.js';
import { columnCase } from './column-case.js';
import { outcome, type CheckFamily, type CheckOutcome, type ReferenceCheck, type Tolerance } from './outcome.js';

const YEE_SOURCE = 'Yee 2-D dispersion relation (Taflove & Hagness, Computational Electrodynamics, 3rd ed. 2005, eq. 4.12)';

/** v_p/c allowed on the 1-D column. */
export const COLUMN_PHASE_VELOCITY_TOLERANCE: Tolerance = {
  value: 2e-5,
  reason:
    'the column measures v_p/c to about 2e-6 (measured: whole-period DFT, top layer at −133 dB), and 2e-5 is 1/500 of the dispersion it checks (1 − v_p/c = 1.0e-2 at 10 cells/λ)',
};
/** v_p/c allowed on the 2-D grid. */
export const GRID_PHASE_VELOCITY_TOLERANCE: Tolerance = {
  value: 1.5e-4,
  reason:
    'the line-source setup leaves up to 1.1e-4 (measured over its 4 λ baseline, 10 cells/λ along the ground), and 1.5e-4 is 1/17 of the along-ground dispersion at 20 cells/λ (2.5e-3) and a third of the diagonal\'s (4.5e-4)',
};

export const dispersionCheck: ReferenceCheck = {
  id: 'yee-dispersion',
  run: () =>
    [10, 20].map((cpw) => {
      const c = columnCase(2e4, 4, 80, 'impedance', cpw);
      const r = runNormalIncidence(c);
      const expected = yeePhaseVelocityRatio({ frequencyHz: c.frequency_hz, timeStepS: r.dtS, cellSizeXM: r.dzM, cellSizeZM: r.dzM, angleRad: Math.PI / 2 });
      return outcome(
        `phase velocity v_p/c along a grid axis, ${cpw} cells/λ, Courant ${((C0 * r.dtS) / r.dzM).toFixed(3)}`,
        YEE_SOURCE,
        expected,
        r.measuredPhaseVelocityRatio,
        COLUMN_PHASE_VELOCITY_TOLERANCE,
        '',
        6,
      );
    }),
};

/**
 * Phase velocity on the 2-D planar grid along the ground and along the 45° diagonal, from Hy of a line source on
 * a perfect plane: Hy ∝ cos φ·H1⁽²⁾(k̃ρ) exactly (the 2-D Green's function; Harrington, Time-Harmonic
 * Electromagnetic Fields, 1961, §5-12, from memory), so k̃ is the root of arg H1(k̃ρ2) − arg H1(k̃ρ1) = measured.
 */
export const dispersion2dCheck: ReferenceCheck = {
  id: 'yee-dispersion-2d',
  run: () => {
    const f = 1e5;
    const lambdaM = C0 / f;
    const k = (2 * Math.PI) / lambdaM;
    const rho = [4 * lambdaM, 8 * lambdaM];
    const out: CheckOutcome[] = [];
    for (const cpw of [10, 20]) {
      for (const angle of [0, Math.PI / 4]) {
        const h = (r: number) => {
          const res = solve(
            checkCase({
              geometry: 'planar',
              frequency_hz: f,
              ground: { model: 'pec' },
              domain: { range_m: 9.5 * lambdaM, height_m: 9.5 * lambdaM },
              grid: { cells_per_wavelength: cpw },
              receivers: { ranges_m: [r * Math.cos(angle)], height_m: r * Math.sin(angle) },
            }),
          );
          return { h: res.receivers[0].h, dt: res.grid.time_step_s, dx: res.grid.cell_size_m };
        };
        const a = h(rho[0]);
        const b = h(rho[1]);
        const measured = unwrapNearRad(arg(b.h) - arg(a.h), -k * (rho[1] - rho[0]));
        const residual = (kk: number) => unwrapNearRad(arg(hankel2Order1(kk * rho[1])) - arg(hankel2Order1(kk * rho[0])), -kk * (rho[1] - rho[0])) - measured;
        // difference step 1e-9·k: the phases are about k·Δρ ≈ 25 rad, so round-off puts ~1e-7 relative error on
        // the difference derivative, which only slows the last steps; stop at a step of 1e-15·k (a few ulps)
        const kt = newtonRoot(residual, k, { derivativeStep: 1e-9 * k, stepTolerance: 1e-15 * k }).root;
        const expected = yeePhaseVelocityRatio({ frequencyHz: f, timeStepS: a.dt, cellSizeXM: a.dx, cellSizeZM: a.dx, angleRad: angle });
        out.push(
          outcome(
            `phase velocity v_p/c on the 2-D grid ${angle === 0 ? 'along the ground' : 'along the diagonal'}, ${cpw} cells/λ`,
            YEE_SOURCE,
            expected,
            k / kt,
            GRID_PHASE_VELOCITY_TOLERANCE,
            '',
            6,
          ),
        );
      }
    }
    return out;
  },
};

export const dispersionFamily: CheckFamily = {
  name: 'dispersion and phase velocity',
  checks: () => [dispersionCheck, dispersion2dCheck],
};
