// The ground wave over a homogeneous lossy ground: the field ratio to a perfect ground against the
// Sommerfeld–Norton attenuation function, and the impedance ground model against the resolved ground.
import type { CaseInput } from '../../schemas/case.js';
import { checkCase } from './check-case.js';
import { solve } from '../index.js';
import * as Cx from '../references/complex.js';
import { nortonDelta, nortonFieldRatio, numericalDistance } from '../references/norton.js';
import { db, outcome, type CheckFamily, type CheckOutcome, type ReferenceCheck, type Tolerance } from './outcome.js';

export const NORTON_SOURCE =
  'Sommerfeld–Norton attenuation F(w) = 1 − j√(πw)e^{−w}erfc(j√w) (Norton, Proc. IRE 24, 1936; Wait, IEEE Antennas Propag. Mag. 40(5), 1998)';

export interface NortonCase {
  frequencyHz: number;
  sigma: number;
  epsR: number;
  rangesM: number[];
  domainRangeM: number;
  domainHeightM: number;
}

/** The numerical distances compared: 0.1 ≤ |w| ≤ 10, where F(w) is neither ≈ 1 nor ≈ −1/(2w). */
const W_MIN = 0.1;
const W_MAX = 10;

/** Low numerical distances (|w| 0.1–1): 100 kHz over 5e-4 S/m, εr 10. */
export const NORTON_NEAR: NortonCase = {
  frequencyHz: 1e5,
  sigma: 5e-4,
  epsR: 10,
  rangesM: [10000, 25000, 50000, 80000],
  domainRangeM: 90000,
  domainHeightM: 15000,
};
/** High numerical distances (|w| 1.5–10): 300 kHz over 3.3e-4 S/m, εr 2 (ranges of 10 wavelengths and more, where
 *  the closed form itself is within a few tenths of a dB of the exact integral: REFERENCES.md, numerical notes). */
export const NORTON_FAR: NortonCase = {
  frequencyHz: 3e5,
  sigma: 3.3e-4,
  epsR: 2,
  rangesM: [10000, 20000, 40000, 60000],
  domainRangeM: 65000,
  domainHeightM: 3000,
};

/** Allowed difference from 20·log10|F(w)| (dB), NORTON_NEAR on the axisymmetric grid. */
export const NORTON_NEAR_AXISYMMETRIC_TOLERANCE_DB: Tolerance = {
  value: 0.5,
  reason:
    "the closed form reads low by up to 0.27 dB at 10 km (REFERENCES.md measurement against the exact integral, this very case) and the impedance row's grid error adds about 0.05 dB at 20 cells/λ (REFERENCES.md)",
};
/** NORTON_NEAR on the planar grid. */
export const NORTON_NEAR_PLANAR_TOLERANCE_DB: Tolerance = {
  value: 0.5,
  reason:
    "the 2-D closed form reads low by 0.07–0.13 dB here (REFERENCES.md measurement) and the impedance row's grid error adds about 0.05 dB at 20 cells/λ (REFERENCES.md); kept at the 3-D case's 0.5 dB",
};
/** NORTON_FAR on the axisymmetric grid. */
export const NORTON_FAR_AXISYMMETRIC_TOLERANCE_DB: Tolerance = {
  value: 0.5,
  reason:
    "the closed form's own error is not measured for this ground (for the 100 kHz case: 0.27 dB at 3.3 λ, 0.13 dB at 17 λ, REFERENCES.md); with the impedance row's ~0.05 dB, 0.5 dB covers the 0.35 dB measured at 10 λ",
};

/**
 * Field over an impedance ground divided by the field over a perfect one, against F(w), where 0.1 ≤ |w| ≤ 10.
 * The ground model is an impedance plane, so Δ = Zs/η0 = 1/√ε_c in the numerical distance (Wait 1998, eq. for
 * the impedance-plane form).
 */
export const nortonCheck = (geometry: 'axisymmetric' | 'planar', nc: NortonCase, toleranceDb: Tolerance): ReferenceCheck => ({
  id: `norton-${geometry}-${nc.frequencyHz / 1e3}khz`,
  run: () => {
    const { frequencyHz: f, sigma, epsR: eps, rangesM: ranges } = nc;
    const base: CaseInput = {
      geometry,
      frequency_hz: f,
      ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: sigma, relative_permittivity: eps }] },
      domain: { range_m: nc.domainRangeM, height_m: nc.domainHeightM },
      grid: { cells_per_wavelength: 20 },
      receivers: { ranges_m: ranges },
    };
    const over = solve(checkCase(base));
    const pec = solve(checkCase({ ...base, ground: { model: 'pec' } }));
    const out: CheckOutcome[] = [];
    ranges.forEach((d, i) => {
      const w = numericalDistance(f, d, nortonDelta(f, sigma, eps, 'surface-impedance'));
      if (Cx.abs(w) < W_MIN || Cx.abs(w) > W_MAX) return;
      const F = nortonFieldRatio(f, sigma, eps, d, { deltaForm: 'surface-impedance' });
      const ratio = Cx.div(over.receivers[i].ez, pec.receivers[i].ez);
      out.push(
        outcome(
          `${geometry}: |E/E_pec| at ${d / 1e3} km, ${f / 1e3} kHz, ${sigma} S/m εr ${eps}, |w| = ${Cx.abs(w).toFixed(2)} (dB)`,
          NORTON_SOURCE,
          db(Cx.abs(F)),
          db(Cx.abs(ratio)),
          toleranceDb,
          ' dB',
          3,
        ),
      );
    });
    return out;
  },
});

/** |Ez| allowed between the impedance and the resolved ground (dB). */
export const IMPEDANCE_VS_RESOLVED_TOLERANCE_DB: Tolerance = {
  value: 0.3,
  reason:
    "at loss tangent 12 (|N| = 13, near the impedance condition's validity limit |N| ≳ 10: Senior, from memory) the two models differ by 0.11–0.19 dB (measured); 0.3 dB flags a change in either beyond that",
};

/** The two ground models on one case: the impedance model against the resolved ground where σ/(ωε0εr) ≥ 10. */
export const impedanceVsResolvedCheck: ReferenceCheck = {
  id: 'impedance-vs-resolved',
  run: () => {
    const base: CaseInput = {
      frequency_hz: 1e5,
      ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 1e-3, relative_permittivity: 15 }] },
      domain: { range_m: 40000, height_m: 10000 },
      grid: { cells_per_wavelength: 20 },
      receivers: { ranges_m: [5000, 10000, 20000, 30000] },
    };
    const imp = solve(checkCase(base));
    const res = solve(checkCase({ ...base, ground: { ...base.ground, model: 'resolved' } }));
    return imp.receivers.map((x, i) =>
      outcome(
        `|Ez| impedance vs resolved ground, 100 kHz, 1e-3 S/m εr 15 (loss tangent 12), ${x.range_m / 1e3} km (dB)`,
        'Leontovich condition vs the resolved lossy half-space (Senior & Volakis, Approximate Boundary Conditions in Electromagnetics, 1995)',
        res.receivers[i].ez_db_uv_per_m,
        x.ez_db_uv_per_m,
        IMPEDANCE_VS_RESOLVED_TOLERANCE_DB,
        ' dB',
        3,
      ),
    );
  },
};

export const groundWaveFamily: CheckFamily = {
  name: 'Sommerfeld–Norton ground wave and impedance vs resolved',
  checks: () => [
    nortonCheck('axisymmetric', NORTON_NEAR, NORTON_NEAR_AXISYMMETRIC_TOLERANCE_DB),
    nortonCheck('planar', NORTON_NEAR, NORTON_NEAR_PLANAR_TOLERANCE_DB),
    nortonCheck('axisymmetric', NORTON_FAR, NORTON_FAR_AXISYMMETRIC_TOLERANCE_DB),
    impedanceVsResolvedCheck,
  ],
};
