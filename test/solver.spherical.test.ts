// The spherical-earth geometry: its limits (a huge sphere is the flat axisymmetric grid), its stability under a
// ceiling and an ionosphere, and the size and sign of the curvature effect. Small cases of a second or so each.
import { describe, expect, it } from 'vitest';
import { parseCase, type CaseInput } from '../schemas/case.js';
import { solve } from '../solver/index.js';

const db = (z: { re: number; im: number }) => 20 * Math.log10(Math.hypot(z.re, z.im));
const deg = (z: { re: number; im: number }) => (Math.atan2(z.im, z.re) * 180) / Math.PI;
/** Phase difference a − b in degrees, wrapped into (−180, 180]. */
const dPhase = (a: { re: number; im: number }, b: { re: number; im: number }) => {
  let d = deg(a) - deg(b);
  while (d > 180) d -= 360;
  while (d <= -180) d += 360;
  return d;
};

/** 20 kHz over moist ground (3e-3 S/m, εr 15), 60 km × 20 km, 10 cells per wavelength: ~0.1 s per solve. */
const short: CaseInput = {
  frequency_hz: 20000,
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
  domain: { range_m: 60000, height_m: 20000 },
  grid: { cells_per_wavelength: 10 },
  receivers: { ranges_m: [10000, 30000, 50000] },
};

describe('spherical geometry: the flat limit', () => {
  it.each([
    ['impedance ground, extrapolated sampling, at the surface', short],
    ['impedance ground, half-cell sampling, receivers 500 m up', { ...short, ground: { ...short.ground, impedance_sampling: 'half_cell' }, receivers: { ...short.receivers, height_m: 500 } }],
    ['perfect ground, receivers 500 m up', { ...short, ground: { model: 'pec' }, receivers: { ...short.receivers, height_m: 500 } }],
    ['resolved ground', { ...short, ground: { ...short.ground, model: 'resolved' } }],
  ] as Array<[string, CaseInput]>)(
    'when the sphere is 1e9 m in radius then every field agrees with the flat axisymmetric grid within 0.005 dB and 0.05° (%s), and the rest is the 1/a curvature term',
    (_what, input) => {
      const flat = solve(parseCase(input));
      const big = solve(parseCase({ ...input, geometry: 'spherical', earth: { radius_m: 1e9 } }));
      const bigger = solve(parseCase({ ...input, geometry: 'spherical', earth: { radius_m: 1e10 } }));
      flat.receivers.forEach((f, i) => {
        const s = big.receivers[i];
        const fields = [
          ['ez', f.ez, s.ez, bigger.receivers[i].ez],
          ['e_horizontal', f.e_horizontal, s.e_horizontal, bigger.receivers[i].e_horizontal],
          ['h', f.h, s.h, bigger.receivers[i].h],
        ] as const;
        for (const [name, a, b, c] of fields) {
          const dDb = db(b) - db(a);
          const dDeg = dPhase(b, a);
          const leftDb = db(b) - db(a) - 10 * (db(c) - db(a));
          const leftDeg = dDeg - 10 * dPhase(c, a);
          console.log(`${name} at ${f.range_m / 1e3} km: sphere 1e9 m − flat = ${dDb.toExponential(2)} dB, ${dDeg.toExponential(2)}°; leftover beyond 1/a ${leftDb.toExponential(1)} dB, ${leftDeg.toExponential(1)}°`);
          // Tolerance: the leading curvature term of the field on a sphere relative to a flat earth is of order
          // x^{3/2} = (k/2)^{1/2}·d^{3/2}/a (Fock's small-distance expansion of the attenuation function, Fock,
          // Electromagnetic Diffraction and Propagation Problems, 1965, ch. 10; from memory), 1.6e-4 (0.0014 dB,
          // 0.01°) at 50 km, 20 kHz and a = 1e9 m; 0.005 dB and 0.05° leave a factor of 3–5 over it.
          expect(Math.abs(dDb)).toBeLessThan(0.005);
          expect(Math.abs(dDeg)).toBeLessThan(0.05);
          // First order in 1/a: the difference at 1e10 m is a tenth of that at 1e9 m, so nothing of the spherical
          // discretisation is left over as a → ∞ (an error of the metric factors would not scale). Measured: the
          // leftover is at most 2.3e-8 dB and 1.3e-6° (round-off and the settling test's 1e-4 window agreement).
          expect(Math.abs(leftDb)).toBeLessThan(1e-6);
          expect(Math.abs(leftDeg)).toBeLessThan(1e-5);
        }
      });
    },
  );
});
