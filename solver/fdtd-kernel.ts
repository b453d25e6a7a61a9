// Update kernels of the 2-D Yee scheme (TM to the grid plane: Ex, Ez, Hy; or Er, Ez, Hφ on the axisymmetric grid).
// One function per update; flat Float64Arrays, one stride; no allocation inside the loops.
//   ∂Hy/∂t = (1/μ0)(∂Ez/∂x − ∂Ex/∂z)
//   ε∂Ex/∂t + σEx = −∂Hy/∂z
//   ε∂Ez/∂t + σEz = (1/r)∂(rHy)/∂r  (axisymmetric)  or  ∂Hy/∂x  (planar)
// (Yee, IEEE Trans. Antennas Propag. 14(3), 1966; Taflove & Hagness, Computational Electrodynamics, ch. 3.)

export interface YeeFields {
  nx: number;
  nz: number;
  /** Row stride, nz + 1. */
  S: number;
  ex: Float64Array;
  ez: Float64Array;
  hy: Float64Array;
  caEx: Float64Array;
  cbEx: Float64Array;
  caEz: Float64Array;
  cbEz: Float64Array;
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

/** Hy^{n+½} = Hy^{n−½} + Δt/μ0·(∂Ez/∂x − ∂Ex/∂z), from E^n. */
export function updateH(f: YeeFields): void {
  const { nx, nz, S, ex, ez, hy, chx, chz } = f;
  for (let i = 0; i < nx; i++) {
    const base = i * S;
    for (let k = 0; k < nz; k++) {
      const ik = base + k;
      hy[ik] += chx * (ez[ik + S] - ez[ik]) - chz[k] * (ex[ik + 1] - ex[ik]);
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
    for (let k = 0; k < nz; k++) {
      const ik = base + k;
      const psi = bj * psiHx[pbase + k] + aj * (ez[ik + S] - ez[ik]);
      psiHx[pbase + k] = psi;
      hy[ik] += chx * psi;
    }
  }
  if (pz === 0) return;
  for (let i = 0; i < nx; i++) {
    const base = i * S;
    const pbase = i * pz;
    for (let j = 0; j < pz; j++) {
      const k = kz0 + j;
      const ik = base + k;
      const psi = bHz[j] * psiHz[pbase + j] + aHz[j] * (ex[ik + 1] - ex[ik]);
      psiHz[pbase + j] = psi;
      hy[ik] -= chz[k] * psi;
    }
  }
}

/**
 * Surface impedance on the ground row, solved together with the first H row so it is stable for any R, L:
 *   Ex^n = −(R·Hs^n + L·(∂Hs/∂t)^n),  Hs^n ≈ (Hs^{n+½} + Hs^{n−½})/2,  (∂Hs/∂t)^n ≈ (Hs^{n+½} − Hs^{n−½})/Δt
 * (the Leontovich condition E_tan = Zs·(n̂ × H), n̂ = +z out of the ground, so Ex = −Zs·Hy: REFERENCES.md; Maloney
 * & Smith, IEEE Trans. Antennas Propag. 40(1), 1992, for the R + L form). `updateH` has already advanced Hy[i][0]
 * with the stale Ex[i][0]; that contribution is taken out, and the pair (Hy[i][0], Ex^n[i][0]) solved exactly:
 *   Hy0 = P + c·Ex0,  Ex0 = −(a+b)(wN·Hy0 + wF·Hy1) − (a−b)·Hs_prev,  c = Δt/(μ0Δz0).
 */
export function applySurfaceImpedance(f: YeeFields, z: ImpedanceRow): void {
  const { nx, S, ex, hy } = f;
  const c = f.chz[0];
  const { halfR, lOverDt, wNear, wFar, hsPrev } = z;
  for (let i = 0; i < nx; i++) {
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
}

/** E^{n+1} from Hy^{n+½}: lossy-medium update of Ex (rows 1…nz−1) and Ez (columns 0…nx−1, axis included). */
export function updateE(f: YeeFields): void {
  const { nx, nz, S, ex, ez, hy, caEx, cbEx, caEz, cbEz, rp, rm, axisFactor } = f;
  // axis / symmetry column
  for (let k = 0; k < nz; k++) ez[k] = caEz[k] * ez[k] + cbEz[k] * axisFactor * hy[k];
  for (let k = 1; k < nz; k++) ex[k] = caEx[k] * ex[k] + cbEx[k] * (hy[k - 1] - hy[k]);
  for (let i = 1; i < nx; i++) {
    const base = i * S;
    const p = rp[i];
    const m = rm[i];
    for (let k = 1; k < nz; k++) {
      const ik = base + k;
      ex[ik] = caEx[ik] * ex[ik] + cbEx[ik] * (hy[ik - 1] - hy[ik]);
    }
    for (let k = 0; k < nz; k++) {
      const ik = base + k;
      ez[ik] = caEz[ik] * ez[ik] + cbEz[ik] * (p * hy[ik] - m * hy[ik - S]);
    }
  }
}

/** CPML terms of the E update: Ez += cbEz·ψx (far side), Ex += cbEx·ψz (top). */
export function updateECpml(f: YeeFields, p: CpmlState): void {
  const { nz, S, ex, ez, hy, cbEx, cbEz, nx } = f;
  const { ix0, px, kz0, pz, bEz, aEz, bEx, aEx, psiEz, psiEx } = p;
  for (let j = 0; j < px; j++) {
    const i = ix0 + j;
    if (i < 1) continue;
    const base = i * S;
    const bj = bEz[j];
    const aj = aEz[j];
    const pbase = j * S;
    for (let k = 0; k < nz; k++) {
      const ik = base + k;
      const psi = bj * psiEz[pbase + k] + aj * (hy[ik] - hy[ik - S]);
      psiEz[pbase + k] = psi;
      ez[ik] += cbEz[ik] * psi;
    }
  }
  if (pz === 0) return;
  for (let i = 0; i < nx; i++) {
    const base = i * S;
    const pbase = i * pz;
    for (let j = 0; j < pz; j++) {
      const k = kz0 + j;
      if (k < 1) continue;
      const ik = base + k;
      const psi = bEx[j] * psiEx[pbase + j] + aEx[j] * (hy[ik - 1] - hy[ik]);
      psiEx[pbase + j] = psi;
      ex[ik] += cbEx[ik] * psi;
    }
  }
}
