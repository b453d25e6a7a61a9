// Update kernels of the 2-D Yee scheme (TM to the grid plane: Ex, Ez, Hy; or Er, Ez, Hφ on the axisymmetric grid).
// One function per update; flat Float64Arrays, one stride; no allocation inside the loops.
//   ∂Hy/∂t = (1/μ0)(∂Ez/∂x − ∂Ex/∂z)
//   ε∂Ex/∂t + σEx = −∂Hy/∂z
//   ε∂Ez/∂t + σEz = (1/r)∂(rHy)/∂r  (axisymmetric)  or  ∂Hy/∂x  (planar)
// (Yee, IEEE Trans. Antennas Propag. 14(3), 1966; Taflove & Hagness, Computational Electrodynamics, ch. 3.)
//
// Speed: the long inner loops do eight cells per pass, then finish the row one cell at a time. Node 20's optimising
// compiler re-checks each typed array's map and reloads its length and data pointer on every pass of a loop; eight
// cells share that work (`npm run bench` before and after, back to back: the plain step ×1.5–2.2 on its three
// grids). Each cell's expression is exactly the one-cell loop's, term for term, so results are bit-identical to the
// plain loops (JavaScript never fuses a multiply and an add; test/fdtd-kernel.bit-identity.test.ts holds them to it).
// A value read for one cell and needed by the next (Ex below, Hy below) is carried in a local.

/**
 * Storage of the fields: Float64Array, or Float32Array for the case's `grid.field_precision: float32`. The kernel
 * is the same code for both (JavaScript computes in double precision either way; a store into a Float32Array
 * rounds once), so the bit-identity of leapfrogStep and the updates in turn holds for each.
 */
export type FieldArray = Float64Array | Float32Array;

export interface YeeFields {
  nx: number;
  nz: number;
  /** Row stride, nz + 1. */
  S: number;
  ex: FieldArray;
  ez: FieldArray;
  hy: FieldArray;
  /**
   * Coefficients by column profile: the coefficient of cell (i, k) is at colEx[i] + k (colEz[i] + k for Ez).
   * Columns of the same materials share one profile, so the update reads three field arrays per cell and the
   * coefficients stay in cache; colEx[i] = i·S gives plain per-cell arrays.
   */
  caEx: Float64Array;
  cbEx: Float64Array;
  caEz: Float64Array;
  cbEz: Float64Array;
  colEx: Int32Array;
  colEz: Int32Array;
  /** Δt/(μ0Δx). */
  chx: number;
  /** Δt/(μ0Δz_k) per row. */
  chz: Float64Array;
  rp: Float64Array;
  rm: Float64Array;
  axisFactor: number;
}

export interface CpmlState {
  /** First column of the far-side layer; layer thickness in cells. */
  ix0: number;
  px: number;
  /** First row of the top layer; its thickness in rows (0: none). */
  kz0: number;
  pz: number;
  bHx: Float64Array;
  aHx: Float64Array;
  bEz: Float64Array;
  aEz: Float64Array;
  bHz: Float64Array;
  aHz: Float64Array;
  bEx: Float64Array;
  aEx: Float64Array;
  /** ψ arrays: x-layer (px × S), top layer (nx × pz). */
  psiHx: Float64Array;
  psiEz: Float64Array;
  psiHz: Float64Array;
  psiEx: Float64Array;
}

/** Surface-impedance ground on Ex row 0: per column a = R/2, b = L/Δt, and the sampling of H at the surface. */
export interface ImpedanceRow {
  /** R/2 per column, Ω. */
  halfR: Float64Array;
  /** L/Δt per column, Ω. */
  lOverDt: Float64Array;
  /** Surface H = wNear·Hy[k=0] + wFar·Hy[k=1]: (1, 0) half a cell above; (1.5, −0.5) extrapolated. */
  wNear: number;
  wFar: number;
  /** Surface H at the previous half step, per column. */
  hsPrev: Float64Array;
}

// The records above are built by the three functions below, one store per field, never returned as an object
// literal. Measured with node 20 (--trace-generalization, --trace-deopt): the optimizing compiler learns that a
// record's field holds a Float64Array and drops the checks that would prove it; a literal's fields keep that type
// only until the literal runs a second time, when V8 makes the literal's template and widens each such field to
// "any value". That discards every optimized function that read the fields, so each solver thread's second case
// ran the kernel unoptimized until it was compiled again (+10 % on a 0.3 s case, +20 % with both cores busy and no
// core left for the compiler). A record built by stores keeps its field types from case to case. (Keyed stores in
// a loop would do too, but V8 turns an object given more than about 18 fields that way into a slow dictionary.)

/** The fields and coefficients as the kernel reads them (see above for why not a literal). */
export function yeeFields(r: YeeFields): YeeFields {
  const f = {} as YeeFields;
  f.nx = r.nx;
  f.nz = r.nz;
  f.S = r.S;
  f.ex = r.ex;
  f.ez = r.ez;
  f.hy = r.hy;
  f.caEx = r.caEx;
  f.cbEx = r.cbEx;
  f.caEz = r.caEz;
  f.cbEz = r.cbEz;
  f.colEx = r.colEx;
  f.colEz = r.colEz;
  f.chx = r.chx;
  f.chz = r.chz;
  f.rp = r.rp;
  f.rm = r.rm;
  f.axisFactor = r.axisFactor;
  return f;
}

/** The absorbing layers' state as the kernel reads it (see above for why not a literal). */
export function cpmlState(r: CpmlState): CpmlState {
  const p = {} as CpmlState;
  p.ix0 = r.ix0;
  p.px = r.px;
  p.kz0 = r.kz0;
  p.pz = r.pz;
  p.bHx = r.bHx;
  p.aHx = r.aHx;
  p.bEz = r.bEz;
  p.aEz = r.aEz;
  p.bHz = r.bHz;
  p.aHz = r.aHz;
  p.bEx = r.bEx;
  p.aEx = r.aEx;
  p.psiHx = r.psiHx;
  p.psiEz = r.psiEz;
  p.psiHz = r.psiHz;
  p.psiEx = r.psiEx;
  return p;
}

/** The ground row as the kernel reads it (see above for why not a literal). */
export function impedanceRow(r: ImpedanceRow): ImpedanceRow {
  const z = {} as ImpedanceRow;
  z.halfR = r.halfR;
  z.lOverDt = r.lOverDt;
  z.wNear = r.wNear;
  z.wFar = r.wFar;
  z.hsPrev = r.hsPrev;
  return z;
}

/** Hy^{n+½} = Hy^{n−½} + Δt/μ0·(∂Ez/∂x − ∂Ex/∂z), from E^n; on columns [i0, i1), rows k0 and up (default: all). */
export function updateH(f: YeeFields, i0 = 0, i1 = f.nx, k0 = 0): void {
  const { nz, S, ex, ez, hy, chx, chz } = f;
  for (let i = i0; i < i1; i++) {
    const base = i * S;
    let exBelow = ex[base + k0];
    let k = k0;
    for (; k + 7 < nz; k += 8) {
      const ik = base + k;
      const iu = ik + S; // the same row of the next column
      const x1 = ex[ik + 1], x2 = ex[ik + 2], x3 = ex[ik + 3], x4 = ex[ik + 4];
      const x5 = ex[ik + 5], x6 = ex[ik + 6], x7 = ex[ik + 7], x8 = ex[ik + 8];
      hy[ik] += chx * (ez[iu] - ez[ik]) - chz[k] * (x1 - exBelow);
      hy[ik + 1] += chx * (ez[iu + 1] - ez[ik + 1]) - chz[k + 1] * (x2 - x1);
      hy[ik + 2] += chx * (ez[iu + 2] - ez[ik + 2]) - chz[k + 2] * (x3 - x2);
      hy[ik + 3] += chx * (ez[iu + 3] - ez[ik + 3]) - chz[k + 3] * (x4 - x3);
      hy[ik + 4] += chx * (ez[iu + 4] - ez[ik + 4]) - chz[k + 4] * (x5 - x4);
      hy[ik + 5] += chx * (ez[iu + 5] - ez[ik + 5]) - chz[k + 5] * (x6 - x5);
      hy[ik + 6] += chx * (ez[iu + 6] - ez[ik + 6]) - chz[k + 6] * (x7 - x6);
      hy[ik + 7] += chx * (ez[iu + 7] - ez[ik + 7]) - chz[k + 7] * (x8 - x7);
      exBelow = x8;
    }
    for (; k < nz; k++) {
      const ik = base + k;
      const exAbove = ex[ik + 1];
      hy[ik] += chx * (ez[ik + S] - ez[ik]) - chz[k] * (exAbove - exBelow);
      exBelow = exAbove;
    }
  }
}

/** CPML terms of the H update: ψ ← bψ + a·ΔE, Hy += chx·ψx − chz·ψz. */
export function updateHCpml(f: YeeFields, p: CpmlState): void {
  const { nz, S, ex, ez, hy, chx, chz, nx } = f;
  const { ix0, px, kz0, pz, bHx, aHx, bHz, aHz, psiHx, psiHz } = p;
  for (let j = 0; j < px; j++) {
    const i = ix0 + j;
    const base = i * S;
    const bj = bHx[j];
    const aj = aHx[j];
    const pbase = j * S;
    let k = 0;
    for (; k + 7 < nz; k += 8) {
      const ik = base + k;
      const iu = ik + S;
      const pk = pbase + k;
      const p0 = bj * psiHx[pk] + aj * (ez[iu] - ez[ik]);
      const p1 = bj * psiHx[pk + 1] + aj * (ez[iu + 1] - ez[ik + 1]);
      const p2 = bj * psiHx[pk + 2] + aj * (ez[iu + 2] - ez[ik + 2]);
      const p3 = bj * psiHx[pk + 3] + aj * (ez[iu + 3] - ez[ik + 3]);
      const p4 = bj * psiHx[pk + 4] + aj * (ez[iu + 4] - ez[ik + 4]);
      const p5 = bj * psiHx[pk + 5] + aj * (ez[iu + 5] - ez[ik + 5]);
      const p6 = bj * psiHx[pk + 6] + aj * (ez[iu + 6] - ez[ik + 6]);
      const p7 = bj * psiHx[pk + 7] + aj * (ez[iu + 7] - ez[ik + 7]);
      psiHx[pk] = p0;
      psiHx[pk + 1] = p1;
      psiHx[pk + 2] = p2;
      psiHx[pk + 3] = p3;
      psiHx[pk + 4] = p4;
      psiHx[pk + 5] = p5;
      psiHx[pk + 6] = p6;
      psiHx[pk + 7] = p7;
      hy[ik] += chx * p0;
      hy[ik + 1] += chx * p1;
      hy[ik + 2] += chx * p2;
      hy[ik + 3] += chx * p3;
      hy[ik + 4] += chx * p4;
      hy[ik + 5] += chx * p5;
      hy[ik + 6] += chx * p6;
      hy[ik + 7] += chx * p7;
    }
    for (; k < nz; k++) {
      const ik = base + k;
      const psi = bj * psiHx[pbase + k] + aj * (ez[ik + S] - ez[ik]);
      psiHx[pbase + k] = psi;
      hy[ik] += chx * psi;
    }
  }
  if (pz === 0) return;
  for (let i = 0; i < nx; i++) {
    const base = i * S + kz0;
    const pbase = i * pz;
    let exBelow = ex[base];
    let j = 0;
    for (; j + 7 < pz; j += 8) {
      const ik = base + j;
      const pj = pbase + j;
      const k = kz0 + j;
      const x1 = ex[ik + 1], x2 = ex[ik + 2], x3 = ex[ik + 3], x4 = ex[ik + 4];
      const x5 = ex[ik + 5], x6 = ex[ik + 6], x7 = ex[ik + 7], x8 = ex[ik + 8];
      const p0 = bHz[j] * psiHz[pj] + aHz[j] * (x1 - exBelow);
      const p1 = bHz[j + 1] * psiHz[pj + 1] + aHz[j + 1] * (x2 - x1);
      const p2 = bHz[j + 2] * psiHz[pj + 2] + aHz[j + 2] * (x3 - x2);
      const p3 = bHz[j + 3] * psiHz[pj + 3] + aHz[j + 3] * (x4 - x3);
      const p4 = bHz[j + 4] * psiHz[pj + 4] + aHz[j + 4] * (x5 - x4);
      const p5 = bHz[j + 5] * psiHz[pj + 5] + aHz[j + 5] * (x6 - x5);
      const p6 = bHz[j + 6] * psiHz[pj + 6] + aHz[j + 6] * (x7 - x6);
      const p7 = bHz[j + 7] * psiHz[pj + 7] + aHz[j + 7] * (x8 - x7);
      psiHz[pj] = p0;
      psiHz[pj + 1] = p1;
      psiHz[pj + 2] = p2;
      psiHz[pj + 3] = p3;
      psiHz[pj + 4] = p4;
      psiHz[pj + 5] = p5;
      psiHz[pj + 6] = p6;
      psiHz[pj + 7] = p7;
      hy[ik] -= chz[k] * p0;
      hy[ik + 1] -= chz[k + 1] * p1;
      hy[ik + 2] -= chz[k + 2] * p2;
      hy[ik + 3] -= chz[k + 3] * p3;
      hy[ik + 4] -= chz[k + 4] * p4;
      hy[ik + 5] -= chz[k + 5] * p5;
      hy[ik + 6] -= chz[k + 6] * p6;
      hy[ik + 7] -= chz[k + 7] * p7;
      exBelow = x8;
    }
    for (; j < pz; j++) {
      const ik = base + j;
      const exAbove = ex[ik + 1];
      const psi = bHz[j] * psiHz[pbase + j] + aHz[j] * (exAbove - exBelow);
      psiHz[pbase + j] = psi;
      hy[ik] -= chz[kz0 + j] * psi;
      exBelow = exAbove;
    }
  }
}

/**
 * Surface impedance on the ground row, solved together with the first H row so it is stable for any R, L:
 *   Ex^n = −(R·Hs^n + L·(∂Hs/∂t)^n),  Hs^n ≈ (Hs^{n+½} + Hs^{n−½})/2,  (∂Hs/∂t)^n ≈ (Hs^{n+½} − Hs^{n−½})/Δt
 * (the Leontovich condition E_tan = Zs·(n̂ × H), n̂ = +z out of the ground, so Ex = −Zs·Hy: docs/references.md; Maloney
 * & Smith, IEEE Trans. Antennas Propag. 40(1), 1992, for the R + L form). `updateH` has already advanced Hy[i][0]
 * with the stale Ex[i][0]; that contribution is taken out, and the pair (Hy[i][0], Ex^n[i][0]) solved exactly:
 *   Hy0 = P + c·Ex0,  Ex0 = −(a+b)(wN·Hy0 + wF·Hy1) − (a−b)·Hs_prev,  c = Δt/(μ0Δz0).
 */
export function applySurfaceImpedance(f: YeeFields, z: ImpedanceRow): void {
  for (let i = 0; i < f.nx; i++) surfaceImpedanceColumn(f, z, i);
}

/** The surface-impedance solve above for column i alone. */
function surfaceImpedanceColumn(f: YeeFields, z: ImpedanceRow, i: number): void {
  const { S, ex, hy } = f;
  const c = f.chz[0];
  const { halfR, lOverDt, wNear, wFar, hsPrev } = z;
  const ik = i * S;
  const P = hy[ik] - c * ex[ik];
  const apb = halfR[i] + lOverDt[i];
  const amb = halfR[i] - lOverDt[i];
  const h1 = hy[ik + 1];
  const h0 = (P - c * apb * wFar * h1 - c * amb * hsPrev[i]) / (1 + wNear * c * apb);
  const hs = wNear * h0 + wFar * h1;
  const e0 = -apb * hs - amb * hsPrev[i];
  hy[ik] = h0;
  ex[ik] = e0;
  hsPrev[i] = hs;
}

/**
 * E^{n+1} from Hy^{n+½}: lossy-medium update of Ex (rows 1…nz−1) and Ez (columns 0…nx−1, axis included); on columns
 * [i0, i1), rows k0 and up (default: all).
 */
export function updateE(f: YeeFields, i0 = 0, i1 = f.nx, k0 = 0): void {
  const { nz, S, ex, ez, hy, caEx, cbEx, caEz, cbEz, colEx, colEz, rp, rm, axisFactor } = f;
  const kx = Math.max(1, k0); // first Ex row: row 0 belongs to the ground condition
  if (i0 === 0) {
    // axis / symmetry column
    const z0 = colEz[0];
    const x0 = colEx[0];
    for (let k = k0; k < nz; k++) ez[k] = caEz[z0 + k] * ez[k] + cbEz[z0 + k] * axisFactor * hy[k];
    for (let k = kx; k < nz; k++) ex[k] = caEx[x0 + k] * ex[k] + cbEx[x0 + k] * (hy[k - 1] - hy[k]);
  }
  for (let i = Math.max(1, i0); i < i1; i++) {
    const base = i * S;
    const oEx = colEx[i] - base; // coefficient index = field index + offset
    const oEz = colEz[i] - base;
    const end = base + nz;
    const p = rp[i];
    const m = rm[i];
    // Ex, rows 1…nz−1: −∂Hy/∂z from the H rows below and above the node
    let hBelow = hy[base + kx - 1];
    let ik = base + kx;
    for (; ik + 7 < end; ik += 8) {
      const h0 = hy[ik], h1 = hy[ik + 1], h2 = hy[ik + 2], h3 = hy[ik + 3];
      const h4 = hy[ik + 4], h5 = hy[ik + 5], h6 = hy[ik + 6], h7 = hy[ik + 7];
      ex[ik] = caEx[ik + oEx] * ex[ik] + cbEx[ik + oEx] * (hBelow - h0);
      ex[ik + 1] = caEx[ik + oEx + 1] * ex[ik + 1] + cbEx[ik + oEx + 1] * (h0 - h1);
      ex[ik + 2] = caEx[ik + oEx + 2] * ex[ik + 2] + cbEx[ik + oEx + 2] * (h1 - h2);
      ex[ik + 3] = caEx[ik + oEx + 3] * ex[ik + 3] + cbEx[ik + oEx + 3] * (h2 - h3);
      ex[ik + 4] = caEx[ik + oEx + 4] * ex[ik + 4] + cbEx[ik + oEx + 4] * (h3 - h4);
      ex[ik + 5] = caEx[ik + oEx + 5] * ex[ik + 5] + cbEx[ik + oEx + 5] * (h4 - h5);
      ex[ik + 6] = caEx[ik + oEx + 6] * ex[ik + 6] + cbEx[ik + oEx + 6] * (h5 - h6);
      ex[ik + 7] = caEx[ik + oEx + 7] * ex[ik + 7] + cbEx[ik + oEx + 7] * (h6 - h7);
      hBelow = h7;
    }
    for (; ik < end; ik++) {
      const h = hy[ik];
      ex[ik] = caEx[ik + oEx] * ex[ik] + cbEx[ik + oEx] * (hBelow - h);
      hBelow = h;
    }
    // Ez, rows 0…nz−1: (1/r)∂(rHy)/∂r from the H columns either side (im: the previous column)
    ik = base + k0;
    let im = ik - S;
    for (; ik + 7 < end; ik += 8, im += 8) {
      ez[ik] = caEz[ik + oEz] * ez[ik] + cbEz[ik + oEz] * (p * hy[ik] - m * hy[im]);
      ez[ik + 1] = caEz[ik + oEz + 1] * ez[ik + 1] + cbEz[ik + oEz + 1] * (p * hy[ik + 1] - m * hy[im + 1]);
      ez[ik + 2] = caEz[ik + oEz + 2] * ez[ik + 2] + cbEz[ik + oEz + 2] * (p * hy[ik + 2] - m * hy[im + 2]);
      ez[ik + 3] = caEz[ik + oEz + 3] * ez[ik + 3] + cbEz[ik + oEz + 3] * (p * hy[ik + 3] - m * hy[im + 3]);
      ez[ik + 4] = caEz[ik + oEz + 4] * ez[ik + 4] + cbEz[ik + oEz + 4] * (p * hy[ik + 4] - m * hy[im + 4]);
      ez[ik + 5] = caEz[ik + oEz + 5] * ez[ik + 5] + cbEz[ik + oEz + 5] * (p * hy[ik + 5] - m * hy[im + 5]);
      ez[ik + 6] = caEz[ik + oEz + 6] * ez[ik + 6] + cbEz[ik + oEz + 6] * (p * hy[ik + 6] - m * hy[im + 6]);
      ez[ik + 7] = caEz[ik + oEz + 7] * ez[ik + 7] + cbEz[ik + oEz + 7] * (p * hy[ik + 7] - m * hy[im + 7]);
    }
    for (; ik < end; ik++, im++) ez[ik] = caEz[ik + oEz] * ez[ik] + cbEz[ik + oEz] * (p * hy[ik] - m * hy[im]);
  }
}

/** CPML terms of the E update: Ez += cbEz·ψx (far side), Ex += cbEx·ψz (top). */
export function updateECpml(f: YeeFields, p: CpmlState): void {
  const { nz, S, ex, ez, hy, cbEx, cbEz, colEx, colEz, nx } = f;
  const { ix0, px, kz0, pz, bEz, aEz, bEx, aEx, psiEz, psiEx } = p;
  for (let j = 0; j < px; j++) {
    const i = ix0 + j;
    if (i < 1) continue;
    const base = i * S;
    const oEz = colEz[i] - base;
    const bj = bEz[j];
    const aj = aEz[j];
    const pbase = j * S;
    let k = 0;
    for (; k + 7 < nz; k += 8) {
      const ik = base + k;
      const im = ik - S;
      const pk = pbase + k;
      const p0 = bj * psiEz[pk] + aj * (hy[ik] - hy[im]);
      const p1 = bj * psiEz[pk + 1] + aj * (hy[ik + 1] - hy[im + 1]);
      const p2 = bj * psiEz[pk + 2] + aj * (hy[ik + 2] - hy[im + 2]);
      const p3 = bj * psiEz[pk + 3] + aj * (hy[ik + 3] - hy[im + 3]);
      const p4 = bj * psiEz[pk + 4] + aj * (hy[ik + 4] - hy[im + 4]);
      const p5 = bj * psiEz[pk + 5] + aj * (hy[ik + 5] - hy[im + 5]);
      const p6 = bj * psiEz[pk + 6] + aj * (hy[ik + 6] - hy[im + 6]);
      const p7 = bj * psiEz[pk + 7] + aj * (hy[ik + 7] - hy[im + 7]);
      psiEz[pk] = p0;
      psiEz[pk + 1] = p1;
      psiEz[pk + 2] = p2;
      psiEz[pk + 3] = p3;
      psiEz[pk + 4] = p4;
      psiEz[pk + 5] = p5;
      psiEz[pk + 6] = p6;
      psiEz[pk + 7] = p7;
      ez[ik] += cbEz[ik + oEz] * p0;
      ez[ik + 1] += cbEz[ik + oEz + 1] * p1;
      ez[ik + 2] += cbEz[ik + oEz + 2] * p2;
      ez[ik + 3] += cbEz[ik + oEz + 3] * p3;
      ez[ik + 4] += cbEz[ik + oEz + 4] * p4;
      ez[ik + 5] += cbEz[ik + oEz + 5] * p5;
      ez[ik + 6] += cbEz[ik + oEz + 6] * p6;
      ez[ik + 7] += cbEz[ik + oEz + 7] * p7;
    }
    for (; k < nz; k++) {
      const ik = base + k;
      const psi = bj * psiEz[pbase + k] + aj * (hy[ik] - hy[ik - S]);
      psiEz[pbase + k] = psi;
      ez[ik] += cbEz[ik + oEz] * psi;
    }
  }
  if (pz === 0) return;
  // the Ex row on the bottom edge (k = 0) belongs to the ground condition, not to the layer
  const j0 = kz0 < 1 ? 1 - kz0 : 0;
  for (let i = 0; i < nx; i++) {
    const base = i * S + kz0;
    const oEx = colEx[i] - i * S;
    const pbase = i * pz;
    let j = j0;
    let hBelow = hy[base + j - 1];
    for (; j + 7 < pz; j += 8) {
      const ik = base + j;
      const pj = pbase + j;
      const h0 = hy[ik], h1 = hy[ik + 1], h2 = hy[ik + 2], h3 = hy[ik + 3];
      const h4 = hy[ik + 4], h5 = hy[ik + 5], h6 = hy[ik + 6], h7 = hy[ik + 7];
      const p0 = bEx[j] * psiEx[pj] + aEx[j] * (hBelow - h0);
      const p1 = bEx[j + 1] * psiEx[pj + 1] + aEx[j + 1] * (h0 - h1);
      const p2 = bEx[j + 2] * psiEx[pj + 2] + aEx[j + 2] * (h1 - h2);
      const p3 = bEx[j + 3] * psiEx[pj + 3] + aEx[j + 3] * (h2 - h3);
      const p4 = bEx[j + 4] * psiEx[pj + 4] + aEx[j + 4] * (h3 - h4);
      const p5 = bEx[j + 5] * psiEx[pj + 5] + aEx[j + 5] * (h4 - h5);
      const p6 = bEx[j + 6] * psiEx[pj + 6] + aEx[j + 6] * (h5 - h6);
      const p7 = bEx[j + 7] * psiEx[pj + 7] + aEx[j + 7] * (h6 - h7);
      psiEx[pj] = p0;
      psiEx[pj + 1] = p1;
      psiEx[pj + 2] = p2;
      psiEx[pj + 3] = p3;
      psiEx[pj + 4] = p4;
      psiEx[pj + 5] = p5;
      psiEx[pj + 6] = p6;
      psiEx[pj + 7] = p7;
      ex[ik] += cbEx[ik + oEx] * p0;
      ex[ik + 1] += cbEx[ik + oEx + 1] * p1;
      ex[ik + 2] += cbEx[ik + oEx + 2] * p2;
      ex[ik + 3] += cbEx[ik + oEx + 3] * p3;
      ex[ik + 4] += cbEx[ik + oEx + 4] * p4;
      ex[ik + 5] += cbEx[ik + oEx + 5] * p5;
      ex[ik + 6] += cbEx[ik + oEx + 6] * p6;
      ex[ik + 7] += cbEx[ik + oEx + 7] * p7;
      hBelow = h7;
    }
    for (; j < pz; j++) {
      const ik = base + j;
      const h = hy[ik];
      const psi = bEx[j] * psiEx[pbase + j] + aEx[j] * (hBelow - h);
      psiEx[pbase + j] = psi;
      ex[ik] += cbEx[ik + oEx] * psi;
      hBelow = h;
    }
  }
}

// ---------------------------------------------------------------------------------------------------------------
// One leapfrog step in a single sweep over the columns.
//
// `leapfrogStep` does what updateH, updateHCpml, applySurfaceImpedance, updateE and updateECpml do in turn, with the
// same expression for every cell, so its results are bit-identical to theirs (test/fdtd-kernel.leapfrog-step.test.ts);
// only the order of independent cell updates changes. Column i's H needs E of columns i and i+1 before their E
// update, and column i's E needs H of columns i−1 and i after theirs; sweeping i upwards and finishing H, the
// ground row and E of one column before the next meets both, so each column's fields are read from memory once
// per step instead of twice (Taflove & Hagness, Computational Electrodynamics, 3rd ed. 2005, ch. 3, the 2-D TM updates
// being reordered; the order is free because each update is explicit in the other field).
// Inside a column away from the absorbing layers and the ground rows, H, Ex and Ez of one row are updated in one
// loop pass, and rows whose coefficients are free space's (ca = 1, one cb, one Δt/(μ0Δz)) run in a loop of their
// own with those constants: 1·x is x exactly, so the constant form is the same number.
// ---------------------------------------------------------------------------------------------------------------

/**
 * Per column, the rows [lo, hi) of the fused loop whose coefficients are all free space's constants. Found once per
 * grid and kept beside it: the coefficient arrays must not be changed in place after the first step (new arrays
 * give a new plan).
 */
interface FreeSpacePlan {
  readonly caEx: Float64Array;
  readonly cbEx: Float64Array;
  readonly caEz: Float64Array;
  readonly cbEz: Float64Array;
  readonly chz: Float64Array;
  readonly colEx: Int32Array;
  readonly colEz: Int32Array;
  /** First row of the top layer (nz without one): the fused loop covers rows 2 … kTop−1. */
  readonly kTop: number;
  /** Free space's cb of Ex and Ez and its Δt/(μ0Δz). */
  readonly cbEx0: number;
  readonly cbEz0: number;
  readonly chz0: number;
  /** The same three constants in a typed array: read inside a loop they are raw doubles, not tagged numbers. */
  readonly free: Float64Array;
  /**
   * Whether Ez's cb varies from row to row inside the free-space runs (on the sphere it carries the metric factor
   * (a/ρ)², one value a row): the runs then read it from the coefficient arrays, the other constants stay constants.
   */
  readonly graded: boolean;
  /**
   * 1 where the column's rows in the top layer are all lossless with the constants (ca = 1, cbEx0, chz0; Ez's cb
   * read from the arrays there): topLayerPairLossless then reads no ca and no Ex cb; 2 where Ez's cb is cbEz0 on
   * those rows too (a flat grid's open top): topLayerPairFree then reads no coefficient array at all; 0 otherwise.
   */
  readonly topFree: Uint8Array;
  readonly lo: Int32Array;
  readonly hi: Int32Array;
  /**
   * Per column, rows 2 … kTop−1 cut into runs of one material: triples (first row, end row, uniform) from
   * runs[runAt[i]] to runs[runAt[i+1]], uniform = 1 where every coefficient is the same on every row of the run
   * (the free-space run [lo, hi) is one of them, uniform unless graded).
   */
  readonly runs: Int32Array;
  readonly runAt: Int32Array;
}

const plans = new WeakMap<YeeFields, FreeSpacePlan>();

function freeSpacePlan(f: YeeFields, kTop: number): FreeSpacePlan {
  const old = plans.get(f);
  if (
    old &&
    old.kTop === kTop &&
    old.caEx === f.caEx &&
    old.cbEx === f.cbEx &&
    old.caEz === f.caEz &&
    old.cbEz === f.cbEz &&
    old.chz === f.chz &&
    old.colEx === f.colEx &&
    old.colEz === f.colEz
  ) {
    return old;
  }
  const { nx, nz, caEx, cbEx, caEz, cbEz, chz, colEx, colEz } = f;
  const lo = new Int32Array(nx);
  const hi = new Int32Array(nx);
  let graded = false;
  const topFree = new Uint8Array(nx);
  // the candidate constants: the cell just below the top layer in the middle column, free space on any open grid
  const ic = nx >> 1;
  const kc = Math.max(0, kTop - 1);
  const cbEx0 = cbEx[colEx[ic] + kc];
  const cbEz0 = cbEz[colEz[ic] + kc];
  const chz0 = chz[kc];
  for (let i = 0; i < nx; i++) {
    // the longest run of free-space rows in the column (Object.is: −0 is not +0 here)
    let runLo = 2;
    let best = 0;
    let start = -1;
    for (let k = 2; k <= kTop; k++) {
      // cbEz may vary from row to row (the sphere's metric factor): see `graded` below
      const free =
        k < kTop &&
        Object.is(caEx[colEx[i] + k], 1) &&
        Object.is(cbEx[colEx[i] + k], cbEx0) &&
        Object.is(caEz[colEz[i] + k], 1) &&
        Object.is(chz[k], chz0);
      if (free && start < 0) start = k;
      if (!free && start >= 0) {
        if (k - start > best) {
          best = k - start;
          runLo = start;
        }
        start = -1;
      }
    }
    lo[i] = runLo;
    hi[i] = runLo + best;
    for (let k = runLo; k < runLo + best; k++) if (!Object.is(cbEz[colEz[i] + k], cbEz0)) graded = true;
    let top = 2;
    for (let k = kTop; k < nz; k++) {
      const lossless =
        Object.is(caEx[colEx[i] + k], 1) && Object.is(cbEx[colEx[i] + k], cbEx0) && Object.is(caEz[colEz[i] + k], 1) && Object.is(chz[k], chz0);
      if (!lossless) top = 0;
      else if (top === 2 && !Object.is(cbEz[colEz[i] + k], cbEz0)) top = 1;
    }
    topFree[i] = top;
  }
  const free = Float64Array.of(cbEx0, cbEz0, chz0);
  // the runs of one material outside the free-space run, and that run itself
  const runList: number[] = [];
  const runAt = new Int32Array(nx + 1);
  for (let i = 0; i < nx; i++) {
    runAt[i] = runList.length;
    const cx = colEx[i];
    const cz = colEz[i];
    const sameAsBelow = (k: number): boolean =>
      Object.is(caEx[cx + k], caEx[cx + k - 1]) &&
      Object.is(cbEx[cx + k], cbEx[cx + k - 1]) &&
      Object.is(caEz[cz + k], caEz[cz + k - 1]) &&
      Object.is(cbEz[cz + k], cbEz[cz + k - 1]) &&
      Object.is(chz[k], chz[k - 1]);
    const cut = (k0: number, k1: number): void => {
      let start = k0;
      for (let k = k0 + 1; k <= k1; k++) {
        if (k === k1 || !sameAsBelow(k)) {
          if (k > start) runList.push(start, k, 1);
          start = k;
        }
      }
    };
    cut(2, lo[i]);
    if (hi[i] > lo[i]) runList.push(lo[i], hi[i], graded ? 0 : 1);
    cut(Math.max(2, hi[i]), kTop);
  }
  runAt[nx] = runList.length;
  const runs = Int32Array.from(runList);
  // one store per field, not a literal: see yeeFields
  const plan = {} as { -readonly [K in keyof FreeSpacePlan]: FreeSpacePlan[K] };
  plan.caEx = caEx;
  plan.cbEx = cbEx;
  plan.caEz = caEz;
  plan.cbEz = cbEz;
  plan.chz = chz;
  plan.colEx = colEx;
  plan.colEz = colEz;
  plan.kTop = kTop;
  plan.cbEx0 = cbEx0;
  plan.cbEz0 = cbEz0;
  plan.chz0 = chz0;
  plan.free = free;
  plan.graded = graded;
  plan.topFree = topFree;
  plan.lo = lo;
  plan.hi = hi;
  plan.runs = runs;
  plan.runAt = runAt;
  plans.set(f, plan);
  return plan;
}

/** Yee's H update (Taflove & Hagness 2005, ch. 3) on rows [k0, k1) of column i. */
function hRows(f: YeeFields, i: number, k0: number, k1: number): void {
  const { S, ex, ez, hy, chx, chz } = f;
  const base = i * S;
  for (let k = k0; k < k1; k++) {
    const ik = base + k;
    hy[ik] += chx * (ez[ik + S] - ez[ik]) - chz[k] * (ex[ik + 1] - ex[ik]);
  }
}

/** Yee's lossy-medium E update (Taflove & Hagness 2005, ch. 3) on rows [k0, k1) of column i. */
function eRows(f: YeeFields, i: number, k0: number, k1: number): void {
  const { S, ex, ez, hy, caEx, cbEx, caEz, cbEz, colEx, colEz, rp, rm, axisFactor } = f;
  const base = i * S;
  const oEx = colEx[i] - base;
  const oEz = colEz[i] - base;
  for (let ik = base + Math.max(1, k0); ik < base + k1; ik++) {
    ex[ik] = caEx[ik + oEx] * ex[ik] + cbEx[ik + oEx] * (hy[ik - 1] - hy[ik]);
  }
  if (i === 0) {
    // axis / symmetry column: (1/r)∂(rHy)/∂r → 4Hy/Δr on the axis (axisFactor carries the factor)
    for (let k = k0; k < k1; k++) ez[k] = caEz[colEz[0] + k] * ez[k] + cbEz[colEz[0] + k] * axisFactor * hy[k];
    return;
  }
  const p = rp[i];
  const m = rm[i];
  for (let ik = base + k0; ik < base + k1; ik++) {
    ez[ik] = caEz[ik + oEz] * ez[ik] + cbEz[ik + oEz] * (p * hy[ik] - m * hy[ik - S]);
  }
}

/** Top CPML of column i, H part: ψ ← bψ + a·∂Ex, Hy −= chz·ψ. */
function hCpmlTopColumn(f: YeeFields, p: CpmlState, i: number): void {
  const { S, ex, hy, chz } = f;
  const { kz0, pz, bHz, aHz, psiHz } = p;
  const base = i * S + kz0;
  const pbase = i * pz;
  for (let j = 0; j < pz; j++) {
    const ik = base + j;
    const psi = bHz[j] * psiHz[pbase + j] + aHz[j] * (ex[ik + 1] - ex[ik]);
    psiHz[pbase + j] = psi;
    hy[ik] -= chz[kz0 + j] * psi;
  }
}

/** Top CPML of column i, E part: ψ ← bψ + a·∂Hy, Ex += cbEx·ψ (the ground row k = 0 excluded). */
function eCpmlTopColumn(f: YeeFields, p: CpmlState, i: number): void {
  const { S, ex, hy, cbEx, colEx } = f;
  const { kz0, pz, bEx, aEx, psiEx } = p;
  const base = i * S + kz0;
  const oEx = colEx[i] - i * S;
  const pbase = i * pz;
  for (let j = kz0 < 1 ? 1 - kz0 : 0; j < pz; j++) {
    const ik = base + j;
    const psi = bEx[j] * psiEx[pbase + j] + aEx[j] * (hy[ik - 1] - hy[ik]);
    psiEx[pbase + j] = psi;
    ex[ik] += cbEx[ik + oEx] * psi;
  }
}

/**
 * H, then Ex and Ez, of rows [k0, k1) of column i ≥ 1 in one pass (k0 ≥ 2: the rows below are final), with the
 * coefficient arrays: Yee's updates (Taflove & Hagness 2005, ch. 3) cell by cell, each written as in
 * updateH and updateE. Row k's Ex needs the new Hy of rows k−1 and k, and row k's Hy the old Ex of rows k and k+1,
 * so one pass upwards meets both. Four rows per pass share the typed arrays' checks (see the header); x0 carries
 * the old Ex of the pass's first row, hBelow the new Hy of the row under it.
 */
function fusedRows(f: YeeFields, i: number, k0: number, k1: number): void {
  const { S, ex, ez, hy, chx, chz, caEx, cbEx, caEz, cbEz } = f;
  const base = i * S;
  const oEx = f.colEx[i] - base; // coefficient index = field index + offset
  const oEz = f.colEz[i] - base;
  const p = f.rp[i];
  const m = f.rm[i];
  let x0 = ex[base + k0];
  let hBelow = hy[base + k0 - 1];
  let ik = base + k0;
  const end = base + k1;
  for (; ik + 3 < end; ik += 4) {
    // old E of the four rows (and Ex of the row above them), Hy of the previous column
    const x1 = ex[ik + 1], x2 = ex[ik + 2], x3 = ex[ik + 3], x4 = ex[ik + 4];
    const z0 = ez[ik + 0], z1 = ez[ik + 1], z2 = ez[ik + 2], z3 = ez[ik + 3];
    const u0 = ez[ik + S + 0], u1 = ez[ik + S + 1], u2 = ez[ik + S + 2], u3 = ez[ik + S + 3];
    const w0 = hy[ik - S + 0], w1 = hy[ik - S + 1], w2 = hy[ik - S + 2], w3 = hy[ik - S + 3];
    // Hy^{n+½} = Hy^{n−½} + chx·(Ez(i+1) − Ez(i)) − chz·(Ex(k+1) − Ex(k))
    const h0 = hy[ik + 0] + (chx * (u0 - z0) - chz[ik - base] * (x1 - x0));
    const h1 = hy[ik + 1] + (chx * (u1 - z1) - chz[ik - base + 1] * (x2 - x1));
    const h2 = hy[ik + 2] + (chx * (u2 - z2) - chz[ik - base + 2] * (x3 - x2));
    const h3 = hy[ik + 3] + (chx * (u3 - z3) - chz[ik - base + 3] * (x4 - x3));
    hy[ik + 0] = h0;
    hy[ik + 1] = h1;
    hy[ik + 2] = h2;
    hy[ik + 3] = h3;
    // Ex^{n+1} = ca·Ex^n + cb·(Hy(k−1) − Hy(k)); Ez^{n+1} = ca·Ez^n + cb·(r₊·Hy(i) − r₋·Hy(i−1))
    ex[ik] = caEx[ik + oEx] * x0 + cbEx[ik + oEx] * (hBelow - h0);
    ex[ik + 1] = caEx[ik + oEx + 1] * x1 + cbEx[ik + oEx + 1] * (h0 - h1);
    ex[ik + 2] = caEx[ik + oEx + 2] * x2 + cbEx[ik + oEx + 2] * (h1 - h2);
    ex[ik + 3] = caEx[ik + oEx + 3] * x3 + cbEx[ik + oEx + 3] * (h2 - h3);
    ez[ik] = caEz[ik + oEz] * z0 + cbEz[ik + oEz] * (p * h0 - m * w0);
    ez[ik + 1] = caEz[ik + oEz + 1] * z1 + cbEz[ik + oEz + 1] * (p * h1 - m * w1);
    ez[ik + 2] = caEz[ik + oEz + 2] * z2 + cbEz[ik + oEz + 2] * (p * h2 - m * w2);
    ez[ik + 3] = caEz[ik + oEz + 3] * z3 + cbEz[ik + oEz + 3] * (p * h3 - m * w3);
    x0 = x4;
    hBelow = h3;
  }
  for (; ik < end; ik++) {
    const exAbove = ex[ik + 1];
    const ezHere = ez[ik];
    const h = hy[ik] + (chx * (ez[ik + S] - ezHere) - chz[ik - base] * (exAbove - x0));
    hy[ik] = h;
    ex[ik] = caEx[ik + oEx] * x0 + cbEx[ik + oEx] * (hBelow - h);
    ez[ik] = caEz[ik + oEz] * ezHere + cbEz[ik + oEz] * (p * h - m * hy[ik - S]);
    x0 = exAbove;
    hBelow = h;
  }
}

/**
 * fusedRows in free space: ca = 1, cb = free[0] (Ex) / free[1] (Ez), Δt/(μ0Δz) = free[2] on every row, so the
 * coefficients are constants of the loop and no coefficient array is read (1·x = x exactly: the same numbers).
 */
function fusedFreeRows(f: YeeFields, i: number, k0: number, k1: number, free: Float64Array): void {
  const { S, ex, ez, hy, chx } = f;
  const cbEx0 = free[0], cbEz0 = free[1], chz0 = free[2];
  const base = i * S;
  const p = f.rp[i];
  const m = f.rm[i];
  let x0 = ex[base + k0];
  let hBelow = hy[base + k0 - 1];
  let ik = base + k0;
  const end = base + k1;
  for (; ik + 3 < end; ik += 4) {
    // old E of the four rows (and Ex of the row above them), Hy of the previous column
    const x1 = ex[ik + 1], x2 = ex[ik + 2], x3 = ex[ik + 3], x4 = ex[ik + 4];
    const z0 = ez[ik + 0], z1 = ez[ik + 1], z2 = ez[ik + 2], z3 = ez[ik + 3];
    const u0 = ez[ik + S + 0], u1 = ez[ik + S + 1], u2 = ez[ik + S + 2], u3 = ez[ik + S + 3];
    const w0 = hy[ik - S + 0], w1 = hy[ik - S + 1], w2 = hy[ik - S + 2], w3 = hy[ik - S + 3];
    // Hy^{n+½} = Hy^{n−½} + chx·(Ez(i+1) − Ez(i)) − chz·(Ex(k+1) − Ex(k))
    const h0 = hy[ik + 0] + (chx * (u0 - z0) - chz0 * (x1 - x0));
    const h1 = hy[ik + 1] + (chx * (u1 - z1) - chz0 * (x2 - x1));
    const h2 = hy[ik + 2] + (chx * (u2 - z2) - chz0 * (x3 - x2));
    const h3 = hy[ik + 3] + (chx * (u3 - z3) - chz0 * (x4 - x3));
    hy[ik + 0] = h0;
    hy[ik + 1] = h1;
    hy[ik + 2] = h2;
    hy[ik + 3] = h3;
    // Ex^{n+1} = ca·Ex^n + cb·(Hy(k−1) − Hy(k)); Ez^{n+1} = ca·Ez^n + cb·(r₊·Hy(i) − r₋·Hy(i−1))
    ex[ik] = x0 + cbEx0 * (hBelow - h0);
    ex[ik + 1] = x1 + cbEx0 * (h0 - h1);
    ex[ik + 2] = x2 + cbEx0 * (h1 - h2);
    ex[ik + 3] = x3 + cbEx0 * (h2 - h3);
    ez[ik] = z0 + cbEz0 * (p * h0 - m * w0);
    ez[ik + 1] = z1 + cbEz0 * (p * h1 - m * w1);
    ez[ik + 2] = z2 + cbEz0 * (p * h2 - m * w2);
    ez[ik + 3] = z3 + cbEz0 * (p * h3 - m * w3);
    x0 = x4;
    hBelow = h3;
  }
  for (; ik < end; ik++) {
    const exAbove = ex[ik + 1];
    const ezHere = ez[ik];
    const h = hy[ik] + (chx * (ez[ik + S] - ezHere) - chz0 * (exAbove - x0));
    hy[ik] = h;
    ex[ik] = x0 + cbEx0 * (hBelow - h);
    ez[ik] = ezHere + cbEz0 * (p * h - m * hy[ik - S]);
    x0 = exAbove;
    hBelow = h;
  }
}

// Two columns at a time. Column i+1's H reads Ez of column i+1, which column i's H reads too, and column i+1's Ez
// reads the new Hy of column i, which column i has just computed; going up both columns in one pass, row by row,
// each of those values is loaded once instead of twice, and two rows per pass share V8's per-pass typed-array checks
// (`npm run bench`: the free-space loop ×1.2–1.35 against one column four rows at a time). Indices are written
// `(a + b) | 0`: the sum wraps instead of being checked for overflow, and every index is in range in any case.

/**
 * Yee's H, Ex and Ez updates (Taflove & Hagness 2005, ch. 3) of rows [k0, k1) of columns i and i+1 ≥ 1 in one pass
 * (k0 ≥ 2), with the coefficient arrays; each cell's expression is fusedRows' (updateH's and updateE's).
 * Per column: x carries the old Ex of the row, h the new Hy of the row below it.
 */
function fusedPairRows(f: YeeFields, i: number, k0: number, k1: number): void {
  const { S, ex, ez, hy, chx, chz, caEx, cbEx, caEz, cbEz } = f;
  const a = i * S; // column i; column i+1 starts at a + S
  const oxa = (f.colEx[i] - a) | 0; // coefficient index = field index + offset
  const oxb = (f.colEx[i + 1] - a - S) | 0;
  const oza = (f.colEz[i] - a) | 0;
  const ozb = (f.colEz[i + 1] - a - S) | 0;
  const pa = f.rp[i], ma = f.rm[i], pb = f.rp[i + 1], mb = f.rm[i + 1];
  let xa = ex[a + k0], xb = ex[a + S + k0];
  let ha = hy[a + k0 - 1], hb = hy[a + S + k0 - 1];
  let ik = (a + k0) | 0;
  const end = (a + k1) | 0;
  for (; ik + 1 < end; ik = (ik + 2) | 0) {
    const jk = (ik + S) | 0; // the same row of column i+1
    const k = (ik - a) | 0;
    // old E: Ex of rows k+1, k+2 (both columns), Ez of rows k, k+1 in columns i, i+1, i+2
    const xa1 = ex[(ik + 1) | 0], xa2 = ex[(ik + 2) | 0], xb1 = ex[(jk + 1) | 0], xb2 = ex[(jk + 2) | 0];
    const za0 = ez[ik], za1 = ez[(ik + 1) | 0], zb0 = ez[jk], zb1 = ez[(jk + 1) | 0];
    const zc0 = ez[(jk + S) | 0], zc1 = ez[(jk + S + 1) | 0];
    const c0 = chz[k], c1 = chz[(k + 1) | 0];
    // Hy^{n+½} = Hy^{n−½} + chx·(Ez(i+1) − Ez(i)) − chz·(Ex(k+1) − Ex(k))
    const ha0 = hy[ik] + (chx * (zb0 - za0) - c0 * (xa1 - xa));
    const ha1 = hy[(ik + 1) | 0] + (chx * (zb1 - za1) - c1 * (xa2 - xa1));
    const hb0 = hy[jk] + (chx * (zc0 - zb0) - c0 * (xb1 - xb));
    const hb1 = hy[(jk + 1) | 0] + (chx * (zc1 - zb1) - c1 * (xb2 - xb1));
    hy[ik] = ha0;
    hy[(ik + 1) | 0] = ha1;
    hy[jk] = hb0;
    hy[(jk + 1) | 0] = hb1;
    // Ex^{n+1} = ca·Ex^n + cb·(Hy(k−1) − Hy(k))
    const qa = (ik + oxa) | 0, qb = (jk + oxb) | 0;
    ex[ik] = caEx[qa] * xa + cbEx[qa] * (ha - ha0);
    ex[(ik + 1) | 0] = caEx[(qa + 1) | 0] * xa1 + cbEx[(qa + 1) | 0] * (ha0 - ha1);
    ex[jk] = caEx[qb] * xb + cbEx[qb] * (hb - hb0);
    ex[(jk + 1) | 0] = caEx[(qb + 1) | 0] * xb1 + cbEx[(qb + 1) | 0] * (hb0 - hb1);
    // Ez^{n+1} = ca·Ez^n + cb·(r₊·Hy(i) − r₋·Hy(i−1)); Hy(i−1) of column i+1 is column i's new Hy
    const sa = (ik + oza) | 0, sb = (jk + ozb) | 0;
    ez[ik] = caEz[sa] * za0 + cbEz[sa] * (pa * ha0 - ma * hy[(ik - S) | 0]);
    ez[(ik + 1) | 0] = caEz[(sa + 1) | 0] * za1 + cbEz[(sa + 1) | 0] * (pa * ha1 - ma * hy[(ik - S + 1) | 0]);
    ez[jk] = caEz[sb] * zb0 + cbEz[sb] * (pb * hb0 - mb * ha0);
    ez[(jk + 1) | 0] = caEz[(sb + 1) | 0] * zb1 + cbEz[(sb + 1) | 0] * (pb * hb1 - mb * ha1);
    xa = xa2;
    xb = xb2;
    ha = ha1;
    hb = hb1;
  }
  if (ik < end) {
    // the last row when the count is odd: the same updates, one row
    const jk = (ik + S) | 0;
    const xa1 = ex[(ik + 1) | 0], xb1 = ex[(jk + 1) | 0];
    const za0 = ez[ik], zb0 = ez[jk], zc0 = ez[(jk + S) | 0];
    const c0 = chz[(ik - a) | 0];
    const ha0 = hy[ik] + (chx * (zb0 - za0) - c0 * (xa1 - xa));
    const hb0 = hy[jk] + (chx * (zc0 - zb0) - c0 * (xb1 - xb));
    hy[ik] = ha0;
    hy[jk] = hb0;
    const qa = (ik + oxa) | 0, qb = (jk + oxb) | 0;
    ex[ik] = caEx[qa] * xa + cbEx[qa] * (ha - ha0);
    ex[jk] = caEx[qb] * xb + cbEx[qb] * (hb - hb0);
    const sa = (ik + oza) | 0, sb = (jk + ozb) | 0;
    ez[ik] = caEz[sa] * za0 + cbEz[sa] * (pa * ha0 - ma * hy[(ik - S) | 0]);
    ez[jk] = caEz[sb] * zb0 + cbEz[sb] * (pb * hb0 - mb * ha0);
  }
}

/**
 * fusedPairRows on rows [k0, k1) where each column's coefficients are the same on every row (a run of one
 * material, FreeSpacePlan.runs): each column's ca, cb and the rows' chz are read once, before the loop, so the
 * loop reads no coefficient array (lossy cells in a loop of their own; the same numbers as with the arrays).
 */
function fusedPairUniformRows(f: YeeFields, i: number, k0: number, k1: number): void {
  const { S, ex, ez, hy, chx, chz, caEx, cbEx, caEz, cbEz } = f;
  const a = i * S; // column i; column i+1 starts at a + S
  // the run's coefficients, one set a column (read once: inside the loop they are constants)
  const xA = f.colEx[i] + k0, xB = f.colEx[i + 1] + k0, zA = f.colEz[i] + k0, zB = f.colEz[i + 1] + k0;
  const caXa = caEx[xA], cbXa = cbEx[xA], caXb = caEx[xB], cbXb = cbEx[xB];
  const caZa = caEz[zA], cbZa = cbEz[zA], caZb = caEz[zB], cbZb = cbEz[zB];
  const c = chz[k0];
  const pa = f.rp[i], ma = f.rm[i], pb = f.rp[i + 1], mb = f.rm[i + 1];
  let xa = ex[a + k0], xb = ex[a + S + k0];
  let ha = hy[a + k0 - 1], hb = hy[a + S + k0 - 1];
  let ik = (a + k0) | 0;
  const end = (a + k1) | 0;
  for (; ik + 1 < end; ik = (ik + 2) | 0) {
    const jk = (ik + S) | 0; // the same row of column i+1
    // old E: Ex of rows k+1, k+2 (both columns), Ez of rows k, k+1 in columns i, i+1, i+2
    const xa1 = ex[(ik + 1) | 0], xa2 = ex[(ik + 2) | 0], xb1 = ex[(jk + 1) | 0], xb2 = ex[(jk + 2) | 0];
    const za0 = ez[ik], za1 = ez[(ik + 1) | 0], zb0 = ez[jk], zb1 = ez[(jk + 1) | 0];
    const zc0 = ez[(jk + S) | 0], zc1 = ez[(jk + S + 1) | 0];
    // Hy^{n+½} = Hy^{n−½} + chx·(Ez(i+1) − Ez(i)) − chz·(Ex(k+1) − Ex(k))
    const ha0 = hy[ik] + (chx * (zb0 - za0) - c * (xa1 - xa));
    const ha1 = hy[(ik + 1) | 0] + (chx * (zb1 - za1) - c * (xa2 - xa1));
    const hb0 = hy[jk] + (chx * (zc0 - zb0) - c * (xb1 - xb));
    const hb1 = hy[(jk + 1) | 0] + (chx * (zc1 - zb1) - c * (xb2 - xb1));
    hy[ik] = ha0;
    hy[(ik + 1) | 0] = ha1;
    hy[jk] = hb0;
    hy[(jk + 1) | 0] = hb1;
    // Ex^{n+1} = ca·Ex^n + cb·(Hy(k−1) − Hy(k))
    ex[ik] = caXa * xa + cbXa * (ha - ha0);
    ex[(ik + 1) | 0] = caXa * xa1 + cbXa * (ha0 - ha1);
    ex[jk] = caXb * xb + cbXb * (hb - hb0);
    ex[(jk + 1) | 0] = caXb * xb1 + cbXb * (hb0 - hb1);
    // Ez^{n+1} = ca·Ez^n + cb·(r₊·Hy(i) − r₋·Hy(i−1)); Hy(i−1) of column i+1 is column i's new Hy
    ez[ik] = caZa * za0 + cbZa * (pa * ha0 - ma * hy[(ik - S) | 0]);
    ez[(ik + 1) | 0] = caZa * za1 + cbZa * (pa * ha1 - ma * hy[(ik - S + 1) | 0]);
    ez[jk] = caZb * zb0 + cbZb * (pb * hb0 - mb * ha0);
    ez[(jk + 1) | 0] = caZb * zb1 + cbZb * (pb * hb1 - mb * ha1);
    xa = xa2;
    xb = xb2;
    ha = ha1;
    hb = hb1;
  }
  if (ik < end) {
    // the last row when the count is odd: the same updates, one row
    const jk = (ik + S) | 0;
    const xa1 = ex[(ik + 1) | 0], xb1 = ex[(jk + 1) | 0];
    const za0 = ez[ik], zb0 = ez[jk], zc0 = ez[(jk + S) | 0];
    const ha0 = hy[ik] + (chx * (zb0 - za0) - c * (xa1 - xa));
    const hb0 = hy[jk] + (chx * (zc0 - zb0) - c * (xb1 - xb));
    hy[ik] = ha0;
    hy[jk] = hb0;
    ex[ik] = caXa * xa + cbXa * (ha - ha0);
    ex[jk] = caXb * xb + cbXb * (hb - hb0);
    ez[ik] = caZa * za0 + cbZa * (pa * ha0 - ma * hy[(ik - S) | 0]);
    ez[jk] = caZb * zb0 + cbZb * (pb * hb0 - mb * ha0);
  }
}

/**
 * fusedPairRows in free space: ca = 1, cb and Δt/(μ0Δz) the constants free[0] (Ex), free[1] (Ez), free[2] (chz)
 * on every row, so no coefficient array is read (1·x = x exactly: the same numbers as with the arrays).
 */
function fusedPairFreeRows(f: YeeFields, i: number, k0: number, k1: number, free: Float64Array): void {
  const { S, ex, ez, hy, chx } = f;
  const cx = free[0], cz = free[1], ch = free[2];
  const a = i * S;
  const pa = f.rp[i], ma = f.rm[i], pb = f.rp[i + 1], mb = f.rm[i + 1];
  let xa = ex[a + k0], xb = ex[a + S + k0];
  let ha = hy[a + k0 - 1], hb = hy[a + S + k0 - 1];
  let ik = (a + k0) | 0;
  const end = (a + k1) | 0;
  for (; ik + 1 < end; ik = (ik + 2) | 0) {
    const jk = (ik + S) | 0;
    const xa1 = ex[(ik + 1) | 0], xa2 = ex[(ik + 2) | 0], xb1 = ex[(jk + 1) | 0], xb2 = ex[(jk + 2) | 0];
    const za0 = ez[ik], za1 = ez[(ik + 1) | 0], zb0 = ez[jk], zb1 = ez[(jk + 1) | 0];
    const zc0 = ez[(jk + S) | 0], zc1 = ez[(jk + S + 1) | 0];
    // Hy^{n+½} = Hy^{n−½} + chx·(Ez(i+1) − Ez(i)) − chz·(Ex(k+1) − Ex(k))
    const ha0 = hy[ik] + (chx * (zb0 - za0) - ch * (xa1 - xa));
    const ha1 = hy[(ik + 1) | 0] + (chx * (zb1 - za1) - ch * (xa2 - xa1));
    const hb0 = hy[jk] + (chx * (zc0 - zb0) - ch * (xb1 - xb));
    const hb1 = hy[(jk + 1) | 0] + (chx * (zc1 - zb1) - ch * (xb2 - xb1));
    hy[ik] = ha0;
    hy[(ik + 1) | 0] = ha1;
    hy[jk] = hb0;
    hy[(jk + 1) | 0] = hb1;
    // Ex^{n+1} = Ex^n + cb·(Hy(k−1) − Hy(k)); Ez^{n+1} = Ez^n + cb·(r₊·Hy(i) − r₋·Hy(i−1))
    ex[ik] = xa + cx * (ha - ha0);
    ex[(ik + 1) | 0] = xa1 + cx * (ha0 - ha1);
    ex[jk] = xb + cx * (hb - hb0);
    ex[(jk + 1) | 0] = xb1 + cx * (hb0 - hb1);
    ez[ik] = za0 + cz * (pa * ha0 - ma * hy[(ik - S) | 0]);
    ez[(ik + 1) | 0] = za1 + cz * (pa * ha1 - ma * hy[(ik - S + 1) | 0]);
    ez[jk] = zb0 + cz * (pb * hb0 - mb * ha0);
    ez[(jk + 1) | 0] = zb1 + cz * (pb * hb1 - mb * ha1);
    xa = xa2;
    xb = xb2;
    ha = ha1;
    hb = hb1;
  }
  if (ik < end) {
    const jk = (ik + S) | 0;
    const xa1 = ex[(ik + 1) | 0], xb1 = ex[(jk + 1) | 0];
    const za0 = ez[ik], zb0 = ez[jk], zc0 = ez[(jk + S) | 0];
    const ha0 = hy[ik] + (chx * (zb0 - za0) - ch * (xa1 - xa));
    const hb0 = hy[jk] + (chx * (zc0 - zb0) - ch * (xb1 - xb));
    hy[ik] = ha0;
    hy[jk] = hb0;
    ex[ik] = xa + cx * (ha - ha0);
    ex[jk] = xb + cx * (hb - hb0);
    ez[ik] = za0 + cz * (pa * ha0 - ma * hy[(ik - S) | 0]);
    ez[jk] = zb0 + cz * (pb * hb0 - mb * ha0);
  }
}

/**
 * fusedPairFreeRows where Ez's cb varies by row (FreeSpacePlan.graded): ca = 1 and the constants free[0] (cb of Ex)
 * and free[2] (chz), Ez's cb from the coefficient arrays (1·x = x exactly: the same numbers as fusedPairRows).
 */
function fusedPairGradedRows(f: YeeFields, i: number, k0: number, k1: number, free: Float64Array): void {
  const { S, ex, ez, hy, chx } = f;
  const cx = free[0], ch = free[2];
  const { cbEz } = f;
  const a = i * S;
  const oza = (f.colEz[i] - a) | 0; // coefficient index = field index + offset
  const ozb = (f.colEz[i + 1] - a - S) | 0;
  const pa = f.rp[i], ma = f.rm[i], pb = f.rp[i + 1], mb = f.rm[i + 1];
  let xa = ex[a + k0], xb = ex[a + S + k0];
  let ha = hy[a + k0 - 1], hb = hy[a + S + k0 - 1];
  let ik = (a + k0) | 0;
  const end = (a + k1) | 0;
  for (; ik + 1 < end; ik = (ik + 2) | 0) {
    const jk = (ik + S) | 0;
    const xa1 = ex[(ik + 1) | 0], xa2 = ex[(ik + 2) | 0], xb1 = ex[(jk + 1) | 0], xb2 = ex[(jk + 2) | 0];
    const za0 = ez[ik], za1 = ez[(ik + 1) | 0], zb0 = ez[jk], zb1 = ez[(jk + 1) | 0];
    const zc0 = ez[(jk + S) | 0], zc1 = ez[(jk + S + 1) | 0];
    // Hy^{n+½} = Hy^{n−½} + chx·(Ez(i+1) − Ez(i)) − chz·(Ex(k+1) − Ex(k))
    const ha0 = hy[ik] + (chx * (zb0 - za0) - ch * (xa1 - xa));
    const ha1 = hy[(ik + 1) | 0] + (chx * (zb1 - za1) - ch * (xa2 - xa1));
    const hb0 = hy[jk] + (chx * (zc0 - zb0) - ch * (xb1 - xb));
    const hb1 = hy[(jk + 1) | 0] + (chx * (zc1 - zb1) - ch * (xb2 - xb1));
    hy[ik] = ha0;
    hy[(ik + 1) | 0] = ha1;
    hy[jk] = hb0;
    hy[(jk + 1) | 0] = hb1;
    // Ex^{n+1} = Ex^n + cb·(Hy(k−1) − Hy(k)); Ez^{n+1} = Ez^n + cb·(r₊·Hy(i) − r₋·Hy(i−1))
    ex[ik] = xa + cx * (ha - ha0);
    ex[(ik + 1) | 0] = xa1 + cx * (ha0 - ha1);
    ex[jk] = xb + cx * (hb - hb0);
    ex[(jk + 1) | 0] = xb1 + cx * (hb0 - hb1);
    const sa = (ik + oza) | 0, sb = (jk + ozb) | 0;
    ez[ik] = za0 + cbEz[sa] * (pa * ha0 - ma * hy[(ik - S) | 0]);
    ez[(ik + 1) | 0] = za1 + cbEz[(sa + 1) | 0] * (pa * ha1 - ma * hy[(ik - S + 1) | 0]);
    ez[jk] = zb0 + cbEz[sb] * (pb * hb0 - mb * ha0);
    ez[(jk + 1) | 0] = zb1 + cbEz[(sb + 1) | 0] * (pb * hb1 - mb * ha1);
    xa = xa2;
    xb = xb2;
    ha = ha1;
    hb = hb1;
  }
  if (ik < end) {
    const jk = (ik + S) | 0;
    const xa1 = ex[(ik + 1) | 0], xb1 = ex[(jk + 1) | 0];
    const za0 = ez[ik], zb0 = ez[jk], zc0 = ez[(jk + S) | 0];
    const ha0 = hy[ik] + (chx * (zb0 - za0) - ch * (xa1 - xa));
    const hb0 = hy[jk] + (chx * (zc0 - zb0) - ch * (xb1 - xb));
    hy[ik] = ha0;
    hy[jk] = hb0;
    ex[ik] = xa + cx * (ha - ha0);
    ex[jk] = xb + cx * (hb - hb0);
    ez[ik] = za0 + cbEz[(ik + oza) | 0] * (pa * ha0 - ma * hy[(ik - S) | 0]);
    ez[jk] = zb0 + cbEz[(jk + ozb) | 0] * (pb * hb0 - mb * ha0);
  }
}

/**
 * Rows [kz0, nz) of column i ≥ 1 left of the far-side layer, inside the top layer, in one pass a row: H and its
 * CPML term, then Ex with its CPML term and Ez, each as updateH, updateHCpml, updateE and updateECpml write them, in
 * the same order of operations (Roden & Gedney 2000 for ψ ← bψ + a·Δ).
 */
function topLayerColumn(f: YeeFields, p: CpmlState, i: number): void {
  const { nz, S, ex, ez, hy, chx, chz, caEx, cbEx, caEz, cbEz } = f;
  const { kz0, pz, bHz, aHz, bEx, aEx, psiHz, psiEx } = p;
  const base = i * S;
  const oEx = f.colEx[i] - base;
  const oEz = f.colEz[i] - base;
  const rp = f.rp[i];
  const rm = f.rm[i];
  const pbase = i * pz - kz0; // ψ index = row + pbase
  let x0 = ex[base + kz0];
  let hBelow = hy[base + kz0 - 1];
  for (let k = kz0; k < nz; k++) {
    const ik = base + k;
    const j = k - kz0;
    const x1 = ex[ik + 1];
    const ezHere = ez[ik];
    const dEx = x1 - x0;
    // Hy += chx·ΔEz − chz·ΔEx, then ψ ← bψ + a·ΔEx, Hy −= chz·ψ
    let h = hy[ik] + (chx * (ez[ik + S] - ezHere) - chz[k] * dEx);
    const psiH = bHz[j] * psiHz[pbase + k] + aHz[j] * dEx;
    psiHz[pbase + k] = psiH;
    h -= chz[k] * psiH;
    hy[ik] = h;
    // Ex = ca·Ex + cb·ΔHy, then ψ ← bψ + a·ΔHy, Ex += cb·ψ; Ez = ca·Ez + cb·(r₊Hy − r₋Hy(i−1))
    const dH = hBelow - h;
    const cb = cbEx[ik + oEx];
    let e = caEx[ik + oEx] * x0 + cb * dH;
    const psiE = bEx[j] * psiEx[pbase + k] + aEx[j] * dH;
    psiEx[pbase + k] = psiE;
    e += cb * psiE;
    ex[ik] = e;
    ez[ik] = caEz[ik + oEz] * ezHere + cbEz[ik + oEz] * (rp * h - rm * hy[ik - S]);
    x0 = x1;
    hBelow = h;
  }
}

/**
 * topLayerColumn for columns i and i+1 in one pass a row (as fusedPairRows does below the layer): column i+1's Ez
 * takes column i's new Hy, and both columns share the layer's coefficients of the row.
 */
function topLayerPair(f: YeeFields, p: CpmlState, i: number): void {
  const { nz, S, ex, ez, hy, chx, chz, caEx, cbEx, caEz, cbEz } = f;
  const { kz0, pz, bHz, aHz, bEx, aEx, psiHz, psiEx } = p;
  const a = i * S;
  const oxa = (f.colEx[i] - a) | 0;
  const oxb = (f.colEx[i + 1] - a - S) | 0;
  const oza = (f.colEz[i] - a) | 0;
  const ozb = (f.colEz[i + 1] - a - S) | 0;
  const pa = f.rp[i], ma = f.rm[i], pb = f.rp[i + 1], mb = f.rm[i + 1];
  const ta = (i * pz - kz0) | 0; // ψ index = row + ta (column i), row + ta + pz (column i+1)
  const tb = (ta + pz) | 0;
  let xa = ex[a + kz0], xb = ex[a + S + kz0];
  let ha = hy[a + kz0 - 1], hb = hy[a + S + kz0 - 1];
  for (let k = kz0; k < nz; k++) {
    const ik = (a + k) | 0;
    const jk = (ik + S) | 0;
    const j = (k - kz0) | 0;
    const c = chz[k], bh = bHz[j], ah = aHz[j], be = bEx[j], ae = aEx[j];
    const xa1 = ex[(ik + 1) | 0], xb1 = ex[(jk + 1) | 0];
    const za = ez[ik], zb = ez[jk], zc = ez[(jk + S) | 0];
    const dxa = xa1 - xa, dxb = xb1 - xb;
    // Hy += chx·ΔEz − chz·ΔEx, then ψ ← bψ + a·ΔEx, Hy −= chz·ψ
    let h0 = hy[ik] + (chx * (zb - za) - c * dxa);
    let h1 = hy[jk] + (chx * (zc - zb) - c * dxb);
    const qa = (k + ta) | 0, qb = (k + tb) | 0;
    const psa = bh * psiHz[qa] + ah * dxa;
    const psb = bh * psiHz[qb] + ah * dxb;
    psiHz[qa] = psa;
    psiHz[qb] = psb;
    h0 -= c * psa;
    h1 -= c * psb;
    hy[ik] = h0;
    hy[jk] = h1;
    // Ex = ca·Ex + cb·ΔHy, then ψ ← bψ + a·ΔHy, Ex += cb·ψ; Ez = ca·Ez + cb·(r₊Hy − r₋Hy(i−1))
    const dha = ha - h0, dhb = hb - h1;
    const ua = (ik + oxa) | 0, ub = (jk + oxb) | 0;
    const cba = cbEx[ua], cbb = cbEx[ub];
    const ea = caEx[ua] * xa + cba * dha;
    const eb = caEx[ub] * xb + cbb * dhb;
    const pea = be * psiEx[qa] + ae * dha;
    const peb = be * psiEx[qb] + ae * dhb;
    psiEx[qa] = pea;
    psiEx[qb] = peb;
    ex[ik] = ea + cba * pea;
    ex[jk] = eb + cbb * peb;
    const sa = (ik + oza) | 0, sb = (jk + ozb) | 0;
    ez[ik] = caEz[sa] * za + cbEz[sa] * (pa * h0 - ma * hy[(ik - S) | 0]);
    ez[jk] = caEz[sb] * zb + cbEz[sb] * (pb * h1 - mb * h0);
    xa = xa1;
    xb = xb1;
    ha = h0;
    hb = h1;
  }
}

/**
 * topLayerPair where both columns' rows in the layer are lossless with the constants (FreeSpacePlan.topFree):
 * ca = 1, Ex's cb free[0], chz free[2]; Ez's cb from the arrays (1·x = x exactly: the same numbers); the CPML
 * coefficients from one row of `tc` (topCoefficients). Rows k0 (default: the layer's first) … nz−1.
 */
function topLayerPairLossless(f: YeeFields, p: CpmlState, i: number, free: Float64Array, tc: Float64Array, k0 = p.kz0): void {
  const { nz, S, ex, ez, hy, chx, cbEz } = f;
  const cb = free[0], c = free[2];
  const { kz0, pz, psiHz, psiEx } = p;
  const a = i * S;
  const oza = (f.colEz[i] - a) | 0;
  const ozb = (f.colEz[i + 1] - a - S) | 0;
  const pa = f.rp[i], ma = f.rm[i], pb = f.rp[i + 1], mb = f.rm[i + 1];
  const ta = (i * pz - kz0) | 0; // ψ index = row + ta (column i), row + ta + pz (column i+1)
  const tb = (ta + pz) | 0;
  let xa = ex[a + k0], xb = ex[a + S + k0];
  let ha = hy[a + k0 - 1], hb = hy[a + S + k0 - 1];
  for (let k = k0; k < nz; k++) {
    const ik = (a + k) | 0;
    const jk = (ik + S) | 0;
    const j4 = ((k - kz0) << 2) | 0;
    const bh = tc[j4], ah = tc[(j4 + 1) | 0], be = tc[(j4 + 2) | 0], ae = tc[(j4 + 3) | 0];
    const xa1 = ex[(ik + 1) | 0], xb1 = ex[(jk + 1) | 0];
    const za = ez[ik], zb = ez[jk], zc = ez[(jk + S) | 0];
    const dxa = xa1 - xa, dxb = xb1 - xb;
    // Hy += chx·ΔEz − chz·ΔEx, then ψ ← bψ + a·ΔEx, Hy −= chz·ψ
    let h0 = hy[ik] + (chx * (zb - za) - c * dxa);
    let h1 = hy[jk] + (chx * (zc - zb) - c * dxb);
    const qa = (k + ta) | 0, qb = (k + tb) | 0;
    const psa = bh * psiHz[qa] + ah * dxa;
    const psb = bh * psiHz[qb] + ah * dxb;
    psiHz[qa] = psa;
    psiHz[qb] = psb;
    h0 -= c * psa;
    h1 -= c * psb;
    hy[ik] = h0;
    hy[jk] = h1;
    // Ex = ca·Ex + cb·ΔHy, then ψ ← bψ + a·ΔHy, Ex += cb·ψ; Ez = ca·Ez + cb·(r₊Hy − r₋Hy(i−1))
    const dha = ha - h0, dhb = hb - h1;
    const ea = xa + cb * dha;
    const eb = xb + cb * dhb;
    const pea = be * psiEx[qa] + ae * dha;
    const peb = be * psiEx[qb] + ae * dhb;
    psiEx[qa] = pea;
    psiEx[qb] = peb;
    ex[ik] = ea + cb * pea;
    ex[jk] = eb + cb * peb;
    const sa = (ik + oza) | 0, sb = (jk + ozb) | 0;
    ez[ik] = za + cbEz[sa] * (pa * h0 - ma * hy[(ik - S) | 0]);
    ez[jk] = zb + cbEz[sb] * (pb * h1 - mb * h0);
    xa = xa1;
    xb = xb1;
    ha = h0;
    hb = h1;
  }
}

/**
 * The top layer's CPML coefficients of one row next to each other, (bHz, aHz, bEx, aEx) at 4·row: one array read in
 * the loop instead of four (V8 re-checks each typed array on every pass). Kept per CpmlState; its coefficient
 * arrays must not be changed in place, as the kernel's other plans assume of theirs.
 */
interface TopCoefficients {
  readonly bHz: Float64Array;
  readonly aHz: Float64Array;
  readonly bEx: Float64Array;
  readonly aEx: Float64Array;
  readonly tc: Float64Array;
}

const topCoefficientCache = new WeakMap<CpmlState, TopCoefficients>();

/** Called every step: a cache hit allocates nothing (the arrays it was built from compared by identity). */
function topCoefficients(p: CpmlState): Float64Array {
  const old = topCoefficientCache.get(p);
  if (old && old.bHz === p.bHz && old.aHz === p.aHz && old.bEx === p.bEx && old.aEx === p.aEx) return old.tc;
  const tc = new Float64Array(4 * p.pz);
  for (let j = 0; j < p.pz; j++) {
    tc[4 * j] = p.bHz[j];
    tc[4 * j + 1] = p.aHz[j];
    tc[4 * j + 2] = p.bEx[j];
    tc[4 * j + 3] = p.aEx[j];
  }
  // one store per field, not a literal: see yeeFields
  const entry = {} as { -readonly [K in keyof TopCoefficients]: TopCoefficients[K] };
  entry.bHz = p.bHz;
  entry.aHz = p.aHz;
  entry.bEx = p.bEx;
  entry.aEx = p.aEx;
  entry.tc = tc;
  topCoefficientCache.set(p, entry);
  return tc;
}

/**
 * topLayerPairLossless where Ez's cb is free space's too (FreeSpacePlan.topFree 2, a flat grid's open top): every
 * coefficient a constant or one row of `tc` (topCoefficients), the same numbers term for term.
 */
function topLayerPairFree(f: YeeFields, p: CpmlState, i: number, free: Float64Array, tc: Float64Array): void {
  const { nz, S, ex, ez, hy, chx } = f;
  const cb = free[0], cz = free[1], c = free[2];
  const { kz0, pz, psiHz, psiEx } = p;
  const a = i * S;
  const pa = f.rp[i], ma = f.rm[i], pb = f.rp[i + 1], mb = f.rm[i + 1];
  const ta = (i * pz - kz0) | 0; // ψ index = row + ta (column i), row + ta + pz (column i+1)
  const tb = (ta + pz) | 0;
  let xa = ex[a + kz0], xb = ex[a + S + kz0];
  let ha = hy[a + kz0 - 1], hb = hy[a + S + kz0 - 1];
  let k = kz0;
  for (; k + 1 < nz; k += 2) {
    const ik = (a + k) | 0;
    const jk = (ik + S) | 0;
    const j4 = ((k - kz0) << 2) | 0;
    const bh0 = tc[j4], ah0 = tc[(j4 + 1) | 0], be0 = tc[(j4 + 2) | 0], ae0 = tc[(j4 + 3) | 0];
    const bh1 = tc[(j4 + 4) | 0], ah1 = tc[(j4 + 5) | 0], be1 = tc[(j4 + 6) | 0], ae1 = tc[(j4 + 7) | 0];
    const xa1 = ex[(ik + 1) | 0], xb1 = ex[(jk + 1) | 0], xa2 = ex[(ik + 2) | 0], xb2 = ex[(jk + 2) | 0];
    const za0 = ez[ik], zb0 = ez[jk], zc0 = ez[(jk + S) | 0];
    const za1 = ez[(ik + 1) | 0], zb1 = ez[(jk + 1) | 0], zc1 = ez[(jk + S + 1) | 0];
    const dxa0 = xa1 - xa, dxb0 = xb1 - xb, dxa1 = xa2 - xa1, dxb1 = xb2 - xb1;
    // Hy += chx·ΔEz − chz·ΔEx, then ψ ← bψ + a·ΔEx, Hy −= chz·ψ
    let ha0 = hy[ik] + (chx * (zb0 - za0) - c * dxa0);
    let hb0 = hy[jk] + (chx * (zc0 - zb0) - c * dxb0);
    let ha1 = hy[(ik + 1) | 0] + (chx * (zb1 - za1) - c * dxa1);
    let hb1 = hy[(jk + 1) | 0] + (chx * (zc1 - zb1) - c * dxb1);
    const qa = (k + ta) | 0, qb = (k + tb) | 0;
    const psa0 = bh0 * psiHz[qa] + ah0 * dxa0;
    const psb0 = bh0 * psiHz[qb] + ah0 * dxb0;
    const psa1 = bh1 * psiHz[(qa + 1) | 0] + ah1 * dxa1;
    const psb1 = bh1 * psiHz[(qb + 1) | 0] + ah1 * dxb1;
    psiHz[qa] = psa0;
    psiHz[qb] = psb0;
    psiHz[(qa + 1) | 0] = psa1;
    psiHz[(qb + 1) | 0] = psb1;
    ha0 -= c * psa0;
    hb0 -= c * psb0;
    ha1 -= c * psa1;
    hb1 -= c * psb1;
    hy[ik] = ha0;
    hy[jk] = hb0;
    hy[(ik + 1) | 0] = ha1;
    hy[(jk + 1) | 0] = hb1;
    // Ex = Ex + cb·ΔHy, then ψ ← bψ + a·ΔHy, Ex += cb·ψ; Ez = Ez + cb·(r₊Hy − r₋Hy(i−1))
    const dha0 = ha - ha0, dhb0 = hb - hb0, dha1 = ha0 - ha1, dhb1 = hb0 - hb1;
    const pea0 = be0 * psiEx[qa] + ae0 * dha0;
    const peb0 = be0 * psiEx[qb] + ae0 * dhb0;
    const pea1 = be1 * psiEx[(qa + 1) | 0] + ae1 * dha1;
    const peb1 = be1 * psiEx[(qb + 1) | 0] + ae1 * dhb1;
    psiEx[qa] = pea0;
    psiEx[qb] = peb0;
    psiEx[(qa + 1) | 0] = pea1;
    psiEx[(qb + 1) | 0] = peb1;
    ex[ik] = xa + cb * dha0 + cb * pea0;
    ex[jk] = xb + cb * dhb0 + cb * peb0;
    ex[(ik + 1) | 0] = xa1 + cb * dha1 + cb * pea1;
    ex[(jk + 1) | 0] = xb1 + cb * dhb1 + cb * peb1;
    ez[ik] = za0 + cz * (pa * ha0 - ma * hy[(ik - S) | 0]);
    ez[jk] = zb0 + cz * (pb * hb0 - mb * ha0);
    ez[(ik + 1) | 0] = za1 + cz * (pa * ha1 - ma * hy[(ik - S + 1) | 0]);
    ez[(jk + 1) | 0] = zb1 + cz * (pb * hb1 - mb * ha1);
    xa = xa2;
    xb = xb2;
    ha = ha1;
    hb = hb1;
  }
  // an odd row left at the top: the one-row loop (Ez's cb read from the arrays is cbEz0 here, the same numbers)
  if (k < nz) topLayerPairLossless(f, p, i, free, tc, k);
}

/**
 * Column i = ix0 + j of the far-side layer (ix0 ≥ 1), whole: H of every row with the layer's ψ term (and the top
 * layer's above kz0), the ground row, then Ex and Ez of every row with their ψ terms; each cell as the five updates
 * write it, in the same order of operations (Roden & Gedney 2000).
 */
function farLayerColumn(f: YeeFields, p: CpmlState, z: ImpedanceRow | undefined, j: number): void {
  const { nz, S, ex, ez, hy, chx, chz, caEx, cbEx, caEz, cbEz } = f;
  const { kz0, pz, psiHx, psiEz, psiHz, psiEx, bHz, aHz, bEx, aEx } = p;
  const i = p.ix0 + j;
  const base = i * S;
  const pbase = j * S - base; // ψ of the far layer: index = field index + pbase
  const tbase = i * pz - kz0; // ψ of the top layer: index = row + tbase
  const bHj = p.bHx[j], aHj = p.aHx[j], bEj = p.bEz[j], aEj = p.aEz[j];
  const kTop = pz > 0 ? kz0 : nz;
  // H: Hy += chx·ΔEz − chz·ΔEx, then ψx ← bψx + a·ΔEz, Hy += chx·ψx, then (top layer) ψz ← bψz + a·ΔEx, Hy −= chz·ψz
  for (let k = 0; k < nz; k++) {
    const ik = base + k;
    const dEz = ez[ik + S] - ez[ik];
    const dEx = ex[ik + 1] - ex[ik];
    let h = hy[ik] + (chx * dEz - chz[k] * dEx);
    const psi = bHj * psiHx[ik + pbase] + aHj * dEz;
    psiHx[ik + pbase] = psi;
    h += chx * psi;
    if (k >= kTop) {
      const psiZ = bHz[k - kz0] * psiHz[k + tbase] + aHz[k - kz0] * dEx;
      psiHz[k + tbase] = psiZ;
      h -= chz[k] * psiZ;
    }
    hy[ik] = h;
  }
  if (z) surfaceImpedanceColumn(f, z, i);
  const oEx = f.colEx[i] - base;
  const oEz = f.colEz[i] - base;
  // Ex, rows 1…nz−1: Ex = ca·Ex + cb·ΔHy, then (top layer) ψz ← bψz + a·ΔHy, Ex += cb·ψz
  for (let k = 1; k < nz; k++) {
    const ik = base + k;
    const dH = hy[ik - 1] - hy[ik];
    const cb = cbEx[ik + oEx];
    let e = caEx[ik + oEx] * ex[ik] + cb * dH;
    if (k >= kTop) {
      const psiZ = bEx[k - kz0] * psiEx[k + tbase] + aEx[k - kz0] * dH;
      psiEx[k + tbase] = psiZ;
      e += cb * psiZ;
    }
    ex[ik] = e;
  }
  // Ez, rows 0…nz−1: Ez = ca·Ez + cb·(r₊Hy − r₋Hy(i−1)), then ψx ← bψx + a·(Hy − Hy(i−1)), Ez += cb·ψx
  const rp = f.rp[i];
  const rm = f.rm[i];
  for (let k = 0; k < nz; k++) {
    const ik = base + k;
    const h = hy[ik];
    const hm = hy[ik - S];
    const cb = cbEz[ik + oEz];
    const e = caEz[ik + oEz] * ez[ik] + cb * (rp * h - rm * hm);
    const psi = bEj * psiEz[ik + pbase] + aEj * (h - hm);
    psiEz[ik + pbase] = psi;
    ez[ik] = e + cb * psi;
  }
}

/**
 * Columns i = ix0 + j and i + 1 of the far-side layer (ix0 ≥ 1), whole, in one pass up the pair: H of rows 0 and 1
 * with the layer's ψ term, the ground rows, Ex of row 1 and Ez of rows 0 and 1; then row by row H, Ex and Ez (the
 * top layer's ψ terms too in its rows). A row's E reads only H of its own row and the row below, final by then,
 * and a row's H reads only E of its row and the row above, not yet updated; so each cell gets what the five
 * updates in turn give it, in the same order of operations (Roden & Gedney 2000). Every value is read back from
 * its array, as the updates in turn read it (float32 fields stay bit-identical too).
 */
function farLayerPair(f: YeeFields, p: CpmlState, z: ImpedanceRow | undefined, j: number, tc: Float64Array): void {
  const { nz, S, ex, ez, hy, chx, chz, caEx, cbEx, caEz, cbEz } = f;
  const { kz0, pz, psiHx, psiEz, psiHz, psiEx } = p;
  const i = p.ix0 + j;
  const a = i * S;
  const pa = (j * S - a) | 0; // far-layer ψ index = field index + pa (both columns: the ψ rows have stride S too)
  const ta = (i * pz - kz0) | 0; // top-layer ψ index = row + ta (column i), row + ta + pz (column i+1)
  const tb = (ta + pz) | 0;
  const bHa = p.bHx[j], aHa = p.aHx[j], bHb = p.bHx[j + 1], aHb = p.aHx[j + 1];
  const bEa = p.bEz[j], aEa = p.aEz[j], bEb = p.bEz[j + 1], aEb = p.aEz[j + 1];
  const oxa = (f.colEx[i] - a) | 0;
  const oxb = (f.colEx[i + 1] - a - S) | 0;
  const oza = (f.colEz[i] - a) | 0;
  const ozb = (f.colEz[i + 1] - a - S) | 0;
  const rpa = f.rp[i], rma = f.rm[i], rpb = f.rp[i + 1], rmb = f.rm[i + 1];
  const kTop = pz > 0 ? kz0 : nz; // ≥ 2: leapfrogStep sweeps only then
  // H: Hy += chx·ΔEz − chz·ΔEx, then ψx ← bψx + a·ΔEz, Hy += chx·ψx (rows 0 and 1, below any top layer)
  for (let k = 0; k < 2; k++) {
    const ik = (a + k) | 0;
    const jk = (ik + S) | 0;
    const zb = ez[jk];
    const dza = zb - ez[ik];
    const dzb = ez[(jk + S) | 0] - zb;
    const dxa = ex[(ik + 1) | 0] - ex[ik];
    const dxb = ex[(jk + 1) | 0] - ex[jk];
    const c = chz[k];
    let h0 = hy[ik] + (chx * dza - c * dxa);
    let h1 = hy[jk] + (chx * dzb - c * dxb);
    const qa = (ik + pa) | 0, qb = (jk + pa) | 0;
    const psa = bHa * psiHx[qa] + aHa * dza;
    const psb = bHb * psiHx[qb] + aHb * dzb;
    psiHx[qa] = psa;
    psiHx[qb] = psb;
    hy[ik] = h0 + chx * psa;
    hy[jk] = h1 + chx * psb;
  }
  if (z) {
    surfaceImpedanceColumn(f, z, i);
    surfaceImpedanceColumn(f, z, i + 1);
  }
  // Ez of row 0, then Ex and Ez of row 1
  farLayerEz(a, S, oza, ozb, pa, rpa, rma, rpb, rmb, bEa, aEa, bEb, aEb, psiEz, ez, hy, caEz, cbEz);
  {
    const ik = (a + 1) | 0;
    const jk = (ik + S) | 0;
    const ua = (ik + oxa) | 0, ub = (jk + oxb) | 0;
    ex[ik] = caEx[ua] * ex[ik] + cbEx[ua] * (hy[(ik - 1) | 0] - hy[ik]);
    ex[jk] = caEx[ub] * ex[jk] + cbEx[ub] * (hy[(jk - 1) | 0] - hy[jk]);
    farLayerEz(ik, S, oza, ozb, pa, rpa, rma, rpb, rmb, bEa, aEa, bEb, aEb, psiEz, ez, hy, caEz, cbEz);
  }
  // rows 2 … kTop−1: H, then Ex = ca·Ex + cb·ΔHy, then Ez (farLayerEz)
  for (let k = 2; k < kTop; k++) {
    const ik = (a + k) | 0;
    const jk = (ik + S) | 0;
    const zb = ez[jk];
    const dza = zb - ez[ik];
    const dzb = ez[(jk + S) | 0] - zb;
    const xa = ex[ik], xb = ex[jk];
    const dxa = ex[(ik + 1) | 0] - xa;
    const dxb = ex[(jk + 1) | 0] - xb;
    const c = chz[k];
    const h0 = hy[ik] + (chx * dza - c * dxa);
    const h1 = hy[jk] + (chx * dzb - c * dxb);
    const qa = (ik + pa) | 0, qb = (jk + pa) | 0;
    const psa = bHa * psiHx[qa] + aHa * dza;
    const psb = bHb * psiHx[qb] + aHb * dzb;
    psiHx[qa] = psa;
    psiHx[qb] = psb;
    hy[ik] = h0 + chx * psa;
    hy[jk] = h1 + chx * psb;
    const ua = (ik + oxa) | 0, ub = (jk + oxb) | 0;
    ex[ik] = caEx[ua] * xa + cbEx[ua] * (hy[(ik - 1) | 0] - hy[ik]);
    ex[jk] = caEx[ub] * xb + cbEx[ub] * (hy[(jk - 1) | 0] - hy[jk]);
    farLayerEz(ik, S, oza, ozb, pa, rpa, rma, rpb, rmb, bEa, aEa, bEb, aEb, psiEz, ez, hy, caEz, cbEz);
  }
  // rows kTop … nz−1, the corner: H then ψz ← bψz + a·ΔEx, Hy −= chz·ψz; Ex then ψz ← bψz + a·ΔHy, Ex += cb·ψz
  for (let k = kTop; k < nz; k++) {
    const ik = (a + k) | 0;
    const jk = (ik + S) | 0;
    const r4 = ((k - kz0) << 2) | 0;
    const bz = tc[r4], az = tc[(r4 + 1) | 0], be = tc[(r4 + 2) | 0], ae = tc[(r4 + 3) | 0];
    const zb = ez[jk];
    const dza = zb - ez[ik];
    const dzb = ez[(jk + S) | 0] - zb;
    const xa = ex[ik], xb = ex[jk];
    const dxa = ex[(ik + 1) | 0] - xa;
    const dxb = ex[(jk + 1) | 0] - xb;
    const c = chz[k];
    let h0 = hy[ik] + (chx * dza - c * dxa);
    let h1 = hy[jk] + (chx * dzb - c * dxb);
    const qa = (ik + pa) | 0, qb = (jk + pa) | 0;
    const psa = bHa * psiHx[qa] + aHa * dza;
    const psb = bHb * psiHx[qb] + aHb * dzb;
    psiHx[qa] = psa;
    psiHx[qb] = psb;
    h0 += chx * psa;
    h1 += chx * psb;
    const za = (k + ta) | 0, zz = (k + tb) | 0;
    const pza = bz * psiHz[za] + az * dxa;
    const pzb = bz * psiHz[zz] + az * dxb;
    psiHz[za] = pza;
    psiHz[zz] = pzb;
    hy[ik] = h0 - c * pza;
    hy[jk] = h1 - c * pzb;
    const dha = hy[(ik - 1) | 0] - hy[ik];
    const dhb = hy[(jk - 1) | 0] - hy[jk];
    const ua = (ik + oxa) | 0, ub = (jk + oxb) | 0;
    const cba = cbEx[ua], cbb = cbEx[ub];
    const ea = caEx[ua] * xa + cba * dha;
    const eb = caEx[ub] * xb + cbb * dhb;
    const pea = be * psiEx[za] + ae * dha;
    const peb = be * psiEx[zz] + ae * dhb;
    psiEx[za] = pea;
    psiEx[zz] = peb;
    ex[ik] = ea + cba * pea;
    ex[jk] = eb + cbb * peb;
    farLayerEz(ik, S, oza, ozb, pa, rpa, rma, rpb, rmb, bEa, aEa, bEb, aEb, psiEz, ez, hy, caEz, cbEz);
  }
}

/**
 * Ez of one row of a far-layer pair at field index ik (column i) and ik + S: Ez = ca·Ez + cb·(r₊Hy − r₋Hy(i−1)),
 * then ψx ← bψx + a·(Hy − Hy(i−1)), Ez += cb·ψx. Small enough for the compiler to inline into farLayerPair.
 */
function farLayerEz(
  ik: number,
  S: number,
  oza: number,
  ozb: number,
  pa: number,
  rpa: number,
  rma: number,
  rpb: number,
  rmb: number,
  bEa: number,
  aEa: number,
  bEb: number,
  aEb: number,
  psiEz: Float64Array,
  ez: FieldArray,
  hy: FieldArray,
  caEz: Float64Array,
  cbEz: Float64Array,
): void {
  const jk = (ik + S) | 0;
  const hm = hy[(ik - S) | 0], h0 = hy[ik], h1 = hy[jk];
  const sa = (ik + oza) | 0, sb = (jk + ozb) | 0;
  const cba = cbEz[sa], cbb = cbEz[sb];
  const ea = caEz[sa] * ez[ik] + cba * (rpa * h0 - rma * hm);
  const eb = caEz[sb] * ez[jk] + cbb * (rpb * h1 - rmb * h0);
  const qa = (ik + pa) | 0, qb = (jk + pa) | 0;
  const psa = bEa * psiEz[qa] + aEa * (h0 - hm);
  const psb = bEb * psiEz[qb] + aEb * (h1 - h0);
  psiEz[qa] = psa;
  psiEz[qb] = psb;
  ez[ik] = ea + cba * psa;
  ez[jk] = eb + cbb * psb;
}

/**
 * groundRows for columns i and i+1 ≥ 1 together, written out (nz ≥ 2): H of rows 0 and 1 of both columns, their
 * ground rows, then Ex of row 1 and Ez of rows 0 and 1 of both; column i+1's E reads column i's new H, finished
 * first, and column i+1's H reads nothing column i's E writes, so the order is free (see the section comment).
 */
function groundPair(f: YeeFields, z: ImpedanceRow | undefined, i: number): void {
  const { S, ex, ez, hy, chx, chz, caEx, cbEx, caEz, cbEz } = f;
  const a = i * S;
  const b = (a + S) | 0;
  const c0 = chz[0], c1 = chz[1];
  // Hy^{n+½} = Hy^{n−½} + chx·(Ez(i+1) − Ez(i)) − chz·(Ex(k+1) − Ex(k)), rows 0 and 1
  const ea0 = ez[a], ea1 = ez[(a + 1) | 0], eb0 = ez[b], eb1 = ez[(b + 1) | 0];
  const xa0 = ex[a], xa1 = ex[(a + 1) | 0], xa2 = ex[(a + 2) | 0];
  const xb0 = ex[b], xb1 = ex[(b + 1) | 0], xb2 = ex[(b + 2) | 0];
  hy[a] += chx * (eb0 - ea0) - c0 * (xa1 - xa0);
  hy[(a + 1) | 0] += chx * (eb1 - ea1) - c1 * (xa2 - xa1);
  hy[b] += chx * (ez[(b + S) | 0] - eb0) - c0 * (xb1 - xb0);
  hy[(b + 1) | 0] += chx * (ez[(b + S + 1) | 0] - eb1) - c1 * (xb2 - xb1);
  if (z) {
    surfaceImpedanceColumn(f, z, i);
    surfaceImpedanceColumn(f, z, i + 1);
  }
  // Ex^{n+1} of row 1 = ca·Ex^n + cb·(Hy(0) − Hy(1)); Ez^{n+1} of rows 0, 1 = ca·Ez^n + cb·(r₊·Hy(i) − r₋·Hy(i−1))
  const ha0 = hy[a], ha1 = hy[(a + 1) | 0], hb0 = hy[b], hb1 = hy[(b + 1) | 0];
  const ua = (f.colEx[i] + 1) | 0, ub = (f.colEx[i + 1] + 1) | 0;
  ex[(a + 1) | 0] = caEx[ua] * xa1 + cbEx[ua] * (ha0 - ha1);
  ex[(b + 1) | 0] = caEx[ub] * xb1 + cbEx[ub] * (hb0 - hb1);
  const sa = f.colEz[i], sb = f.colEz[i + 1];
  const pa = f.rp[i], ma = f.rm[i], pb = f.rp[i + 1], mb = f.rm[i + 1];
  ez[a] = caEz[sa] * ea0 + cbEz[sa] * (pa * ha0 - ma * hy[(a - S) | 0]);
  ez[(a + 1) | 0] = caEz[(sa + 1) | 0] * ea1 + cbEz[(sa + 1) | 0] * (pa * ha1 - ma * hy[(a - S + 1) | 0]);
  ez[b] = caEz[sb] * eb0 + cbEz[sb] * (pb * hb0 - mb * ha0);
  ez[(b + 1) | 0] = caEz[(sb + 1) | 0] * eb1 + cbEz[(sb + 1) | 0] * (pb * hb1 - mb * ha1);
}

/** Rows 0 and 1 of column i ≥ 1: H, the ground row's Ex (which needs H of both), then E. */
function groundRows(f: YeeFields, z: ImpedanceRow | undefined, i: number, head: number): void {
  hRows(f, i, 0, head);
  if (z) surfaceImpedanceColumn(f, z, i);
  eRows(f, i, 0, head);
}

/**
 * Rows [k0, k1) of columns i and i+1 below the top layer, outside their common free-space rows: where both columns
 * are in a run of one material the uniform loop, elsewhere the coefficient arrays.
 */
function pairRowsByRun(f: YeeFields, i: number, k0: number, k1: number, plan: FreeSpacePlan): void {
  const { runs, runAt } = plan;
  let ra = runAt[i];
  let rb = runAt[i + 1];
  const endA = runAt[i + 1];
  const endB = runAt[i + 2];
  let k = k0;
  while (k < k1) {
    // the runs of both columns that hold row k (the runs of a column tile rows 2 … kTop−1)
    while (ra < endA && runs[ra + 1] <= k) ra += 3;
    while (rb < endB && runs[rb + 1] <= k) rb += 3;
    const e = Math.min(k1, runs[ra + 1], runs[rb + 1]);
    if (runs[ra + 2] === 1 && runs[rb + 2] === 1 && e - k >= 4) fusedPairUniformRows(f, i, k, e);
    else fusedPairRows(f, i, k, e);
    k = e;
  }
}

/**
 * One leapfrog step, E^n → H^{n+½} → E^{n+1}: the same numbers as
 *   updateH(f); if (p) updateHCpml(f, p); if (z) applySurfaceImpedance(f, z); updateE(f); if (p) updateECpml(f, p)
 * The columns go in one sweep (see the section comments above): the axis column; then pairs of columns, each pair's
 * ground rows, its rows below the top layer in one pass (free-space rows with constant coefficients), then each
 * column's rows in the top layer while they are in cache; an odd column left over alone; then the far-side layer's
 * columns one at a time, each whole. The coefficient arrays must not be changed in place between steps.
 */
export function leapfrogStep(f: YeeFields, p?: CpmlState, z?: ImpedanceRow): void {
  const { nx, nz } = f;
  const pz = p ? p.pz : 0;
  const kTop = pz > 0 ? p!.kz0 : nz;
  const ix0 = p && p.px > 0 ? p.ix0 : nx;
  if (kTop < 2 || ix0 < 1) {
    // a top layer down to the ground rows, or a far layer from the axis: nothing to sweep
    updateH(f);
    if (p) updateHCpml(f, p);
    if (z) applySurfaceImpedance(f, z);
    updateE(f);
    if (p) updateECpml(f, p);
    return;
  }
  const plan = freeSpacePlan(f, kTop);
  const { lo, hi, free, graded, topFree } = plan;
  const tc = p ? topCoefficients(p) : undefined;
  const head = Math.min(2, nz);
  // the axis column, rows below the top layer, update after update; then its rows in the top layer
  hRows(f, 0, 0, kTop);
  if (z) surfaceImpedanceColumn(f, z, 0);
  eRows(f, 0, 0, kTop);
  if (pz > 0) {
    updateH(f, 0, 1, kTop);
    hCpmlTopColumn(f, p!, 0);
    updateE(f, 0, 1, kTop);
    eCpmlTopColumn(f, p!, 0);
  }
  let i = 1;
  for (; i + 1 < ix0; i += 2) {
    groundPair(f, z, i);
    // rows 2 … kTop−1 of both columns; constant coefficients where both columns have free space
    const fLo = Math.max(lo[i], lo[i + 1]);
    const fHi = Math.min(hi[i], hi[i + 1]);
    if (fHi > fLo) {
      pairRowsByRun(f, i, 2, fLo, plan);
      if (graded) fusedPairGradedRows(f, i, fLo, fHi, free);
      else fusedPairFreeRows(f, i, fLo, fHi, free);
      pairRowsByRun(f, i, fHi, kTop, plan);
    } else {
      pairRowsByRun(f, i, 2, kTop, plan);
    }
    if (pz > 0) {
      const top = Math.min(topFree[i], topFree[i + 1]);
      if (top === 2) topLayerPairFree(f, p!, i, free, tc!);
      else if (top === 1) topLayerPairLossless(f, p!, i, free, tc!);
      else topLayerPair(f, p!, i);
    }
  }
  if (i < ix0) {
    // the column left over when the count is odd
    groundRows(f, z, i, head);
    if (graded) {
      fusedRows(f, i, 2, kTop);
    } else {
      fusedRows(f, i, 2, lo[i]);
      fusedFreeRows(f, i, lo[i], hi[i], free);
      fusedRows(f, i, hi[i], kTop);
    }
    if (pz > 0) topLayerColumn(f, p!, i);
  }
  // the far-side layer's columns, two at a time, each pair whole; the last alone when the count is odd
  let j = 0;
  for (; ix0 + j + 1 < nx; j += 2) farLayerPair(f, p!, z, j, tc!);
  if (ix0 + j < nx) farLayerColumn(f, p!, z, j);
}
