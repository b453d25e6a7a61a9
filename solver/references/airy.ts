// Airy functions Ai, Ai', Bi, Bi' of complex argument, their real zeros, and Fock's Airy function w(t) of the
// e^{jωt} convention: the building blocks of the spherical-earth residue series (spherical-earth.ts). Pure maths,
// double precision, no tables beyond two constants, no I/O. Equation numbers of Abramowitz & Stegun, Handbook of
// Mathematical Functions (1964), chapter 10.4, are quoted from memory; every one is checked against mpmath 1.3.0
// in test/references.airy.test.ts (values from scripts/airy-reference-values.py).
import { type C, abs, add, c, div, exp, fromPolar, mul, neg, scale, sub } from './complex.js';

/** Ai(0) = 1/(3^{2/3}Γ(2/3)) (A&S 10.4.4; digits from memory, confirmed by mpmath). */
const AI_AT_0 = 0.3550280538878172;
/** Ai'(0) = −1/(3^{1/3}Γ(1/3)) (A&S 10.4.5; digits from memory, confirmed by mpmath). */
const AIP_AT_0 = -0.2588194037928068;
/** Below this |z| the Maclaurin series is used directly (its cancellation costs at most e^{2|ζ|} ≈ 12 ulps here). */
const SERIES_MAX_ABS = 1.5;
/**
 * From this |z| on, the asymptotic expansion is used: there |ζ| = (2/3)|z|^{3/2} ≥ 18, and the expansion's smallest
 * term, about e^{−2|ζ|} ≈ 2e-16 relative, is below double-precision rounding (measured: the doc of airyAi; with the
 * switch at 6 instead the error reaches 1e-11 and the tests fail).
 */
const ASYMPTOTIC_MIN_ABS = 9;
/** Largest step |h| of the Taylor integration of the Airy equation (e^{√|z|·|h|} ≤ e^{1.5}: no cancellation). */
const TAYLOR_MAX_STEP = 0.5;
/** A Taylor or asymptotic sum stops when its terms fall below this fraction of the sum (half an ulp). */
const SUM_RELATIVE_FLOOR = 1e-17;
/** Terms after which a Taylor step gives up (never reached: the terms of a step of 0.5 at |z| ≤ 9 die by ~45). */
const TAYLOR_MAX_TERMS = 200;
/** ω = e^{2πj/3}, the rotation of the Airy connection formulas (A&S 10.4.7, 10.4.9). */
const OMEGA = fromPolar(1, (2 * Math.PI) / 3);
const OMEGA_BAR = fromPolar(1, (-2 * Math.PI) / 3);
const SQRT_PI = Math.sqrt(Math.PI);

/** Ai and its derivative at one point. */
export interface AiryAi {
  readonly ai: C;
  readonly aip: C;
}

/** Ai, Ai', Bi, Bi' at one point. */
export interface AiryValues extends AiryAi {
  readonly bi: C;
  readonly bip: C;
}

/**
 * One Taylor step of the Airy equation w'' = z·w: from w(z0), w'(z0) to w(z0 + h), w'(z0 + h).
 * The local series w(z0 + h) = Σ a_n h^n has a_0 = w, a_1 = w', 2a_2 = z0·a_0 and
 * (n + 2)(n + 1)a_{n+2} = z0·a_n + a_{n−1} (substituting the series into w'' = (z0 + h)w; derived). It is carried
 * in the scaled terms b_n = a_n h^n; summed until two consecutive terms fall below half an ulp of the sum.
 * With z0 = 0 and the values Ai(0), Ai'(0) this is the Maclaurin series of A&S 10.4.2–10.4.3.
 */
function taylorStep(z0: C, w: C, wp: C, h: C): AiryAi {
  if (h.re === 0 && h.im === 0) return { ai: w, aip: wp }; // a step of zero (z = 0 from the origin)
  const h2z0 = mul(mul(h, h), z0); // z0·h²
  const h3 = mul(mul(h, h), h);
  let bPrev = w; // b_0
  let bCur = mul(wp, h); // b_1
  let bPrevPrev = c(0); // b_{−1} = 0
  let value = add(bPrev, bCur);
  let deriv = bCur; // Σ n·b_n (divided by h at the end)
  for (let n = 0; n < TAYLOR_MAX_TERMS; n++) {
    // b_{n+2} = (z0 h² b_n + h³ b_{n−1})/((n + 2)(n + 1))
    const bNext = scale(add(mul(h2z0, bPrev), mul(h3, bPrevPrev)), 1 / ((n + 2) * (n + 1)));
    value = add(value, bNext);
    deriv = add(deriv, scale(bNext, n + 2));
    bPrevPrev = bPrev;
    bPrev = bCur;
    bCur = bNext;
    // stop once b_{n+1} and b_{n+2} (weighted by their order, as they enter the derivative) are below half an ulp
    if (n >= 2 && (n + 3) * (abs(bCur) + abs(bPrev)) <= SUM_RELATIVE_FLOOR * (abs(value) + abs(deriv))) break;
  }
  return { ai: value, aip: div(deriv, h) };
}

/** Integrates w'' = z·w along the straight segment from z0 to z1 in Taylor steps of at most TAYLOR_MAX_STEP. */
function integrateAiry(z0: C, start: AiryAi, z1: C): AiryAi {
  const span = sub(z1, z0);
  const steps = Math.max(1, Math.ceil(abs(span) / TAYLOR_MAX_STEP));
  const h = scale(span, 1 / steps);
  let state = start;
  for (let i = 0; i < steps; i++) {
    const zi = add(z0, scale(span, i / steps));
    state = taylorStep(zi, state.ai, state.aip, h);
  }
  return state;
}

/**
 * Poincaré asymptotic expansion of Ai and Ai' for |arg z| ≤ 2π/3, z given in polar form r·e^{jφ} so that the
 * powers z^{1/4} and z^{3/2} are the principal ones without a rounded atan2 (A&S 10.4.59, 10.4.61):
 *   Ai(z) ~ e^{−ζ}/(2√π·z^{1/4})·Σ (−1)^k u_k ζ^{−k},   Ai'(z) ~ −z^{1/4}e^{−ζ}/(2√π)·Σ (−1)^k v_k ζ^{−k},
 *   ζ = (2/3)z^{3/2},  u_0 = v_0 = 1,  u_k = u_{k−1}·(6k − 5)(6k − 3)(6k − 1)/(216·k·(2k − 1)),
 *   v_k = −u_k·(6k + 1)/(6k − 1)   (A&S 10.4.58, from memory; the first values u_1 = 5/72, v_1 = −7/72).
 * Summed up to the smallest term. Inside |arg z| ≤ 2π/3 the other exponential e^{+ζ} is at most of relative size
 * e^{−2|ζ|} (it reaches that only on the Stokes lines arg z = ±2π/3), below rounding for |z| ≥ 9.
 */
function asymptoticAi(r: number, phi: number): AiryAi {
  const zeta = fromPolar((2 / 3) * r ** 1.5, 1.5 * phi);
  const invZeta = div(c(1), zeta);
  let sumU = c(1);
  let sumV = c(1);
  let power = c(1); // (−1/ζ)^k
  let u = 1;
  let lastSize = Number.POSITIVE_INFINITY;
  for (let k = 1; k < 100; k++) {
    u *= ((6 * k - 5) * (6 * k - 3) * (6 * k - 1)) / (216 * k * (2 * k - 1)); // u_k (A&S 10.4.58)
    const v = (-u * (6 * k + 1)) / (6 * k - 1); // v_k
    power = neg(mul(power, invZeta));
    const size = Math.abs(u) * abs(power);
    if (size > lastSize) break; // past the smallest term: stop (optimal truncation)
    sumU = add(sumU, scale(power, u));
    sumV = add(sumV, scale(power, v));
    lastSize = size;
    if (size < SUM_RELATIVE_FLOOR) break;
  }
  const e = exp(neg(zeta));
  const quarter = fromPolar(r ** 0.25, phi / 4); // z^{1/4}
  const ai = div(mul(e, sumU), scale(quarter, 2 * SQRT_PI));
  const aip = neg(scale(mul(mul(quarter, e), sumV), 1 / (2 * SQRT_PI)));
  return { ai, aip };
}

/**
 * Large |z|, any argument φ ∈ (−π, π]: the expansion directly for |φ| ≤ 2π/3; beyond, the connection formula
 * Ai(z) = −ω·Ai(ωz) − ω̄·Ai(ω̄z), ω = e^{2πj/3} (A&S 10.4.7), whose two rotated points lie inside |arg| ≤ 2π/3,
 * and its derivative Ai'(z) = −ω̄·Ai'(ωz) − ω·Ai'(ω̄z) (derived: d/dz Ai(ωz) = ω·Ai'(ωz), ω² = ω̄).
 */
function asymptoticAiAnyArg(r: number, phi: number): AiryAi {
  const limit = (2 * Math.PI) / 3;
  if (Math.abs(phi) <= limit) return asymptoticAi(r, phi);
  // arguments of ωz and ω̄z brought back into (−π, π]
  const phiOmega = phi > 0 ? phi - (4 * Math.PI) / 3 : phi + (2 * Math.PI) / 3;
  const phiOmegaBar = phi > 0 ? phi - (2 * Math.PI) / 3 : phi + (4 * Math.PI) / 3;
  const a = asymptoticAi(r, phiOmega); // Ai(ωz)
  const b = asymptoticAi(r, phiOmegaBar); // Ai(ω̄z)
  return {
    ai: neg(add(mul(OMEGA, a.ai), mul(OMEGA_BAR, b.ai))), // A&S 10.4.7
    aip: neg(add(mul(OMEGA_BAR, a.aip), mul(OMEGA, b.aip))),
  };
}

/**
 * Ai(z) and Ai'(z) for complex z (A&S 10.4.1: the solution of w'' = z·w that decays along the positive real axis).
 *
 * Method by regime (r = |z|, φ = arg z):
 * - r ≤ 1.5: Maclaurin series (A&S 10.4.2–10.4.3, as one Taylor step from the origin);
 * - r ≥ 9: Poincaré asymptotic expansion (A&S 10.4.59, 10.4.61), with the connection formula A&S 10.4.7 for
 *   |φ| > 2π/3;
 * - 1.5 < r < 9: Taylor integration of the Airy equation along the ray through z, in steps of at most 0.5, in the
 *   direction in which Ai grows, so that rounding errors are not amplified: inward from the asymptotic value at
 *   r = 9 where Ai is recessive (|φ| ≤ π/3, Re ζ ≥ 0), outward from the origin elsewhere (A. Gil, J. Segura and
 *   N. M. Temme, Numerical Methods for Special Functions, SIAM 2007, discuss this choice of direction for
 *   recurrences and ODEs; the local Taylor recurrence is derived in taylorStep).
 * Measured against mpmath 1.3.0 (30 digits, on the double nearest each point) on rings |z| = 0.1 … 60 at 48
 * arguments each (768 points; the test keeps 31 of them, from scripts/airy-reference-values.py): relative error
 * ≤ 5e-15 for |z| < 9; beyond, it grows like the condition number |z·Ai'/Ai| ≈ |z|^{3/2} of the function (the
 * phase ζ is rounded), about 1.2e-15·|z|^{3/2}: 2.6e-14 at |z| = 9.5, 5e-14 at 20, 2.2e-13 at 40, 5e-13 at 60.
 * These hold away from the zeros of the function; near a zero only the absolute error, relative to the envelope
 * |e^{−ζ}|/|z|^{1/4}, keeps that size.
 * Special cases: Ai(0) = 0.355028053887817, Ai'(0) = −0.258819403792807; NaN in gives NaN out; Ai overflows to
 * Infinity for Re ζ ≲ −709 (|z| ≳ 100 off the Stokes sectors) and underflows to 0 for Re ζ ≳ 745.
 */
export function airyAi(z: C): AiryAi {
  if (Number.isNaN(z.re) || Number.isNaN(z.im)) return { ai: c(Number.NaN, Number.NaN), aip: c(Number.NaN, Number.NaN) };
  const r = abs(z);
  if (r <= SERIES_MAX_ABS) return taylorStep(c(0), c(AI_AT_0), c(AIP_AT_0), z);
  const phi = Math.atan2(z.im, z.re);
  if (r >= ASYMPTOTIC_MIN_ABS) return asymptoticAiAnyArg(r, phi);
  if (Math.abs(phi) <= Math.PI / 3) {
    const far = fromPolar(ASYMPTOTIC_MIN_ABS, phi);
    return integrateAiry(far, asymptoticAi(ASYMPTOTIC_MIN_ABS, phi), z);
  }
  const near = fromPolar(SERIES_MAX_ABS, phi);
  return integrateAiry(near, taylorStep(c(0), c(AI_AT_0), c(AIP_AT_0), near), z);
}

/**
 * Ai, Ai', Bi, Bi' of complex z. Bi from Bi(z) = e^{jπ/6}·Ai(ωz) + e^{−jπ/6}·Ai(ω̄z) (A&S 10.4.9) and its derivative
 * Bi'(z) = e^{j5π/6}·Ai'(ωz) + e^{−j5π/6}·Ai'(ω̄z) (derived), with Ai from airyAi; so Bi has the accuracy of Ai
 * (measured as for Ai: ≤ 7e-15 for |z| < 9, 2.2e-13 at |z| = 40, away from its zeros). Bi is real on the real
 * axis to rounding (its imaginary part there is a few ulps of |Bi|, not exactly 0).
 */
export function airy(z: C): AiryValues {
  const { ai, aip } = airyAi(z);
  const plus = airyAi(mul(OMEGA, z));
  const minus = airyAi(mul(OMEGA_BAR, z));
  const e6 = fromPolar(1, Math.PI / 6);
  const e6bar = fromPolar(1, -Math.PI / 6);
  const e56 = fromPolar(1, (5 * Math.PI) / 6);
  const e56bar = fromPolar(1, (-5 * Math.PI) / 6);
  return {
    ai,
    aip,
    bi: add(mul(e6, plus.ai), mul(e6bar, minus.ai)), // A&S 10.4.9
    bip: add(mul(e56, plus.aip), mul(e56bar, minus.aip)),
  };
}

/** Fock's Airy function and its derivative at one point. */
export interface FockW {
  readonly w: C;
  readonly wp: C;
}

/**
 * Fock's Airy function of the e^{jωt} convention, w(t) = w2(t) = √π·(Bi(t) − j·Ai(t)) = 2√π·e^{−jπ/6}·Ai(t·e^{−j2π/3}),
 * and w'(t) = 2√π·e^{−j5π/6}·Ai'(t·e^{−j2π/3}) (V. A. Fock, Electromagnetic Diffraction and Propagation Problems,
 * 1965, ch. 10, from memory; the identity follows from A&S 10.4.7 and 10.4.9, and the test checks it). It solves
 * w'' = t·w. w2 is the right one for e^{jωt}: for t → −∞, w2(t) ~ (−t)^{−1/4}·e^{−j((2/3)(−t)^{3/2} + π/4)}, a wave
 * whose phase falls with height, i.e. one going up and out (the conjugate w1 = √π(Bi + jAi) belongs to e^{−iωt}).
 * Computed from Ai at the rotated point, so it keeps Ai's relative accuracy where Bi and Ai nearly cancel.
 */
export function fockW(t: C): FockW {
  const { ai, aip } = airyAi(mul(t, OMEGA_BAR));
  return {
    w: mul(fromPolar(2 * SQRT_PI, -Math.PI / 6), ai),
    wp: mul(fromPolar(2 * SQRT_PI, (-5 * Math.PI) / 6), aip),
  };
}

/** Newton's iteration on a real function given with its derivative, to the rounding of x (at most 50 steps). */
function newtonReal(x0: number, f: (x: number) => { value: number; slope: number }): number {
  let x = x0;
  for (let i = 0; i < 50; i++) {
    const { value, slope } = f(x);
    const dx = value / slope;
    x -= dx;
    if (Math.abs(dx) <= 4e-16 * Math.abs(x)) break;
  }
  return x;
}

function checkZeroIndex(name: string, s: number): void {
  if (!Number.isInteger(s) || s < 1) throw new RangeError(`${name}: index s must be an integer ≥ 1 (got ${s})`);
}

/**
 * s-th zero a_s of Ai (real, negative; a_1 = −2.338107410459767). Initial value from the asymptotic form
 * a_s ≈ −T(3π(4s − 1)/8), T(t) = t^{2/3}(1 + (5/48)t^{−2} − (5/36)t^{−4}) (A&S 10.4.94 and 10.4.105, from memory),
 * then Newton's iteration with Ai' as slope. Accuracy: that of airyAi near the zero divided by |Ai'(a_s)|,
 * measured ≤ 2.2e-16 relative (one ulp) for s = 1 … 500 against mpmath's airyaizero.
 */
export function airyAiZero(s: number): number {
  checkZeroIndex('airyAiZero', s);
  const t = (3 * Math.PI * (4 * s - 1)) / 8;
  const guess = -(t ** (2 / 3)) * (1 + 5 / (48 * t * t) - 5 / (36 * t ** 4)); // A&S 10.4.94
  return newtonReal(guess, (x) => {
    const { ai, aip } = airyAi(c(x));
    return { value: ai.re, slope: aip.re };
  });
}

/**
 * s-th zero a'_s of Ai' (real, negative; a'_1 = −1.018792971647471). Initial value from a'_s ≈ −U(3π(4s − 3)/8),
 * U(t) = t^{2/3}(1 − (7/48)t^{−2} + (35/288)t^{−4}) (A&S 10.4.95 and 10.4.106, from memory), then Newton's
 * iteration with the slope Ai''(x) = x·Ai(x) (the Airy equation). Accuracy as for airyAiZero (measured ≤ 2.2e-16).
 */
export function airyAipZero(s: number): number {
  checkZeroIndex('airyAipZero', s);
  const t = (3 * Math.PI * (4 * s - 3)) / 8;
  const guess = -(t ** (2 / 3)) * (1 - 7 / (48 * t * t) + 35 / (288 * t ** 4)); // A&S 10.4.95
  return newtonReal(guess, (x) => {
    const { ai, aip } = airyAi(c(x));
    return { value: aip.re, slope: x * ai.re };
  });
}
