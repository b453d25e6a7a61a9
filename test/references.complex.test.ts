// The small complex-arithmetic module behind the analytic references: values that follow from the definitions,
// the principal branch of the square root, and division that does not overflow early.
import { describe, expect, it } from 'vitest';
import * as cx from '../solver/references/complex.js';
import { expectComplexClose } from './references.expect-close.js';

const { c } = cx;

describe('complex arithmetic', () => {
  it.each([
    // Exact by the definitions (tolerance: one rounding, 2^{−53} ≈ 1.1e-16, doubled).
    { name: '(1 + 2j)(3 + 4j) = −5 + 10j', got: () => cx.mul(c(1, 2), c(3, 4)), want: c(-5, 10) },
    { name: '(1 + 2j)/(3 + 4j) = 0.44 + 0.08j', got: () => cx.div(c(1, 2), c(3, 4)), want: c(0.44, 0.08) },
    { name: '(3 + 4j)/(1 − 2j) = −1 + 2j', got: () => cx.div(c(3, 4), c(1, -2)), want: c(-1, 2) },
    { name: '√(3 + 4j) = 2 + j', got: () => cx.sqrt(c(3, 4)), want: c(2, 1) },
    { name: '√(3 − 4j) = 2 − j', got: () => cx.sqrt(c(3, -4)), want: c(2, -1) },
    { name: '√(−3 + 4j) = 1 + 2j', got: () => cx.sqrt(c(-3, 4)), want: c(1, 2) },
    { name: '√j = (1 + j)/√2', got: () => cx.sqrt(c(0, 1)), want: c(Math.SQRT1_2, Math.SQRT1_2) },
    // Euler's formula e^{jπ} = −1 (the imaginary part is sin π in doubles, 1.2e-16).
    { name: 'e^{jπ} = −1', got: () => cx.exp(c(0, Math.PI)), want: c(-1, 0) },
    { name: 'ln(−1) = jπ', got: () => cx.log(c(-1, 0)), want: c(0, Math.PI) },
    // sin(j) = j·sinh 1, cos(j) = cosh 1 (A&S 4.3.55–56 at x = 0).
    { name: 'sin j = j sinh 1', got: () => cx.sin(c(0, 1)), want: c(0, Math.sinh(1)) },
    { name: 'cos j = cosh 1', got: () => cx.cos(c(0, 1)), want: c(Math.cosh(1), 0) },
    { name: '2e^{jπ/3} = 1 + j√3', got: () => cx.fromPolar(2, Math.PI / 3), want: c(1, Math.sqrt(3)) },
  ])('when computing $name then the result is exact to rounding', ({ got, want }) => {
    expectComplexClose('value', got(), want, 2.3e-16);
  });

  it('when the argument sits on the negative real axis then √ follows the sign of the zero imaginary part', () => {
    // Branch cut convention of W. Kahan, "Branch cuts for complex elementary functions" (1987): √(−4 ± 0j) = ±2j.
    expect(cx.sqrt(c(-4, 0))).toEqual(c(0, 2));
    expect(cx.sqrt(c(-4, -0))).toEqual(c(0, -2));
    expect(cx.sqrt(c(0, 0))).toEqual(c(0, 0));
  });

  it('when operands are near the overflow limit then Smith division still gives the exact quotient', () => {
    // R. L. Smith, Commun. ACM 5(8), 1962: no |b|² is formed, so 1e300-scale operands do not overflow.
    expectComplexClose('quotient', cx.div(c(1e300, 1e300), c(1e300, -1e300)), c(0, 1), 2.3e-16);
    // Math.hypot does not form 9e400: |3e200 + 4e200j| = 5e200 to rounding.
    expect(Math.abs(cx.abs(c(3e200, 4e200)) / 5e200 - 1)).toBeLessThan(2.3e-16);
  });

  it.each([c(0.3, -1.7), c(-2, 0.5), c(5, 5), c(-1e-3, -4)])(
    'when z = %o then √z·√z = z, its real part is ≥ 0, and e^{ln z} = z',
    (z) => {
      const r = cx.sqrt(z);
      expect(r.re).toBeGreaterThanOrEqual(0);
      expectComplexClose('√z²', cx.mul(r, r), z, 4.5e-16);
      expectComplexClose('e^{ln z}', cx.exp(cx.log(z)), z, 1e-15);
      expectComplexClose('z²', cx.square(z), cx.mul(z, z), 2.3e-16);
    },
  );
});
