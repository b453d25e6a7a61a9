// The planar grid under a perfect ceiling: the quasi-TEM mode over an impedance floor, its attenuation and phase
// constants fitted along the guide, against the exact modal root and the one-lossy-wall perturbation.
import { checkCase } from './check-case.js';
import { fitGuideConstants } from '../guide-fit.js';
import { solve } from '../index.js';
import { surfaceResistanceOhm } from '../references/fresnel.js';
import { oneLossyWallAttenuationNpPerM, parallelPlateGuideModeOverGround } from '../references/parallel-plate-guide.js';
import { outcome, type CheckFamily, type CheckOutcome, type ReferenceCheck, type Tolerance } from './outcome.js';

/** α allowed against the exact root (relative). */
export const GUIDE_ALPHA_TOLERANCE: Tolerance = {
  value: 0.01,
  relative: true,
  reason:
    'the fit over 31 receivers at 300 cells/λ lands within 0.07 % of the exact root (measured, both floors); 1 % keeps clear of that and still fails a floor loss 2 % wrong',
};
/** β allowed against the exact root (relative). */
export const GUIDE_BETA_TOLERANCE: Tolerance = {
  value: 5e-4,
  relative: true,
  reason:
    'above the Yee dispersion at 300 cells/λ (1.1e-5, derived) and the fit residual (≤ 8.8e-5, measured); the poor floor raises β above k by 12 %, which it resolves, the sea floor by 6.3e-4, about the tolerance',
};
/** α allowed against the one-lossy-wall perturbation (relative). */
export const GUIDE_PERTURBATION_TOLERANCE: Tolerance = {
  value: 0.01,
  relative: true,
  reason:
    'the perturbation reads 0.06 % above the exact root here (the derived correction in parallel-plate-guide.ts) and the fit 0.07 % above it (measured), so the two agree to 0.01 %; 1 % as for the exact root',
};

const GUIDE_SOURCE = 'exact root of k_z·tan(k_z·d) = j·k·Δ for a perfect ceiling over an impedance floor (REFERENCES.md, derived)';

/**
 * Planar guide, perfect ceiling 1 km up (below half a wavelength at 10 kHz), impedance floor: the attenuation and
 * phase constants of the quasi-TEM mode vs the exact root of k_z·tan(k_z·d) = j·k·Δ (REFERENCES.md), and for sea
 * water vs the one-lossy-wall perturbation Rs/(2η0·d) (Pozar, Microwave Engineering, 4th ed. 2012, §2.7, halved
 * for one lossy wall).
 */
export const guideCheck: ReferenceCheck = {
  id: 'planar-guide',
  run: () => {
    const f = 1e4;
    const h = 1000;
    const ranges: number[] = [];
    for (let x = 20000; x <= 80000; x += 2000) ranges.push(x);
    const out: CheckOutcome[] = [];
    for (const [sigma, eps] of [
      [1e-4, 10],
      [4, 80],
    ] as const) {
      const r = solve(
        checkCase({
          geometry: 'planar',
          frequency_hz: f,
          ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: sigma, relative_permittivity: eps }] },
          upper_boundary: { kind: 'pec', height_m: h },
          domain: { range_m: 100000, height_m: h },
          grid: { cells_per_wavelength: 300 },
          receivers: { ranges_m: ranges },
        }),
      );
      const fit = fitGuideConstants(ranges, r.receivers.map((x) => x.ez));
      const mode = parallelPlateGuideModeOverGround(f, h, sigma, eps);
      out.push(outcome(`guide α, ${sigma} S/m εr ${eps}, 10 kHz, ceiling 1 km (Np/m)`, GUIDE_SOURCE, mode.alphaNpPerM, fit.alpha, GUIDE_ALPHA_TOLERANCE, '', 5));
      out.push(outcome(`guide β, ${sigma} S/m εr ${eps}, 10 kHz, ceiling 1 km (rad/m)`, GUIDE_SOURCE, mode.betaRadPerM, fit.beta, GUIDE_BETA_TOLERANCE, '', 6));
      if (sigma === 4) {
        const pert = oneLossyWallAttenuationNpPerM(surfaceResistanceOhm(f, sigma), h);
        out.push(
          outcome(
            `guide α, sea water, vs TEM perturbation Rs/(2η0·d) (Np/m)`,
            'Pozar, Microwave Engineering, 4th ed. 2012, §2.7 (parallel-plate line, one lossy wall: half of Rs/(η·d))',
            pert,
            fit.alpha,
            GUIDE_PERTURBATION_TOLERANCE,
            '',
            5,
          ),
        );
      }
    }
    return out;
  },
};

export const planarGuideFamily: CheckFamily = {
  name: 'parallel-plate guide',
  checks: () => [guideCheck],
};
