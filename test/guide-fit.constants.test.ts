// solver/guide-fit.ts: α and β of a wave E = A·e^{−(α + jβ)x} (e^{jωt}) recovered from its phasors by least squares.
import { describe, expect, it } from 'vitest';
import { fitGuideConstants, leastSquaresSlope } from '../solver/guide-fit.js';

describe('guide constants by least squares', () => {
  it('when the points lie on a line then the least-squares slope is its slope', () => {
    const x = [1, 2, 4, 8];
    expect(leastSquaresSlope(x, x.map((v) => 3 - 0.5 * v))).toBeCloseTo(-0.5, 14);
  });

  it('when E is an exact decaying wave whose phase wraps many times then α and β are recovered to 1e-12', () => {
    // the guide check's numbers: α ≈ 2.4e-5 Np/m, β ≈ 2.35e-4 rad/m, receivers every 2 km from 20 to 80 km
    const alpha = 2.43129e-5;
    const beta = 2.350448e-4;
    const ranges = Array.from({ length: 31 }, (_, i) => 20000 + 2000 * i);
    const ez = ranges.map((x) => {
      const m = 3.7 * Math.exp(-alpha * x);
      return { re: m * Math.cos(-beta * x + 0.6), im: m * Math.sin(-beta * x + 0.6) };
    });
    const fit = fitGuideConstants(ranges, ez);
    // the ln and atan2 of rounded phasors are good to ~1e-16 of values up to ~20, over a 60 km lever arm
    expect(Math.abs(fit.alpha - alpha) / alpha).toBeLessThan(1e-12);
    expect(Math.abs(fit.beta - beta) / beta).toBeLessThan(1e-12);
  });
});
