// Complex arithmetic for the analytic references (Faddeeva, Norton, Fresnel, guide modes, Hankel functions) and the
// post-processing of the normal-incidence column. Plain immutable {re, im} records: clear rather than fast, since none
// of this runs inside a field-update loop.
// Algorithms that avoid needless overflow or cancellation are named beside each function.

/** A complex number re + j·im (engineering j; the same object is read as re + i·im in the maths modules). */
export interface C {
  readonly re: number;
  readonly im: number;
}

/** re + j·im. */
export function c(re: number, im = 0): C {
  return { re, im };
}

export const ZERO: C = c(0, 0);
export const ONE: C = c(1, 0);
/** The imaginary unit j (i in the maths modules). */
export const J: C = c(0, 1);

export function add(a: C, b: C): C {
  return { re: a.re + b.re, im: a.im + b.im };
}

export function sub(a: C, b: C): C {
  return { re: a.re - b.re, im: a.im - b.im };
}

export function neg(a: C): C {
  return { re: -a.re, im: -a.im };
}

export function conj(a: C): C {
  return { re: a.re, im: -a.im };
}

/** Real multiple s·a. */
export function scale(a: C, s: number): C {
  return { re: a.re * s, im: a.im * s };
}

export function mul(a: C, b: C): C {
  return { re: a.re * b.re - a.im * b.im, im: a.re * b.im + a.im * b.re };
}

/** j·a, exact (a quarter turn). */
export function mulJ(a: C): C {
  return { re: -a.im, im: a.re };
}

/**
 * a / b by Smith's algorithm, which avoids forming |b|² and so overflows only when the quotient does
 * (R. L. Smith, "Algorithm 116: Complex division", Commun. ACM 5(8), 1962).
 */
export function div(a: C, b: C): C {
  if (Math.abs(b.re) >= Math.abs(b.im)) {
    const r = b.im / b.re;
    const d = b.re + b.im * r;
    return { re: (a.re + a.im * r) / d, im: (a.im - a.re * r) / d };
  }
  const r = b.re / b.im;
  const d = b.re * r + b.im;
  return { re: (a.re * r + a.im) / d, im: (a.im * r - a.re) / d };
}

/** 1 / a. */
export function recip(a: C): C {
  return div(ONE, a);
}

/** |a|, via Math.hypot so that it neither overflows nor underflows early. */
export function abs(a: C): number {
  return Math.hypot(a.re, a.im);
}

/** Principal argument in (−π, π]. */
export function arg(a: C): number {
  return Math.atan2(a.im, a.re);
}

/** r·e^{jθ}. */
export function fromPolar(r: number, thetaRad: number): C {
  return { re: r * Math.cos(thetaRad), im: r * Math.sin(thetaRad) };
}

/**
 * Principal square root: Re √a ≥ 0, branch cut on the negative real axis, with √(−x + j·0) = j√x and
 * √(−x − j·0) = −j√x (the sign of a zero imaginary part is honoured).
 * Method: the cancellation-free form t = √((|a| + |re|)/2), then the other part as im/(2t)
 * (W. Kahan, "Branch cuts for complex elementary functions", 1987; common practice in libm).
 */
export function sqrt(a: C): C {
  if (a.re === 0 && a.im === 0) return { re: 0, im: a.im };
  const t = Math.sqrt((abs(a) + Math.abs(a.re)) / 2);
  if (a.re >= 0) return { re: t, im: a.im / (2 * t) };
  return { re: Math.abs(a.im) / (2 * t), im: Object.is(a.im, -0) || a.im < 0 ? -t : t };
}

/** e^a = e^{re}(cos im + j sin im). */
export function exp(a: C): C {
  const m = Math.exp(a.re);
  if (a.im === 0) return { re: m, im: 0 };
  return { re: m * Math.cos(a.im), im: m * Math.sin(a.im) };
}

/** Principal logarithm ln|a| + j·arg a. */
export function log(a: C): C {
  return { re: Math.log(abs(a)), im: arg(a) };
}

/** sin a = sin re·cosh im + j cos re·sinh im (A&S 4.3.55). */
export function sin(a: C): C {
  return { re: Math.sin(a.re) * Math.cosh(a.im), im: Math.cos(a.re) * Math.sinh(a.im) };
}

/** cos a = cos re·cosh im − j sin re·sinh im (A&S 4.3.56). */
export function cos(a: C): C {
  return { re: Math.cos(a.re) * Math.cosh(a.im), im: -Math.sin(a.re) * Math.sinh(a.im) };
}

/** a², one multiplication fewer than mul(a, a). */
export function square(a: C): C {
  return { re: (a.re - a.im) * (a.re + a.im), im: 2 * a.re * a.im };
}

/** |a − b| / |b|: the relative distance used by the reference tests. */
export function relativeDistance(a: C, b: C): number {
  return abs(sub(a, b)) / abs(b);
}
