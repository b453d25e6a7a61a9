// The Faddeeva function w(z) = e^{−z²}·erfc(−iz) for every complex z, and the complex erfc built on it.
// It is the kernel of the Sommerfeld–Norton attenuation function (norton.ts). Pure maths: no I/O, no state
// beyond a table of 40 expansion coefficients computed once when the module loads. Equation numbers of
// Abramowitz & Stegun (1964) are quoted from memory.
import { type C, abs, add, c, div, exp, mul, mulJ, neg, scale, square, sub } from './complex.js';

const SQRT_PI = Math.sqrt(Math.PI);

/** Terms of the rational expansion; 40 gives double precision in the whole upper half-plane (measured). */
const WEIDEMAN_TERMS = 40;
/** Weideman's scale L = 2^{−1/4}·√N, the choice recommended in the paper for N terms. */
const WEIDEMAN_L = Math.sqrt(WEIDEMAN_TERMS / Math.SQRT2);
/** Beyond this |z| the Laplace continued fraction is used (20 levels reach 2e-16 there, measured). */
const CONTINUED_FRACTION_MIN_ABS = 8;
const CONTINUED_FRACTION_LEVELS = 20;

/**
 * Coefficients a_1..a_N of Weideman's expansion: the Fourier cosine coefficients of
 * f(θ) = e^{−t²}(L² + t²) with t = L·tan(θ/2), θ ∈ (−π, π) (Weideman 1994).
 * f is smooth and periodic (it vanishes to all orders at θ = ±π), so the trapezoidal rule on 4N intervals of
 * [0, π] converges spectrally; its aliasing error is below 1e-17 here.
 */
function weidemanCoefficients(n: number, l: number): Float64Array {
  const intervals = 4 * n;
  const samples = new Float64Array(intervals);
  const angles = new Float64Array(intervals);
  for (let k = 0; k < intervals; k++) {
    const theta = (k * Math.PI) / intervals;
    const t = l * Math.tan(theta / 2); // the map t = L·tan(θ/2) of Weideman 1994
    samples[k] = Math.exp(-t * t) * (l * l + t * t);
    angles[k] = theta;
  }
  const a = new Float64Array(n + 1);
  for (let m = 1; m <= n; m++) {
    // trapezoid for a_m = (1/π)∫_0^π f(θ)cos(mθ)dθ; the end θ = π contributes f = 0
    let sum = samples[0] / 2;
    for (let k = 1; k < intervals; k++) sum += samples[k] * Math.cos(m * angles[k]);
    a[m] = sum / intervals;
  }
  return a;
}

const WEIDEMAN_A = weidemanCoefficients(WEIDEMAN_TERMS, WEIDEMAN_L);

/** Weideman's rational series for Im z ≥ 0: w = 2·Σ a_n Z^{n−1}/(L − iz)² + 1/(√π(L − iz)), Z = (L + iz)/(L − iz). */
function weidemanUpper(z: C): C {
  const iz = mulJ(z);
  const d = sub(c(WEIDEMAN_L), iz); // L − iz
  const zeta = div(add(c(WEIDEMAN_L), iz), d); // Z = (L + iz)/(L − iz), Weideman 1994
  let p = c(WEIDEMAN_A[WEIDEMAN_TERMS]);
  for (let m = WEIDEMAN_TERMS - 1; m >= 1; m--) p = add(mul(p, zeta), c(WEIDEMAN_A[m])); // Horner
  // w(z) = 2p/(L − iz)² + 1/(√π(L − iz)), Weideman 1994
  return add(scale(div(p, square(d)), 2), div(c(1 / SQRT_PI), d));
}

/**
 * Tail r of Laplace's continued fraction, w(z) = (i/√π)/(z − r) with r = (1/2)/(z − 1/(z − (3/2)/(z − …)))
 * (Abramowitz & Stegun 1964, §7.1, eq. 7.1.15 from memory; W. Gautschi, "Efficient computation of the complex
 * error function", SIAM J. Numer. Anal. 7(1), 1970), for Im z ≥ 0 and |z| ≥ 8, where 20 levels give r to about
 * 2e-16 relative (measured). Exported for norton.ts, which needs w in this form to avoid a cancellation.
 */
export function laplaceContinuedFractionTail(z: C): C {
  let r = c(0);
  for (let k = CONTINUED_FRACTION_LEVELS; k >= 1; k--) r = div(c(k / 2), sub(z, r));
  return r;
}

/** w(z) = (i/√π)/(z − r), r the continued-fraction tail; Im z ≥ 0, |z| ≥ 8. */
function continuedFractionUpper(z: C): C {
  const q = div(c(1 / SQRT_PI), sub(z, laplaceContinuedFractionTail(z)));
  return mulJ(q); // i·q
}

/** Smallest |z| at which laplaceContinuedFractionTail is accurate (and faddeeva uses it). */
export const LAPLACE_CONTINUED_FRACTION_MIN_ABS = CONTINUED_FRACTION_MIN_ABS;

/**
 * Faddeeva function w(z) = e^{−z²}·erfc(−iz) (Abramowitz & Stegun 1964, eq. 7.1.3), for any complex z.
 *
 * Method:
 * - Im z ≥ 0, |z| < 8: J. A. C. Weideman, "Computation of the complex error function", SIAM J. Numer. Anal.
 *   31(5), 1497–1518, 1994, doi:10.1137/0731077: the rational series in Z = (L + iz)/(L − iz) with N = 40 terms,
 *   L = 2^{−1/4}√N. Measured against mpmath 1.3.0 (30 digits; scripts/reference-values.py) on a grid from
 *   |z| = 0 to 1e4 in the upper half-plane: relative error ≤ 1e-15 (see test/references.faddeeva.test.ts).
 * - Im z ≥ 0, |z| ≥ 8: Laplace's continued fraction with 20 levels: relative error ≤ 4e-16 (measured).
 * - Im z < 0: the reflection w(z) = 2e^{−z²} − w(−z) (A&S 7.1.11). Here e^{−z²} grows as e^{y²−x²}: the result
 *   overflows to ±Infinity/NaN once y² − x² ≳ 709, and its relative error grows like |2xy|·2^{−53} from the
 *   rounding of the phase −2xy; near the zeros of w (all in the lower half-plane) only absolute accuracy holds.
 *
 * Special cases: w(0) = 1 to rounding (1 + 2e-16); NaN in gives NaN out.
 * Symmetries (used by the tests): w(−z) = 2e^{−z²} − w(z); w(conj z) = conj(w(−z)); on the real axis
 * w(x) = e^{−x²} + (2i/√π)·D(x), D the Dawson integral (A&S 7.1.16).
 */
export function faddeeva(z: C): C {
  if (Number.isNaN(z.re) || Number.isNaN(z.im)) return c(Number.NaN, Number.NaN);
  if (z.im >= 0) return abs(z) >= CONTINUED_FRACTION_MIN_ABS ? continuedFractionUpper(z) : weidemanUpper(z);
  const mz = neg(z);
  const upper = abs(mz) >= CONTINUED_FRACTION_MIN_ABS ? continuedFractionUpper(mz) : weidemanUpper(mz);
  return sub(scale(exp(neg(square(z))), 2), upper); // A&S 7.1.11
}

/**
 * Complementary error function erfc(z) = 1 − erf(z) for complex z, from erfc(z) = e^{−z²}·w(iz) (A&S 7.1.3 read at
 * iz). For Re z ≥ 0, iz lies in the closed upper half-plane, where w is accurate to about 1e-15, and the product
 * is accurate to that plus the rounding of e^{−z²} (relative ≈ |z|²·2^{−53}); for Re z < 0 it uses
 * erfc(z) = 2 − erfc(−z) (A&S 7.1.9 with 7.1.2), accurate in absolute terms (erfc → 2 there).
 * Special cases: erfc(0) = 1; erfc(x) underflows to 0 for real x ≳ 26.5.
 */
export function erfc(z: C): C {
  if (z.re < 0) return sub(c(2), erfc(neg(z)));
  const iz = mulJ(z);
  return mul(exp(neg(square(z))), faddeeva(iz)); // erfc(z) = e^{−z²}·w(iz)
}

/**
 * Dawson's integral D(x) = e^{−x²}∫_0^x e^{t²}dt for real x, from Im w(x) = (2/√π)·D(x) (A&S 7.1.16).
 * Relative accuracy about 1e-15 (that of w).
 */
export function dawson(x: number): number {
  return (SQRT_PI / 2) * faddeeva(c(x)).im;
}
