// Assertions shared by the analytic-reference tests: on failure they print the input, the value, the expected
// value, the difference and the tolerance, so that a regression says at once how far off it is and where.
import { expect } from 'vitest';
import { type C, abs, sub } from '../solver/references/complex.js';

/** |got − want| ≤ relTol·|want| (complex relative distance). */
export function expectComplexClose(label: string, got: C, want: C, relTol: number): void {
  const diff = abs(sub(got, want));
  const rel = diff / abs(want);
  const message =
    `${label}: got ${got.re} + ${got.im}j, expected ${want.re} + ${want.im}j, ` +
    `|difference| ${diff.toExponential(3)} (relative ${rel.toExponential(3)}), tolerance ${relTol.toExponential(1)}`;
  expect(rel <= relTol, message).toBe(true);
}

/** |got − want| ≤ relTol·|want| + absTol for reals. */
export function expectRealClose(label: string, got: number, want: number, relTol: number, absTol = 0): void {
  const diff = Math.abs(got - want);
  const tol = relTol * Math.abs(want) + absTol;
  const message =
    `${label}: got ${got}, expected ${want}, |difference| ${diff.toExponential(3)}, tolerance ${tol.toExponential(3)}`;
  expect(diff <= tol, message).toBe(true);
}
