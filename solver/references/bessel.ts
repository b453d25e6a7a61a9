// Bessel functions J0, J1, Y0, Y1 of real positive argument and the Hankel functions of the second kind built on
// them: the exact fields of the 2-D line source (dipole.ts). Double precision, no tables, no I/O. Equation
// numbers of Abramowitz & Stegun (1964) are quoted from memory.
import { type C, c } from './complex.js';

/** Euler–Mascheroni constant γ (A&S 6.1.3). */
const EULER_GAMMA = 0.5772156649015329;
/** From this argument on, Hankel's asymptotic expansion is used (its smallest term there is ≈ e^{−2x} ≤ 2e-22). */
const ASYMPTOTIC_MIN_X = 25;
/** Rescaling threshold of the backward recurrence, far from overflow. */
const RESCALE_ABOVE = 1e200;

export interface BesselOrders01 {
  readonly j0: number;
  readonly j1: number;
  readonly y0: number;
  readonly y1: number;
}

/**
 * 0 < x < 25: Miller's backward recurrence J_{n−1} = (2n/x)J_n − J_{n+1} from an even start order
 * M = 2⌈(1.5x + 30)/2⌉ (where J_M(x)/J_0 is below 1e-20), normalised by J0 + 2ΣJ_{2k} = 1 (A&S 9.1.27, 9.1.46;
 * J. C. P. Miller, British Association Mathematical Tables X, 1952; the recurrence is stable downwards). Y0 and Y1
 * from Neumann's series over the same J_n:
 *   Y0 = (2/π)(ln(x/2) + γ)J0 − (4/π)Σ_{k≥1} (−1)^k J_{2k}/k                      (A&S 9.1.88)
 *   Y1 = −Y0' = (2/π)((ln(x/2) + γ)J1 − J0/x) + (2/π)Σ_{k≥1} (−1)^k (J_{2k−1} − J_{2k+1})/k
 * (the second derived by differentiating the first, with J0' = −J1 and 2J_n' = J_{n−1} − J_{n+1}, A&S 9.1.27).
 */
function millerNeumann(x: number): BesselOrders01 {
  const m = 2 * Math.ceil((1.5 * x + 30) / 2);
  let next = 0; // J_{n+1}
  let current = 1e-300; // J_n at n = M, an arbitrary tiny start
  let norm = 0; // J0 + 2ΣJ_{2k}, accumulated as n descends
  let sumY0 = 0; // Σ (−1)^k J_{2k}/k
  let sumY1 = 0; // Σ (−1)^k (J_{2k−1} − J_{2k+1})/k, accumulated as J_{2k−1}/k·(−1)^k − J_{2k+1}/k·(−1)^k
  let j1 = 0;
  // At each step `current` holds J_n (unnormalised). Even n = 2k ≥ 2 contributes to norm and sumY0; odd n
  // contributes to sumY1 with the coefficients of the two k it belongs to: J_n appears as J_{2k−1} for
  // k = (n+1)/2 and as J_{2k+1} for k = (n−1)/2.
  for (let n = m; n >= 1; n--) {
    if (n % 2 === 0) {
      const k = n / 2;
      norm += 2 * current;
      sumY0 += ((k % 2 === 0 ? 1 : -1) * current) / k;
    } else {
      const kUp = (n + 1) / 2;
      sumY1 += ((kUp % 2 === 0 ? 1 : -1) * current) / kUp;
      if (n >= 3) {
        const kDown = (n - 1) / 2;
        sumY1 -= ((kDown % 2 === 0 ? 1 : -1) * current) / kDown;
      }
      if (n === 1) j1 = current;
    }
    const previous = ((2 * n) / x) * current - next; // J_{n−1} = (2n/x)J_n − J_{n+1}
    next = current;
    current = previous;
    if (Math.abs(current) > RESCALE_ABOVE) {
      current /= RESCALE_ABOVE;
      next /= RESCALE_ABOVE;
      norm /= RESCALE_ABOVE;
      sumY0 /= RESCALE_ABOVE;
      sumY1 /= RESCALE_ABOVE;
      j1 /= RESCALE_ABOVE;
    }
  }
  const j0u = current;
  norm += j0u;
  const j0 = j0u / norm;
  const j1n = j1 / norm;
  const lg = Math.log(x / 2) + EULER_GAMMA;
  const y0 = (2 / Math.PI) * lg * j0 - (4 / Math.PI) * (sumY0 / norm); // A&S 9.1.88
  const y1 = (2 / Math.PI) * (lg * j1n - j0 / x) + (2 / Math.PI) * (sumY1 / norm); // −d/dx of A&S 9.1.88
  return { j0, j1: j1n, y0, y1 };
}

/**
 * x ≥ 25: Hankel's asymptotic expansion (A&S 9.2.5, 9.2.6, 9.2.9, 9.2.10), μ = 4ν²:
 *   J_ν = √(2/(πx))(P cos χ − Q sin χ), Y_ν = √(2/(πx))(P sin χ + Q cos χ), χ = x − (ν/2 + 1/4)π,
 *   P ~ Σ_k (−1)^k a_{2k}, Q ~ Σ_k (−1)^k a_{2k+1}, a_n = Π_{i=1..n}(μ − (2i − 1)²)/(n!(8x)^n),
 * summed until a term falls below 1e-17 (the terms decrease until n ≈ 2x, so that is reached long before).
 * cos χ and sin χ are formed from cos x and sin x, so that no rounded multiple of π is subtracted from x.
 */
function hankelAsymptotic(x: number, nu: 0 | 1): { j: number; y: number } {
  const mu = 4 * nu * nu;
  let p = 1;
  let q = 0;
  let term = 1;
  for (let n = 1; n < 200; n++) {
    term *= (mu - (2 * n - 1) ** 2) / (n * 8 * x); // a_n from a_{n−1}
    const sign = Math.floor(n / 2) % 2 === 0 ? 1 : -1;
    if (n % 2 === 0) p += sign * term;
    else q += sign * term;
    if (Math.abs(term) < 1e-17) break;
  }
  const cx = Math.cos(x);
  const sx = Math.sin(x);
  // ν = 0: χ = x − π/4; ν = 1: χ = x − 3π/4
  const cosChi = nu === 0 ? (cx + sx) / Math.SQRT2 : (sx - cx) / Math.SQRT2;
  const sinChi = nu === 0 ? (sx - cx) / Math.SQRT2 : -(sx + cx) / Math.SQRT2;
  const amp = Math.sqrt(2 / (Math.PI * x));
  return { j: amp * (p * cosChi - q * sinChi), y: amp * (p * sinChi + q * cosChi) };
}

/**
 * J0(x), J1(x), Y0(x), Y1(x) together, for real x > 0.
 *
 * Methods and measured accuracy (against mpmath 1.3.0 at 30 digits, scripts/reference-values.py, 1e-3 ≤ x ≤ 1e3):
 * - 0 < x < 25: Miller's backward recurrence with Neumann's series (see millerNeumann);
 * - x ≥ 25: Hankel's asymptotic expansion (see hankelAsymptotic);
 * absolute error ≤ 4e-16·max(1, |f|) for each function (so relative accuracy is lost only near the zeros).
 * Special cases: x = 0 gives J0 = 1, J1 = 0, Y0 = Y1 = −Infinity; x < 0 or NaN gives NaN (Y is complex there).
 */
export function besselOrders01(x: number): BesselOrders01 {
  if (!(x >= 0)) return { j0: Number.NaN, j1: Number.NaN, y0: Number.NaN, y1: Number.NaN };
  if (x === 0) return { j0: 1, j1: 0, y0: Number.NEGATIVE_INFINITY, y1: Number.NEGATIVE_INFINITY };
  if (x < ASYMPTOTIC_MIN_X) return millerNeumann(x);
  const order0 = hankelAsymptotic(x, 0);
  const order1 = hankelAsymptotic(x, 1);
  return { j0: order0.j, j1: order1.j, y0: order0.y, y1: order1.y };
}

/** Hankel function of the second kind H0^(2)(x) = J0(x) − jY0(x), x > 0 (A&S 9.1.4); outgoing for e^{jωt}. */
export function hankel2Order0(x: number): C {
  const b = besselOrders01(x);
  return c(b.j0, -b.y0);
}

/** Hankel function of the second kind H1^(2)(x) = J1(x) − jY1(x), x > 0 (A&S 9.1.4). */
export function hankel2Order1(x: number): C {
  const b = besselOrders01(x);
  return c(b.j1, -b.y1);
}
