// What a reference check returns and how its numbers become the strings `loamwave verify` prints.
// No physics here: every check module builds its rows with `outcome` or `belowOutcome`.
import type { C } from '../references/complex.js';

export interface CheckOutcome {
  check: string;
  source: string;
  expected: string;
  got: string;
  tolerance: string;
  /** Why the tolerance is that size, in one sentence with the numbers behind it. */
  toleranceReason: string;
  pass: boolean;
  /** The numbers behind the strings, for tests. */
  expectedValue: number;
  gotValue: number;
  toleranceValue: number;
}

export interface ReferenceCheck {
  id: string;
  run(): CheckOutcome[];
}

/** A family of checks (one module of solver/verify/): `loamwave verify` runs the families in the order listed. */
export interface CheckFamily {
  /** What the family checks, in a few words. */
  name: string;
  checks(): ReferenceCheck[];
}

/** An allowed |got − expected| and the reason for its size. */
export interface Tolerance {
  /** In the unit of the compared values, or a fraction of |expected| when `relative`. */
  readonly value: number;
  readonly relative?: boolean;
  readonly reason: string;
}

/** An upper bound the measured value must stay below, and the reason for it. */
export interface Bound {
  readonly below: number;
  readonly reason: string;
}

/** 20·log10 of an amplitude ratio (dB). */
export const db = (x: number): number => 20 * Math.log10(x);

/** Fixed digits, or exponent form for magnitudes ≥ 1e4 or below 1e-3. */
export const fmt = (x: number, digits = 4): string =>
  Math.abs(x) >= 1e4 || (Math.abs(x) < 1e-3 && x !== 0) ? x.toExponential(digits) : x.toFixed(digits);

/** re±imj with `digits` decimals, e.g. −0.999473+0.000527j. */
export const fmtComplex = (z: C, digits = 6): string => `${z.re.toFixed(digits)}${z.im >= 0 ? '+' : ''}${z.im.toFixed(digits)}j`;

/** The absolute allowance of a tolerance against `expected`. */
export function allowance(tolerance: Tolerance, expected: number): number {
  return tolerance.relative ? tolerance.value * Math.abs(expected) : tolerance.value;
}

/** A comparison that passes when |got − expected| ≤ the tolerance's allowance. */
export function outcome(check: string, source: string, expected: number, got: number, tolerance: Tolerance, unit = '', digits = 4): CheckOutcome {
  const allowed = allowance(tolerance, expected);
  return {
    check,
    source,
    expected: `${fmt(expected, digits)}${unit}`,
    got: `${fmt(got, digits)}${unit}`,
    tolerance: `±${fmt(allowed, digits)}${unit}`,
    toleranceReason: tolerance.reason,
    pass: Math.abs(got - expected) <= allowed,
    expectedValue: expected,
    gotValue: got,
    toleranceValue: allowed,
  };
}

/** A measurement that passes when strictly below the bound (printed as expected "< bound", tolerance "-"). */
export function belowOutcome(check: string, source: string, bound: Bound, got: number, unit = '', digits = 4): CheckOutcome {
  return {
    check,
    source,
    expected: `< ${bound.below}${unit}`,
    got: `${fmt(got, digits)}${unit}`,
    tolerance: '-',
    toleranceReason: bound.reason,
    pass: got < bound.below,
    expectedValue: bound.below,
    gotValue: got,
    toleranceValue: 0,
  };
}
