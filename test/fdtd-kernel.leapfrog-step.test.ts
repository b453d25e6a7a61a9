// leapfrogStep (solver/fdtd-kernel.ts) does one whole step in one sweep over the columns, with free-space rows in a
// loop of their own; these tests hold it, bit for bit, to the five updates it replaces called in turn (updateH,
// updateHCpml, applySurfaceImpedance, updateE, updateECpml; those are held to one-cell reference loops in
// test/fdtd-kernel.bit-identity.test.ts). The updates are Yee's (Yee, IEEE Trans. Antennas Propag. 14(3), 1966;
// Taflove & Hagness, Computational Electrodynamics, 3rd ed. 2005, ch. 3) with the CPML of Roden & Gedney (Microwave
// Opt. Technol. Lett. 27(5), 2000); reordering independent updates must not change a single bit (common practice).
import { describe, expect, it } from 'vitest';
import { createPrng, type Prng } from '../coordinator/sampling/prng.js';
import {
  applySurfaceImpedance,
  leapfrogStep,
  updateE,
  updateECpml,
  updateH,
  updateHCpml,
  type CpmlState,
  type FieldArray,
  type ImpedanceRow,
  type YeeFields,
} from '../solver/fdtd-kernel.js';

interface Grid {
  f: YeeFields;
  p: CpmlState;
  z: ImpedanceRow;
}

/** Values in ±scale·[0.5, 1.5) with random sign, so no product is exact by accident. */
function fill(a: Float64Array, rng: Prng, scale: number): Float64Array {
  for (let q = 0; q < a.length; q++) a[q] = (rng.nextFloat() < 0.5 ? -1 : 1) * scale * (0.5 + rng.nextFloat());
  return a;
}

/**
 * A random grid (seeded) whose coefficients are free space's constants (ca = 1, one cb, one chz) on rows
 * [freeLo, freeHi) of every column but every fifth, which keeps random (lossy) ones there too; `profiles` > 0 shares
 * coefficient columns among several grid columns, 0 gives every column its own.
 */
function randomGrid(
  nx: number,
  nz: number,
  px: number,
  pz: number,
  freeLo: number,
  freeHi: number,
  profiles: number,
  seed: number,
  graded = false,
  lossyRuns = false,
  float32 = false,
): Grid {
  const rng = createPrng(seed);
  const S = nz + 1;
  const size = (nx + 1) * S;
  const nProfiles = profiles > 0 ? profiles : nx + 1;
  const r = (n: number, scale: number): Float64Array => fill(new Float64Array(n), rng, scale);
  // grid.field_precision float32: the fields stored in single precision, everything else as before
  const field = (a: Float64Array): FieldArray => (float32 ? Float32Array.from(a) : a);
  const colEx = Int32Array.from({ length: nx + 1 }, (_, i) => (profiles > 0 ? ((i * 7) % profiles) * S : i * S));
  const colEz = Int32Array.from({ length: nx + 1 }, (_, i) => (profiles > 0 ? ((i * 3 + 1) % profiles) * S : i * S));
  const caEx = r(nProfiles * S, 0.9);
  const cbEx = r(nProfiles * S, 0.3);
  const caEz = r(nProfiles * S, 0.9);
  const cbEz = r(nProfiles * S, 0.3);
  const chz = r(nz, 0.2);
  const cbX0 = 0.25;
  const cbZ0 = 0.375;
  const chz0 = 0.125;
  for (let q = 0; q < nProfiles; q++) {
    if (q % 5 === 4) continue;
    for (let k = freeLo; k < Math.min(freeHi, nz); k++) {
      caEx[q * S + k] = 1;
      cbEx[q * S + k] = cbX0;
      caEz[q * S + k] = 1;
      // graded: Ez's cb one value a row, as the sphere's metric factor makes it (the same in every profile)
      cbEz[q * S + k] = graded ? cbZ0 * (1 + k / 64) : cbZ0;
    }
  }
  for (let k = freeLo; k < Math.min(freeHi, nz); k++) chz[k] = chz0;
  if (lossyRuns) {
    // rows 2 … freeLo−1 of one lossy material a profile (its own ca and cb, one chz), as a layered ground makes them;
    // every third profile splits its run in two at row 4, so runs of the two columns of a pair end at other rows
    const chzL = 0.1875;
    for (let k = 2; k < Math.min(freeLo, nz); k++) chz[k] = chzL;
    for (let q = 0; q < nProfiles; q++) {
      const v = [0.5 + 0.1 * (q % 4), 0.2 + 0.01 * q, 0.6 + 0.05 * (q % 3), 0.3 - 0.01 * (q % 7)];
      for (let k = 2; k < Math.min(freeLo, nz); k++) {
        const w = q % 3 === 0 && k >= 4 ? 0.5 : 1;
        caEx[q * S + k] = v[0] * w;
        cbEx[q * S + k] = v[1];
        caEz[q * S + k] = v[2];
        cbEz[q * S + k] = v[3] * w;
      }
    }
  }
  const f: YeeFields = {
    nx,
    nz,
    S,
    ex: field(r(size, 1)),
    ez: field(r(size, 1)),
    hy: field(r(size, 1e-2)),
    caEx,
    cbEx,
    caEz,
    cbEz,
    colEx,
    colEz,
    chx: 0.2 + rng.nextFloat() * 0.1,
    chz,
    rp: r(nx + 1, 1),
    rm: r(nx + 1, 1),
    axisFactor: 4,
  };
  const p: CpmlState = {
    ix0: nx - px,
    px,
    kz0: nz - pz,
    pz,
    bHx: r(px, 0.9),
    aHx: r(px, 0.1),
    bEz: r(px, 0.9),
    aEz: r(px, 0.1),
    bHz: r(pz, 0.9),
    aHz: r(pz, 0.1),
    bEx: r(pz, 0.9),
    aEx: r(pz, 0.1),
    psiHx: r(px * S, 1e-3),
    psiEz: r(px * S, 1e-3),
    psiHz: r(nx * pz, 1e-3),
    psiEx: r(nx * pz, 1e-3),
  };
  const z: ImpedanceRow = { halfR: r(nx, 1e-2), lOverDt: r(nx, 1e-1), wNear: 1.5, wFar: -0.5, hsPrev: r(nx, 1e-2) };
  return { f, p, z };
}

/** First element where two grids differ in bits (Object.is also tells −0 from +0), or undefined. */
function firstDifference(a: Grid, b: Grid): string | undefined {
  const pairs: Array<[string, FieldArray, FieldArray]> = [
    ['ex', a.f.ex, b.f.ex],
    ['ez', a.f.ez, b.f.ez],
    ['hy', a.f.hy, b.f.hy],
    ['psiHx', a.p.psiHx, b.p.psiHx],
    ['psiEz', a.p.psiEz, b.p.psiEz],
    ['psiHz', a.p.psiHz, b.p.psiHz],
    ['psiEx', a.p.psiEx, b.p.psiEx],
    ['hsPrev', a.z.hsPrev, b.z.hsPrev],
  ];
  for (const [name, x, y] of pairs) {
    for (let q = 0; q < x.length; q++) if (!Object.is(x[q], y[q])) return `${name}[${q}]: step ${y[q]}, in turn ${x[q]}`;
  }
  return undefined;
}

/**
 * With float32 fields the one sweep is not bit-identical to the updates in turn, by design: within a column pair it
 * feeds the new Hy to the E update from a register, in double precision, where the updates in turn read it back
 * from its Float32Array, rounded. The two then differ by the rounding of Hy, a few float32 units in the last place
 * (2⁻²⁴ ≈ 6e-8 of a value) per step; six steps stay below 1e-6 of the largest value of each array.
 */
const FLOAT32_TOLERANCE = 1e-6;

/** Largest |step − in turn| of the fields, ψ and surface-H arrays, each over the largest |value| of its array. */
function largestFloat32Difference(a: Grid, b: Grid): number {
  let worst = 0;
  for (const [x, y] of [
    [a.f.ex, b.f.ex],
    [a.f.ez, b.f.ez],
    [a.f.hy, b.f.hy],
    [a.p.psiHx, b.p.psiHx],
    [a.p.psiEz, b.p.psiEz],
    [a.p.psiHz, b.p.psiHz],
    [a.p.psiEx, b.p.psiEx],
    [a.z.hsPrev, b.z.hsPrev],
  ] as Array<[FieldArray, FieldArray]>) {
    let scale = 0;
    let diff = 0;
    for (let q = 0; q < x.length; q++) {
      scale = Math.max(scale, Math.abs(x[q]));
      diff = Math.max(diff, Math.abs(x[q] - y[q]));
    }
    if (!(diff <= scale)) return Infinity; // NaN, or an array gone wrong entirely
    if (scale === 0) continue; // an empty (or all-zero, and equal) array
    worst = Math.max(worst, diff / scale);
  }
  return worst;
}

// nx, nz, px, pz, free rows [lo, hi): a free run in the middle, one reaching into the top layer (of even and of odd
// height: the top layer goes two rows a pass), one from row 0, none
// at all, a top layer down to the ground rows (kz0 < 2), a far layer from column 0, no top layer, a grid one row high.
const SHAPES: Array<[string, number, number, number, number, number, number]> = [
  ['a free-space run mid-column', 37, 29, 9, 11, 6, 15],
  ['free space up into the top layer', 32, 24, 8, 8, 3, 24],
  ['free space up into a top layer of odd height', 31, 23, 7, 7, 3, 23],
  ['free space from the ground row', 21, 17, 6, 5, 0, 12],
  ['no free-space rows', 19, 13, 4, 4, 0, 0],
  ['a top layer down to row 1', 13, 9, 3, 8, 2, 9],
  ['layers covering the whole grid', 10, 20, 10, 20, 0, 20],
  ['no top layer (pec ceiling)', 21, 17, 6, 0, 4, 17],
  ['one row', 9, 1, 2, 0, 0, 1],
  ['two rows', 9, 2, 2, 0, 0, 2],
];

type Options = { pml: boolean; ground: boolean; profiles: number; graded?: boolean; lossyRuns?: boolean; float32?: boolean };

function expectSameAsInTurn(make: () => Grid, o: Options): void {
  const ref = make();
  const ker = make();
  for (let step = 0; step < 6; step++) {
    updateH(ref.f);
    if (o.pml) updateHCpml(ref.f, ref.p);
    if (o.ground) applySurfaceImpedance(ref.f, ref.z);
    updateE(ref.f);
    if (o.pml) updateECpml(ref.f, ref.p);
    leapfrogStep(ker.f, o.pml ? ker.p : undefined, o.ground ? ker.z : undefined);
    if (o.float32) expect(largestFloat32Difference(ref, ker), `after step ${step}`).toBeLessThan(FLOAT32_TOLERANCE);
    else expect(firstDifference(ref, ker), `after step ${step}`).toBeUndefined();
  }
  // the comparison has teeth: the fields moved away from their starting values
  expect(firstDifference(make(), ker)).toBeDefined();
}

const OPTIONS: Array<[string, Options]> = [
  ['CPML and impedance ground, per-cell coefficients', { pml: true, ground: true, profiles: 0 }],
  ['CPML and impedance ground, shared column profiles', { pml: true, ground: true, profiles: 4 }],
  ['no CPML, impedance ground', { pml: false, ground: true, profiles: 0 }],
  ['CPML, no impedance ground', { pml: true, ground: false, profiles: 3 }],
  ["CPML and impedance ground, Ez's cb varying by row in free space (the sphere)", { pml: true, ground: true, profiles: 1, graded: true }],
  ["CPML, Ez's cb varying by row in free space, per-cell coefficients", { pml: true, ground: false, profiles: 0, graded: true }],
  ['CPML and impedance ground, lossy rows of one material a column below free space', { pml: true, ground: true, profiles: 0, lossyRuns: true }],
  ['impedance ground, lossy runs below free space, shared column profiles', { pml: false, ground: true, profiles: 5, lossyRuns: true }],
  ['CPML and impedance ground, fields in float32', { pml: true, ground: true, profiles: 0, float32: true }],
  ["CPML and impedance ground, fields in float32, Ez's cb varying by row, lossy runs", { pml: true, ground: true, profiles: 2, graded: true, lossyRuns: true, float32: true }],
];

describe('leapfrogStep against the five updates in turn', () => {
  for (const [optLabel, o] of OPTIONS) {
    it.each(SHAPES)(`when the grid has %s (%i×%i, layers %i and %i, free rows %i…%i) with ${optLabel} then six steps match bit for bit`, (_l, nx, nz, px, pz, lo, hi) => {
      expectSameAsInTurn(() => randomGrid(nx, nz, px, pz, lo, hi, o.profiles, 20261202 + nx * 31 + nz, o.graded, o.lossyRuns, o.float32), o);
    });
  }

  it('when the coefficient arrays are replaced between steps then the new ones are used', () => {
    const make = (): Grid => randomGrid(23, 19, 5, 5, 4, 12, 0, 7);
    const ref = make();
    const ker = make();
    leapfrogStep(ker.f, ker.p, ker.z);
    updateH(ref.f);
    updateHCpml(ref.f, ref.p);
    applySurfaceImpedance(ref.f, ref.z);
    updateE(ref.f);
    updateECpml(ref.f, ref.p);
    // a lossy Ex everywhere from now on: a stale free-space plan would keep ca = 1
    for (const g of [ref, ker]) g.f.caEx = new Float64Array(g.f.caEx.length).fill(0.5);
    for (let step = 0; step < 3; step++) {
      updateH(ref.f);
      updateHCpml(ref.f, ref.p);
      applySurfaceImpedance(ref.f, ref.z);
      updateE(ref.f);
      updateECpml(ref.f, ref.p);
      leapfrogStep(ker.f, ker.p, ker.z);
      expect(firstDifference(ref, ker), `after step ${step}`).toBeUndefined();
    }
  });
});
