// The update kernels (solver/fdtd-kernel.ts) do eight cells per pass for speed; these tests hold them to the plain
// one-cell loops below, bit for bit, on grids whose sizes exercise every remainder and edge path.
// The reference loops are the Yee updates as written out cell by cell (Yee, IEEE Trans. Antennas Propag. 14(3),
// 1966; Taflove & Hagness, Computational Electrodynamics, 3rd ed. 2005, ch. 3) with the CPML auxiliary fields of
// Roden & Gedney (Microwave Opt. Technol. Lett. 27(5), 2000), in the kernel module's own index layout.
import { describe, expect, it } from 'vitest';
import { createPrng, type Prng } from '../coordinator/sampling/prng.js';
import {
  applySurfaceImpedance,
  updateE,
  updateECpml,
  updateH,
  updateHCpml,
  type CpmlState,
  type ImpedanceRow,
  type YeeFields,
} from '../solver/fdtd-kernel.js';

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

function referenceE(f: YeeFields): void {
  const { nx, nz, S, ex, ez, hy, caEx, cbEx, caEz, cbEz, rp, rm, axisFactor } = f;
  for (let k = 0; k < nz; k++) ez[k] = caEz[k] * ez[k] + cbEz[k] * axisFactor * hy[k];
  for (let k = 1; k < nz; k++) ex[k] = caEx[k] * ex[k] + cbEx[k] * (hy[k - 1] - hy[k]);
  for (let i = 1; i < nx; i++) {
    for (let k = 1; k < nz; k++) {
      const ik = i * S + k;
      ex[ik] = caEx[ik] * ex[ik] + cbEx[ik] * (hy[ik - 1] - hy[ik]);
    }
    for (let k = 0; k < nz; k++) {
      const ik = i * S + k;
      ez[ik] = caEz[ik] * ez[ik] + cbEz[ik] * (rp[i] * hy[ik] - rm[i] * hy[ik - S]);
    }
  }
}

function referenceECpml(f: YeeFields, p: CpmlState): void {
  const { nz, S, ex, ez, hy, cbEx, cbEz, nx } = f;
  for (let j = 0; j < p.px; j++) {
    const i = p.ix0 + j;
    if (i < 1) continue;
    for (let k = 0; k < nz; k++) {
      const ik = i * S + k;
      const psi = p.bEz[j] * p.psiEz[j * S + k] + p.aEz[j] * (hy[ik] - hy[ik - S]);
      p.psiEz[j * S + k] = psi;
      ez[ik] += cbEz[ik] * psi;
    }
  }
  for (let i = 0; i < nx; i++) {
    for (let j = 0; j < p.pz; j++) {
      const k = p.kz0 + j;
      if (k < 1) continue;
      const ik = i * S + k;
      const psi = p.bEx[j] * p.psiEx[i * p.pz + j] + p.aEx[j] * (hy[ik - 1] - hy[ik]);
      p.psiEx[i * p.pz + j] = psi;
      ex[ik] += cbEx[ik] * psi;
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

/** A grid with every field, coefficient and ψ random (seeded), CPML layers of px columns and pz rows. */
function randomGrid(nx: number, nz: number, px: number, pz: number, seed: number): Grid {
  const rng = createPrng(seed);
  const S = nz + 1;
  const size = (nx + 1) * S;
  const r = (n: number, scale: number): Float64Array => fill(new Float64Array(n), rng, scale);
  const f: YeeFields = {
    nx,
    nz,
    S,
    ex: r(size, 1),
    ez: r(size, 1),
    hy: r(size, 1e-2),
    caEx: r(size, 0.9),
    cbEx: r(size, 0.3),
    caEz: r(size, 0.9),
    cbEz: r(size, 0.3),
    colEx: Int32Array.from({ length: nx + 1 }, (_, i) => i * S),
    colEz: Int32Array.from({ length: nx + 1 }, (_, i) => i * S),
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
  const pairs: Array<[string, Float64Array, Float64Array]> = [
    ...ARRAYS.map((n): [string, Float64Array, Float64Array] => [n, a.f[n], b.f[n]]),
    ...PSI.map((n): [string, Float64Array, Float64Array] => [n, a.p[n], b.p[n]]),
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

describe('fdtd kernels against the one-cell reference loops', () => {
  it.each(SHAPES)('when the grid has %s (%i×%i, layers %i and %i) then six leapfrog steps match bit for bit', (_label, nx, nz, px, pz) => {
    const ref = randomGrid(nx, nz, px, pz, 20261201 + nx);
    const ker = randomGrid(nx, nz, px, pz, 20261201 + nx);
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
    const start = randomGrid(nx, nz, px, pz, 20261201 + nx);
    expect(firstDifference(start, ker)).toBeDefined();
  });
});
