// solver/newton.ts: Newton's iteration with a central-difference derivative, on functions with known roots.
import { describe, expect, it } from 'vitest';
import { newtonRoot } from '../solver/newton.js';

describe('Newton root with a difference derivative', () => {
  it('when f(x) = x² − 2 from x0 = 1 then the root is √2 to a few ulps and convergence is reported', () => {
    const r = newtonRoot((x) => x * x - 2, 1, { derivativeStep: 1e-7, stepTolerance: 1e-15 });
    expect(r.converged).toBe(true);
    // the difference derivative of a quadratic is exact up to round-off, so the root lands within a few ulps
    expect(Math.abs(r.root - Math.SQRT2)).toBeLessThan(4 * Number.EPSILON);
    expect(r.iterations).toBeLessThan(10);
  });

  it('when f(x) = cos x − x then the root satisfies cos r = r (the fixed point of the cosine)', () => {
    const r = newtonRoot((x) => Math.cos(x) - x, 0, { derivativeStep: 1e-6, stepTolerance: 1e-15 });
    expect(r.converged).toBe(true);
    // |f'(r)| ≈ 1.67, so |f(r)| of a few ulps is a root good to a few ulps
    expect(Math.abs(Math.cos(r.root) - r.root)).toBeLessThan(4 * Number.EPSILON);
  });

  it('when f has no real root (x² + 1) then the result says it did not converge', () => {
    const r = newtonRoot((x) => x * x + 1, 0.5, { derivativeStep: 1e-6, stepTolerance: 1e-15, maxIterations: 30 });
    expect(r.converged).toBe(false);
  });
});
