// Plane-wave reflection of the ground models and of the absorbing layers: the Fresnel coefficient at normal
// incidence, and how little the CPML sends back.
import { runNormalIncidence } from '../normal-incidence.js';
import * as Cx from '../references/complex.js';
import { normalIncidenceReflection } from '../references/fresnel.js';
import { columnCase } from './column-case.js';
import { belowOutcome, db, fmtComplex, outcome, type Bound, type CheckFamily, type ReferenceCheck, type Tolerance } from './outcome.js';

const FRESNEL = 'Fresnel coefficient Γ=(η2−η0)/(η2+η0) (Balanis, Advanced Engineering Electromagnetics, 1989, ch. 5)';
const REFLECTION_CASES: Array<[number, number, number]> = [
  [1e4, 4, 80],
  [1e5, 0.01, 30],
  [3e5, 1e-3, 15],
];

/** |ΔΓ| allowed to the impedance ground at 40 cells/λ. */
export const IMPEDANCE_REFLECTION_TOLERANCE: Tolerance = {
  value: 2.5e-3,
  reason:
    'the extrapolated impedance row leaves |ΔΓ| up to 1.7e-3 at 40 cells/λ (measured, 300 kHz, loss tangent 4; second order: test/solver.convergence.test.ts), while a 10 % error in σ moves Γ there by 9.5e-3 (derived)',
};
/** |ΔΓ| allowed to the resolved ground at 20 cells/λ. */
export const RESOLVED_REFLECTION_TOLERANCE: Tolerance = {
  value: 5e-3,
  reason:
    'the resolved ground (quarter-skin-depth rows, a half-air interface node) leaves |ΔΓ| up to 3.5e-3 at 20 cells/λ (measured, 300 kHz), while a 10 % error in σ moves Γ there by 9.5e-3 (derived)',
};

/** Normal-incidence reflection of each ground model vs the exact coefficient: |Γ_fdtd − Γ| (complex distance). */
export const reflectionCheck = (model: 'impedance' | 'resolved', cpw: number, tolerance: Tolerance): ReferenceCheck => ({
  id: `reflection-${model}`,
  run: () =>
    REFLECTION_CASES.map(([f, s, e]) => {
      const r = runNormalIncidence(columnCase(f, s, e, model, cpw));
      const exact = normalIncidenceReflection(f, s, e);
      const dist = Cx.abs(Cx.sub(r.groundReflection, exact));
      const o = outcome(`normal-incidence Γ, ${model} ground, ${s} S/m εr ${e} at ${f / 1e3} kHz, ${cpw} cells/λ (|ΔΓ|)`, FRESNEL, 0, dist, tolerance);
      o.expected = fmtComplex(exact);
      o.got = fmtComplex(r.groundReflection);
      return o;
    }),
});

/** The reflection a CPML may send back (dB): the error budget of the field-strength checks. */
export const CPML_REFLECTION_BOUND: Bound = {
  below: -40,
  reason:
    'a wave sent back at −40 dB (1 %) moves a field by up to 20·log10(1.01) = 0.09 dB (derived), inside the ±0.1 dB of the field-strength checks',
};

export const absorbingLayerCheck: ReferenceCheck = {
  id: 'cpml-reflection',
  run: () => {
    const r = runNormalIncidence(columnCase(2e4, 4, 80, 'impedance', 20));
    return [
      belowOutcome(
        'open top (40-cell CPML) normal-incidence reflection, 20 cells/λ',
        'Roden & Gedney, Microwave Opt. Technol. Lett. 27(5), 2000 (target below −40 dB)',
        CPML_REFLECTION_BOUND,
        db(r.topReflectionMagnitude),
        ' dB',
        1,
      ),
    ];
  },
};

export const reflectionFamily: CheckFamily = {
  name: 'plane-wave reflection and absorbing layers',
  checks: () => [
    reflectionCheck('impedance', 40, IMPEDANCE_REFLECTION_TOLERANCE),
    reflectionCheck('resolved', 20, RESOLVED_REFLECTION_TOLERANCE),
    absorbingLayerCheck,
  ],
};
