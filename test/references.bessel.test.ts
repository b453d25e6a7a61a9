// Bessel functions J0, J1, Y0, Y1 and the Hankel functions against the handbook table, an arbitrary-precision
// library, the Wronskian, known zeros and the small-argument forms.
import { describe, expect, it } from 'vitest';
import { besselOrders01, hankel2Order0, hankel2Order1 } from '../solver/references/bessel.js';
import { expectRealClose } from './references.expect-close.js';

// mpmath 1.3.0 at 30 digits (scripts/reference-values.py). Rows [x, J0, J1, Y0, Y1]; both sides of the switch at 25.
const MPMATH_BESSEL: ReadonlyArray<readonly [number, number, number, number, number]> = [
  [1e-3, 0.99999975000001562, 4.999999375000026e-4, -4.4714166113759233, -636.62216723113943],
  [0.1, 0.99750156206604003, 0.049937526036241998, -1.5342386513503668, -6.458951094702027],
  [1, 0.76519768655796655, 0.44005058574493352, 0.088256964215676958, -0.78121282130028872],
  [2.5, -0.048383776468197996, 0.49709410246427404, 0.49807035961523189, 0.1459181379667858],
  [5, -0.1775967713143383, -0.32757913759146522, -0.30851762524903378, 0.14786314339122684],
  [8, 0.17165080713755391, 0.23463634685391462, 0.22352148938756622, -0.15806046173124749],
  [12, 0.047689310796833537, -0.22344710449062761, -0.22523731263436143, -0.057099218260896521],
  [17.5, -0.10311039822868592, -0.16341996942575491, -0.16041119250501117, 0.098572798734216046],
  [24.9, 0.083245968353015682, -0.13485569953140874, -0.13649918399676511, -0.086002557595554442],
  [25.1, 0.10827567149994929, -0.11463478413442273, -0.1167677076380371, -0.11062223322783083],
  [40, 7.3668905842372896e-3, 0.126038318037585, 0.12593641705826093, -5.7935058215496329e-3],
  [100, 0.019985850304223122, -0.077145352014112158, -0.077244313365083152, -0.020372312002759793],
  [1000, 0.024786686152420175, 4.7283119070895239e-3, 4.7159179776228134e-3, -0.024784331292351779],
];

describe('Bessel functions of orders 0 and 1', () => {
  it.each([
    // Abramowitz & Stegun, Handbook of Mathematical Functions (1964), Table 9.1 (entries from memory, each
    // confirmed by mpmath 1.3.0 to every digit). Tolerance: half a unit of the tenth decimal.
    { x: 1, j0: 0.7651976866, j1: 0.4400505857, y0: 0.0882569642, y1: -0.7812128213 },
    { x: 2, j0: 0.2238907791, j1: 0.5767248078, y0: 0.5103756726, y1: -0.1070324315 },
    { x: 5, j0: -0.1775967713, j1: -0.3275791376, y0: -0.3085176252, y1: 0.1478631434 },
    { x: 10, j0: -0.2459357645, j1: 0.0434727462, y0: 0.0556711673, y1: 0.2490154242 },
  ])('when x = $x then J0, J1, Y0, Y1 match the ten-decimal table', ({ x, j0, j1, y0, y1 }) => {
    const b = besselOrders01(x);
    expectRealClose(`J0(${x})`, b.j0, j0, 0, 5e-11);
    expectRealClose(`J1(${x})`, b.j1, j1, 0, 5e-11);
    expectRealClose(`Y0(${x})`, b.y0, y0, 0, 5e-11);
    expectRealClose(`Y1(${x})`, b.y1, y1, 0, 5e-11);
  });

  it('when x runs from 1e-3 to 1e3 then each function agrees with mpmath to 1e-15·max(1, |f|)', () => {
    // Tolerance: measured worst case 4e-16 over 400 log-spaced points (module doc); 1e-15 leaves margin for
    // platform differences in Math.cos/Math.log.
    for (const [x, j0, j1, y0, y1] of MPMATH_BESSEL) {
      const b = besselOrders01(x);
      for (const [name, got, want] of [['J0', b.j0, j0], ['J1', b.j1, j1], ['Y0', b.y0, y0], ['Y1', b.y1, y1]] as const) {
        expectRealClose(`${name}(${x})`, got, want, 0, 1e-15 * Math.max(1, Math.abs(want)));
      }
    }
  });

  it('when x is anywhere from 1e-2 to 200 then the Wronskian J1·Y0 − J0·Y1 equals 2/(πx)', () => {
    // A&S 9.1.16 (Wronskian W{J_ν, Y_ν} = 2/(πx)), which with Y0' = −Y1, J0' = −J1 reads J1Y0 − J0Y1 = 2/(πx).
    // It ties the two methods together across the switch at x = 25. Tolerance 2e-15·max(1, 1/x²) relative to
    // 2/(πx): the products are of size 1/x for large x and up to 1/x² for small x, rounding each.
    for (let i = 0; i <= 300; i++) {
      const x = 10 ** (-2 + (i * Math.log10(2e4)) / 300);
      const b = besselOrders01(x);
      const w = b.j1 * b.y0 - b.j0 * b.y1;
      expectRealClose(`W(${x})`, w, 2 / (Math.PI * x), 2e-15 * Math.max(1, 1 / (x * x)) + 2e-15);
    }
  });

  it.each([
    // First zeros, A&S Table 9.5 (from memory; confirmed by mpmath): j0,1, j1,1, y0,1, y1,1 and j0,10 past 25.
    { name: 'J0', x: 2.404825557695773, pick: 'j0' as const },
    { name: 'J1', x: 3.831705970207512, pick: 'j1' as const },
    { name: 'Y0', x: 0.8935769662791675, pick: 'y0' as const },
    { name: 'Y1', x: 2.197141326031017, pick: 'y1' as const },
    { name: 'J0', x: 30.63460646843198, pick: 'j0' as const },
  ])('when x is the zero $x of $name then the function vanishes to the rounding of x', ({ x, pick }) => {
    // Tolerance: |f'(x)|·ulp(x) ≤ 0.6·2.2e-16·x plus the 1e-15·max(1, |f|) accuracy of the function.
    expect(Math.abs(besselOrders01(x)[pick])).toBeLessThan(2.2e-16 * x + 1e-15);
  });

  it('when x is small then J and Y follow their leading series terms', () => {
    // A&S 9.1.10 and 9.1.11 (from memory): J0 ≈ 1 − x²/4, J1 ≈ x/2 − x³/16, Y0 ≈ (2/π)(ln(x/2) + γ)J0,
    // Y1 ≈ −2/(πx) + (x/π)(ln(x/2) + γ − 1/2). Tolerance: the first omitted term (order x⁴ or x³ ln x).
    const x = 1e-4;
    const lg = Math.log(x / 2) + 0.5772156649015329;
    const b = besselOrders01(x);
    expectRealClose('J0', b.j0, 1 - x * x / 4, 0, x ** 4);
    expectRealClose('J1', b.j1, x / 2 - x ** 3 / 16, 0, x ** 5);
    expectRealClose('Y0', b.y0, (2 / Math.PI) * lg * (1 - x * x / 4) + (x * x) / (2 * Math.PI), 0, x ** 4 * 10);
    expectRealClose('Y1', b.y1, -2 / (Math.PI * x) + (x / Math.PI) * (lg - 0.5), 1e-15, x ** 3 * 10);
  });

  it('when the argument is 0, negative or NaN then the special values are returned', () => {
    expect(besselOrders01(0)).toEqual({ j0: 1, j1: 0, y0: -Infinity, y1: -Infinity });
    expect(Number.isNaN(besselOrders01(-1).y0)).toBe(true);
    expect(Number.isNaN(besselOrders01(Number.NaN).j0)).toBe(true);
  });

  it('when x is large then H0^(2) and H1^(2) approach √(2/(πx))·e^{−j(x − π/4)} and e^{−j(x − 3π/4)}', () => {
    // A&S 9.2.3–9.2.4 leading terms; the first correction is of relative size 1/(8x) (order 0) and 3/(8x)
    // (order 1), so the tolerance is twice that.
    for (const x of [50, 500, 5000]) {
      const amp = Math.sqrt(2 / (Math.PI * x));
      const h0 = hankel2Order0(x);
      const h1 = hankel2Order1(x);
      const want0 = { re: amp * Math.cos(x - Math.PI / 4), im: -amp * Math.sin(x - Math.PI / 4) };
      const want1 = { re: amp * Math.cos(x - (3 * Math.PI) / 4), im: -amp * Math.sin(x - (3 * Math.PI) / 4) };
      expect(Math.hypot(h0.re - want0.re, h0.im - want0.im) / amp).toBeLessThan(2 / (8 * x));
      expect(Math.hypot(h1.re - want1.re, h1.im - want1.im) / amp).toBeLessThan(6 / (8 * x));
    }
  });
});
