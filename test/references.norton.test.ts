// The Sommerfeld–Norton attenuation function against the derived values of docs/references.md, an
// arbitrary-precision library, its small- and large-w series, and the numerical distance of a good conductor.
import { describe, expect, it } from 'vitest';
import { C0, EPS0 } from '../solver/constants.js';
import { type C, abs, add, c, fromPolar, mul, scale, sqrt, sub } from '../solver/references/complex.js';
import { complexPermittivity } from '../solver/references/fresnel.js';
import {
  nortonAttenuation,
  nortonDelta,
  nortonFieldRatio,
  numericalDistance,
} from '../solver/references/norton.js';
import { expectComplexClose, expectRealClose } from './references.expect-close.js';

// mpmath 1.3.0, 30 digits, F(w) = 1 − j√(πw)·e^{−w}·erfc(j√w) with mpmath's own erfc (scripts/reference-values.py).
// Rows [Re w, Im w, Re F, Im F].
const MPMATH_F: ReadonlyArray<readonly [number, number, number, number]> = [
  [1.0e-3, 0.0, 0.99800133280015235, -0.055993890267432073],
  [0.10000000000000001, 0.0, 0.81281490553423375, -0.50716057803597343],
  [1.0, 0.0, -0.076159013825536838, -0.65204933217329218],
  [3.0, 0.0, -0.26126934292133246, -0.15284531031357888],
  [10.0, 0.0, -0.060751619858032897, -2.5446620754381049e-4],
  [100.0, 0.0, -5.0769437519705607e-3, -6.5936629893592268e-43],
  [1.0e+3, 0.0, -5.0075188159219474e-4, -2.8450705035561619e-433],
  [7.0710678118654752, -7.0710678118654752, -0.033297992520397648, -0.043814186221620813],
  [2.5, -4.3301270189221932, -0.023182044817209945, -0.10303526536923784],
  [7.1157419136642627, -49.491072094046636, -1.1300066368933424e-3, -9.9686004083197751e-3],
];
// Same source: 100 kHz, 5e-4 S/m, ε_r 10, 100 km; [Re F, Im F] with the grazing Δ (w = 1.1489 − 0.1406j), then
// [Re F, Im F] with Δ = 1/√ε_c (w = 1.1517 − 0.1281j).
const NORTON_CASE = [-0.095031682910187638, -0.55259991488431519, -0.099276512558858148, -0.55618249680263292];

describe('Sommerfeld–Norton attenuation function F(w)', () => {
  // Sommerfeld 1909; Norton, Proc. IRE 24, 1936; Wait, IEEE Antennas Propag. Mag. 40(5), 1998: values from
  // docs/references.md ("derived"). Tolerance: half a unit of the last decimal quoted, per component.
  it.each([
    { w: c(0.1), re: 0.812815, im: -0.507161, half: 5e-7 },
    { w: c(1), re: -0.076159, im: -0.652049, half: 5e-7 },
    { w: c(10), re: -0.0607516, im: -0.000254, half: 5e-7 },
    { w: c(100), re: -0.00507694, im: 0, half: 5e-9 },
    { w: fromPolar(10, -Math.PI / 4), re: -0.033298, im: -0.043814, half: 5e-7 },
  ])('when w = $w.re + $w.im j then F(w) = $re + $im j', ({ w, re, im, half }) => {
    const f = nortonAttenuation(w);
    expectRealClose('Re F', f.re, re, 0, half);
    expectRealClose('Im F', f.im, im, 0, half);
  });

  it('when w ranges over 1e-3 … 1e3 at phases 0 … −80° then F agrees with mpmath to 1e-15·max(1, |w|)', () => {
    // Tolerance: the Faddeeva kernel is good to 1e-15; below |w| = 64 the difference 1 − j√(πw)·w(−√w) loses a
    // factor up to |w| to cancellation (F → −1/(2w)); above it the continued-fraction form avoids it.
    for (const [x, y, re, im] of MPMATH_F) {
      const tol = 1e-15 * Math.max(1, Math.hypot(x, y));
      expectComplexClose(`F(${x} + ${y}j)`, nortonAttenuation(c(x, y)), c(re, im), tol);
    }
  });

  it.each([1e-6, 1e-4, 1e-3])('when |w| = %s is small then F follows 1 − j√(πw) − 2w + j√π·w^{3/2} + (4/3)w²', (r) => {
    // Power series of w(z) (A&S 7.1.5: w(z) = Σ (iz)^n/Γ(n/2 + 1)) at z = −√w, multiplied out (derived):
    // F = 1 − j√(πw) − 2w + j√π w^{3/2} + (4/3)w² − j(√π/2)w^{5/2} + …. Tolerance: the first omitted term,
    // doubled, plus rounding 2e-16. The three-term form quoted in the brief is checked with its own omitted term.
    for (const phase of [0, -Math.PI / 4, -Math.PI / 2]) {
      const w = fromPolar(r, phase);
      const rootW = sqrt(w);
      const w32 = mul(w, rootW);
      const jSqrtPi = (z: C) => scale(c(-z.im, z.re), Math.sqrt(Math.PI)); // j√π·z
      const three = sub(sub(c(1), jSqrtPi(rootW)), scale(w, 2));
      const five = add(add(three, jSqrtPi(w32)), scale(mul(w, w), 4 / 3));
      const f = nortonAttenuation(w);
      expectComplexClose('five-term series', f, five, 2 * (Math.sqrt(Math.PI) / 2) * r ** 2.5 + 2e-16);
      expectComplexClose('three-term series', f, three, 2 * Math.sqrt(Math.PI) * r ** 1.5 + 2e-16);
    }
  });

  it.each([1e2, 1e3, 1e5])('when |w| = %s is large then F tends to −1/(2w), with −3/(4w²) next', (r) => {
    // Asymptotic series F ~ −Σ (2n−1)!!/(2w)^n (from that of w(z), A&S 7.1.23; docs/references.md: F → −1/(2w)).
    // Tolerance: the first omitted term 15/(8|w|³) relative to |1/(2w)| is 15/(4|w|²); doubled.
    for (const phase of [0, -Math.PI / 6, -Math.PI / 3, -Math.PI / 2]) {
      const w = fromPolar(r, phase);
      const inv2w = fromPolar(1 / (2 * r), -phase);
      const twoTerms = scale(add(inv2w, scale(mul(inv2w, inv2w), 3)), -1);
      expectComplexClose(`F(${w.re} + ${w.im}j)`, nortonAttenuation(w), twoTerms, 2 * (15 / (4 * r * r)) + 1e-15);
      // the leading term alone, to its own first omitted term 3/(2|w|)
      expectComplexClose('−1/(2w)', nortonAttenuation(w), scale(inv2w, -1), 2 * (3 / (2 * r)));
    }
  });

  it('when w = 0 then F = 1, and |F| ≤ 1 along the positive real axis', () => {
    expectComplexClose('F(0)', nortonAttenuation(c(0)), c(1), 0);
    // |F(p)| decreases from 1 for real p (Norton 1936, his curves of the attenuation factor; memory).
    let previous = 1;
    for (const p of [0.01, 0.1, 0.5, 1, 2, 5, 10, 50]) {
      const m = abs(nortonAttenuation(c(p)));
      expect(m).toBeLessThan(previous);
      previous = m;
    }
  });
});

describe('numerical distance and the field ratio', () => {
  it.each([
    { name: 'sea water 4 S/m, ε_r 80 at 20 kHz, 500 km', f: 20e3, sigma: 4, epsR: 80, d: 500e3 },
    { name: 'land 3e-2 S/m, ε_r 40 at 50 kHz, 100 km', f: 50e3, sigma: 3e-2, epsR: 40, d: 100e3 },
  ])('when the ground is a good conductor ($name) then w tends to Norton’s real πd/(λx)', ({ f, sigma, epsR, d }) => {
    // Norton 1936, vertical polarisation, x = σ/(ωε0) = 1.8e4·σ/f_MHz ≫ ε_r: p = πd/(λx) (from memory). With
    // Δ = 1/√ε_c, w = −j(kd/2)/ε_c = p·(1 + jε_r/x)^{−1} exactly (derived), so the relative difference is ε_r/x.
    const x = sigma / (2 * Math.PI * f * EPS0);
    const p = (Math.PI * d) / ((C0 / f) * x);
    const w = numericalDistance(f, d, nortonDelta(f, sigma, epsR, 'surface-impedance'));
    expectComplexClose('w', w, c(p), 1.01 * (epsR / x));
    expect(abs(sub(w, c(p))) / p).toBeGreaterThan(0.99 * (epsR / x) / Math.sqrt(1 + (epsR / x) ** 2));
  });

  it.each([
    { f: 10e3, sigma: 4, epsR: 80 },
    { f: 100e3, sigma: 5e-4, epsR: 10 },
    { f: 300e3, sigma: 1e-4, epsR: 3 },
  ])('when σ = $sigma S/m, ε_r = $epsR at $f Hz then the grazing Δ and 1/√ε_c differ by 1/(2ε_c)', ({ f, sigma, epsR }) => {
    // √(ε_c − 1)/ε_c ÷ (1/√ε_c) = √(1 − 1/ε_c) = 1 − 1/(2ε_c) − 1/(8ε_c²) − … (docs/references.md: Δ ≈ 1/√ε_c;
    // derived). Tolerance: the next term 1/(8|ε_c|²), doubled.
    const epsC = complexPermittivity(f, sigma, epsR);
    const grazing = nortonDelta(f, sigma, epsR, 'grazing');
    const surface = nortonDelta(f, sigma, epsR, 'surface-impedance');
    const inv = c(epsC.re / (epsC.re ** 2 + epsC.im ** 2), -epsC.im / (epsC.re ** 2 + epsC.im ** 2));
    const ratio = mul(grazing, sqrt(epsC));
    const first = sub(c(1), scale(inv, 0.5));
    expectComplexClose('ratio', ratio, first, 2 / (8 * abs(epsC) ** 2));
    expectComplexClose('Δ = 1/√ε_c', mul(surface, sqrt(epsC)), c(1), 2.3e-16);
  });

  it('when the case is 100 kHz over 5e-4 S/m, ε_r 10 then the field ratio follows from w = −jkdΔ²/2', () => {
    // Composition check against mpmath 1.3.0 (scripts/reference-values.py, same inputs): 100 km, grazing Δ.
    // Tolerance 1e-14: the kernel's 1e-15 plus the rounding of ε_c, Δ² and w (a few ulps each).
    const ratio = nortonFieldRatio(100e3, 5e-4, 10, 100e3);
    expectComplexClose('F', ratio, c(NORTON_CASE[0], NORTON_CASE[1]), 1e-14);
    const simple = nortonFieldRatio(100e3, 5e-4, 10, 100e3, { deltaForm: 'surface-impedance' });
    expectComplexClose('F, Δ = 1/√ε_c', simple, c(NORTON_CASE[2], NORTON_CASE[3]), 1e-14);
  });
});
