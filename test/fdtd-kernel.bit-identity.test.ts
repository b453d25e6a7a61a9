// The update kernels (solver/fdtd-kernel.ts) do eight cells per pass for speed; these tests hold them to the plain
// one-cell loops below, bit for bit, on grids whose sizes exercise every remainder and edge path, in both
// coefficient layouts: per-cell arrays (colEx[i] = i·S) and the column profiles solve() runs on (columns of one
// ground segment share one profile, as solver/grid.ts buildMaterials makes them).
// The reference loops are the Yee updates as written out cell by cell (Yee, IEEE Trans. Antennas Propag. 14(3),
// 1966; Taflove & Hagness, Computational Electrodynamics, 3rd ed. 2005, ch. 3) with the CPML auxiliary fields of
// Roden & Gedney (Microwave Opt. Technol. Lett. 27(5), 2000), in the kernel module's own index layout.
import { describe, expect, it } from 'vitest';
import { createPrng, type Prng } from '../coordinator/sampling/prng.js';
import { parseCase } from '../schemas/case.js';
import {
  applySurfaceImpedance,
  updateE,
  updateECpml,
  updateH,
  updateHCpml,
  type CpmlState,
  type ImpedanceRow,
  type FieldArray,
  type YeeFields,
} from '../solver/fdtd-kernel.js';
import { buildMaterials, planGrid } from '../solver/grid.js';

function referenceH(f: YeeFields): void {
  const { nx, nz, S, ex, ez, hy, chx, chz } = f;
  for (let i = 0; i < nx; i++) {
    for (let k = 0; k < nz; k++) {
      const ik = i * S + k;
      hy[ik] += chx * (ez[ik + S] - ez[ik]) - chz[k] * (ex[ik + 1] - ex[ik]);
    }
  }
}

function referenceHCpml(f: YeeFields, p: CpmlState): void {
  const { nz, S, ex, ez, hy, chx, chz, nx } = f;
  for (let j = 0; j < p.px; j++) {
    for (let k = 0; k < nz; k++) {
      const ik = (p.ix0 + j) * S + k;
      const psi = p.bHx[j] * p.psiHx[j * S + k] + p.aHx[j] * (ez[ik + S] - ez[ik]);
      p.psiHx[j * S + k] = psi;
      hy[ik] += chx * psi;
    }
  }
  for (let i = 0; i < nx; i++) {
    for (let j = 0; j < p.pz; j++) {
      const k = p.kz0 + j;
      const ik = i * S + k;
      const psi = p.bHz[j] * p.psiHz[i * p.pz + j] + p.aHz[j] * (ex[ik + 1] - ex[ik]);
      p.psiHz[i * p.pz + j] = psi;
      hy[ik] -= chz[k] * psi;
    }
  }
}

// The coefficient of cell (i, k) is at colEx[i] + k (Ex) and colEz[i] + k (Ez), the layout's definition
// (YeeFields in solver/fdtd-kernel.ts).
function referenceE(f: YeeFields): void {
  const { nx, nz, S, ex, ez, hy, caEx, cbEx, caEz, cbEz, colEx, colEz, rp, rm, axisFactor } = f;
  for (let k = 0; k < nz; k++) ez[k] = caEz[colEz[0] + k] * ez[k] + cbEz[colEz[0] + k] * axisFactor * hy[k];
  for (let k = 1; k < nz; k++) ex[k] = caEx[colEx[0] + k] * ex[k] + cbEx[colEx[0] + k] * (hy[k - 1] - hy[k]);
  for (let i = 1; i < nx; i++) {
    for (let k = 1; k < nz; k++) {
      const ik = i * S + k;
      const c = colEx[i] + k;
      ex[ik] = caEx[c] * ex[ik] + cbEx[c] * (hy[ik - 1] - hy[ik]);
    }
    for (let k = 0; k < nz; k++) {
      const ik = i * S + k;
      const c = colEz[i] + k;
      ez[ik] = caEz[c] * ez[ik] + cbEz[c] * (rp[i] * hy[ik] - rm[i] * hy[ik - S]);
    }
  }
}

function referenceECpml(f: YeeFields, p: CpmlState): void {
  const { nz, S, ex, ez, hy, cbEx, cbEz, colEx, colEz, nx } = f;
  for (let j = 0; j < p.px; j++) {
    const i = p.ix0 + j;
    if (i < 1) continue;
    for (let k = 0; k < nz; k++) {
      const ik = i * S + k;
      const psi = p.bEz[j] * p.psiEz[j * S + k] + p.aEz[j] * (hy[ik] - hy[ik - S]);
      p.psiEz[j * S + k] = psi;
      ez[ik] += cbEz[colEz[i] + k] * psi;
    }
  }
  for (let i = 0; i < nx; i++) {
    for (let j = 0; j < p.pz; j++) {
      const k = p.kz0 + j;
      if (k < 1) continue;
      const ik = i * S + k;
      const psi = p.bEx[j] * p.psiEx[i * p.pz + j] + p.aEx[j] * (hy[ik - 1] - hy[ik]);
      p.psiEx[i * p.pz + j] = psi;
      ex[ik] += cbEx[colEx[i] + k] * psi;
    }
  }
}

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

/** Where each column's coefficients live: `profiles` columns of S values, column i's at colEx[i] and colEz[i]. */
interface Layout {
  profiles: number;
  colEx: Int32Array;
  colEz: Int32Array;
}

/** Per-cell arrays: every column its own profile (the benchmark's `plain` layout). */
function perCellLayout(nx: number, S: number): Layout {
  const col = Int32Array.from({ length: nx + 1 }, (_, i) => i * S);
  return { profiles: nx + 1, colEx: col, colEz: Int32Array.from(col) };
}

/**
 * Column profiles by ground segment, by buildMaterials' rule (solver/grid.ts): a segment starting at `startsCells`
 * (in cells, off the grid lines) covers Ex at (i+½)Δx and Ez at i·Δx from there on, so a boundary column has its
 * Ex and Ez in different profiles.
 */
function segmentLayout(nx: number, S: number, startsCells: number[]): Layout {
  const starts = [...new Set(startsCells.filter((x) => x < nx))].sort((a, b) => a - b);
  const segment = (x: number): number => {
    let j = 0;
    for (let s = 0; s < starts.length; s++) if (starts[s] <= x) j = s;
    return j;
  };
  return {
    profiles: starts.length,
    colEx: Int32Array.from({ length: nx + 1 }, (_, i) => segment(i + 0.5) * S),
    colEz: Int32Array.from({ length: nx + 1 }, (_, i) => segment(i) * S),
  };
}

/** Segment starts for a shape: the first column, a third and two thirds along, and one inside the far layer. */
function segmentStarts(nx: number, px: number): number[] {
  return [0, 0.3 * nx + 0.3, 0.6 * nx + 0.6, nx - px / 2 + 0.3];
}

/** A grid with every field, coefficient and ψ random (seeded), CPML layers of px columns and pz rows. */
function randomGrid(nx: number, nz: number, px: number, pz: number, seed: number, layout: Layout, float32 = false): Grid {
  const rng = createPrng(seed);
  const S = nz + 1;
  const size = (nx + 1) * S;
  const coefficients = layout.profiles * S;
  const r = (n: number, scale: number): Float64Array => fill(new Float64Array(n), rng, scale);
  // grid.field_precision float32: the three fields in Float32Arrays, all else double
  const field = (a: Float64Array): FieldArray => (float32 ? Float32Array.from(a) : a);
  const f: YeeFields = {
    nx,
    nz,
    S,
    ex: field(r(size, 1)),
    ez: field(r(size, 1)),
    hy: field(r(size, 1e-2)),
    caEx: r(coefficients, 0.9),
    cbEx: r(coefficients, 0.3),
    caEz: r(coefficients, 0.9),
    cbEz: r(coefficients, 0.3),
    colEx: layout.colEx,
    colEz: layout.colEz,
    chx: 0.2 + rng.nextFloat() * 0.1,
    chz: r(nz, 0.2),
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

const ARRAYS = ['ex', 'ez', 'hy'] as const;
const PSI = ['psiHx', 'psiEz', 'psiHz', 'psiEx'] as const;

/** First element where two grids differ in bits (Object.is also tells −0 from +0), or undefined. */
function firstDifference(a: Grid, b: Grid): string | undefined {
  const pairs: Array<[string, FieldArray, FieldArray]> = [
    ...ARRAYS.map((n): [string, FieldArray, FieldArray] => [n, a.f[n], b.f[n]]),
    ...PSI.map((n): [string, FieldArray, FieldArray] => [n, a.p[n], b.p[n]]),
    ['hsPrev', a.z.hsPrev, b.z.hsPrev],
  ];
  for (const [name, x, y] of pairs) {
    for (let q = 0; q < x.length; q++) if (!Object.is(x[q], y[q])) return `${name}[${q}]: kernel ${y[q]}, reference ${x[q]}`;
  }
  return undefined;
}

// nx, nz, px, pz: sizes chosen so the eight-cell passes have remainders, none at all (nz < 8), exact multiples,
// a layer that starts at column 0 (ix0 = 0: the axis column is skipped by the E layer) and a top layer filling
// the whole height (kz0 = 0: the ground row is skipped).
const SHAPES: Array<[string, number, number, number, number]> = [
  ['remainders in every loop', 37, 29, 9, 11],
  ['exact multiples of eight', 32, 24, 8, 16],
  ['rows fewer than eight', 13, 7, 3, 5],
  ['layers covering the whole grid', 10, 20, 10, 20],
  ['no top layer (pec ceiling)', 21, 17, 6, 0],
];

/** Six leapfrog steps of kernels and reference loops side by side, compared after every update. */
function expectBitIdentical(make: () => Grid): void {
  const ref = make();
  const ker = make();
  for (let step = 0; step < 6; step++) {
    referenceH(ref.f);
    updateH(ker.f);
    expect(firstDifference(ref, ker), `after updateH, step ${step}`).toBeUndefined();
    referenceHCpml(ref.f, ref.p);
    updateHCpml(ker.f, ker.p);
    expect(firstDifference(ref, ker), `after updateHCpml, step ${step}`).toBeUndefined();
    // the surface-impedance row is not unrolled: the same function on both keeps the two grids in step
    applySurfaceImpedance(ref.f, ref.z);
    applySurfaceImpedance(ker.f, ker.z);
    referenceE(ref.f);
    updateE(ker.f);
    expect(firstDifference(ref, ker), `after updateE, step ${step}`).toBeUndefined();
    referenceECpml(ref.f, ref.p);
    updateECpml(ker.f, ker.p);
    expect(firstDifference(ref, ker), `after updateECpml, step ${step}`).toBeUndefined();
  }
  // the comparison has teeth: the fields moved away from their starting values
  expect(firstDifference(make(), ker)).toBeDefined();
}

/** The layout is what it claims: profiles shared by several columns, and some column with Ex and Ez apart. */
function expectSharedProfiles(layout: Layout, nx: number): void {
  expect(layout.profiles).toBeGreaterThan(1);
  expect(layout.profiles).toBeLessThan(nx + 1);
  expect(layout.colEx.some((o, i) => o !== layout.colEz[i])).toBe(true);
}

describe('fdtd kernels against the one-cell reference loops', () => {
  it.each(SHAPES)('when the grid has %s (%i×%i, layers %i and %i) and per-cell coefficients then six leapfrog steps match bit for bit', (_label, nx, nz, px, pz) => {
    const layout = perCellLayout(nx, nz + 1);
    expectBitIdentical(() => randomGrid(nx, nz, px, pz, 20261201 + nx, layout));
  });

  it.each(SHAPES)('when the grid has %s (%i×%i, layers %i and %i) and column profiles by segment then six leapfrog steps match bit for bit', (_label, nx, nz, px, pz) => {
    const layout = segmentLayout(nx, nz + 1, segmentStarts(nx, px));
    expectSharedProfiles(layout, nx);
    expectBitIdentical(() => randomGrid(nx, nz, px, pz, 20261202 + nx, layout));
  });

  // the updates carry only values they read (already rounded) from cell to cell, so float32 fields stay bit-identical
  it.each(SHAPES)('when the grid has %s (%i×%i, layers %i and %i) and float32 fields then six leapfrog steps match bit for bit', (_label, nx, nz, px, pz) => {
    const layout = segmentLayout(nx, nz + 1, segmentStarts(nx, px));
    expectBitIdentical(() => randomGrid(nx, nz, px, pz, 20261204 + nx, layout, true));
  });

  it('when the layout is the one buildMaterials makes for a three-segment resolved ground then six leapfrog steps match bit for bit', () => {
    // a small invented case: 100 kHz, 100 m cells, three ground segments whose starts fall between grid lines
    const c = parseCase({
      geometry: 'axisymmetric',
      frequency_hz: 1e5,
      ground: {
        model: 'resolved',
        segments: [
          { start_m: 0, conductivity_s_per_m: 1e-2, relative_permittivity: 30 },
          { start_m: 730, conductivity_s_per_m: 1e-3, relative_permittivity: 15 },
          { start_m: 1640, conductivity_s_per_m: 4e-3, relative_permittivity: 20 },
        ],
      },
      domain: { range_m: 2000, height_m: 900 },
      grid: { cell_size_m: 100, absorbing_cells: 9 },
      receivers: { ranges_m: [1000] },
    });
    const g = planGrid(c);
    const mat = buildMaterials(c, g);
    const layout: Layout = { profiles: mat.caEx.length / (g.nz + 1), colEx: mat.colEx, colEz: mat.colEz };
    expectSharedProfiles(layout, g.nx);
    expect(mat.colEx.length).toBe(g.nx + 1);
    expectBitIdentical(() => randomGrid(g.nx, g.nz, g.pmlX, g.pmlTop, 20261203, layout));
  });
});
