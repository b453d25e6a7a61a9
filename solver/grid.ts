// The Yee grid of one case: cell sizes, time step, cell counts, per-cell update coefficients.
// Pure: builds typed arrays from a validated case; no I/O.
//
// Layout (i along range, k along height, k the fast index, one stride S = nz + 1 for every array):
//   Hy[i][k] at ((i+½)Δx, z_k + Δz_k/2)   i ∈ [0,nx), k ∈ [0,nz)
//   Ex[i][k] at ((i+½)Δx, z_k)             i ∈ [0,nx), k ∈ [0,nz]
//   Ez[i][k] at ( i·Δx,  z_k + Δz_k/2)     i ∈ [0,nx], k ∈ [0,nz)
// Column i = 0 is the axis (axisymmetric, spherical) or the symmetry plane of the source (planar).
// Ex row `groundRow` lies on the ground surface z = 0; rows below it are resolved ground cells.
//
// Spherical geometry (a sphere of radius a, source on the polar axis θ = 0): x is the distance along the surface,
// x = a·θ (Δθ = Δx/a), z the height above it, ρ = a + z. The arrays hold Ez → E_ρ, Ex → Ẽθ = (ρ/a)·E_θ and
// Hy → H̃ = (ρ/a)·H_φ. Maxwell's equations with ∂/∂φ = 0 (any text with the curl in spherical coordinates, e.g.
// Balanis, Advanced Engineering Electromagnetics, 1989, app. II) then read
//   μ0 ∂H̃/∂t = ∂E_ρ/∂x − ∂Ẽθ/∂ρ                     (from ρ·(∇×E)_φ = ∂(ρE_θ)/∂ρ − ∂E_ρ/∂θ)
//   ε ∂Ẽθ/∂t + σẼθ = −∂H̃/∂ρ                          (from (∇×H)_θ = −(1/ρ)∂(ρH_φ)/∂ρ)
//   ε ∂E_ρ/∂t + σE_ρ = (a/ρ)²·(1/(a·sinθ))·∂(sinθ·H̃)/∂θ   (from (∇×H)_ρ = (1/(ρ sinθ))∂(sinθ H_φ)/∂θ)
// so the flat kernels run unchanged: H coefficients as on the flat grid, Ẽθ's as on the flat grid, and E_ρ's take
// (a/ρ)² per row (folded into the Ez coefficient profile) and column weights from the areas of the spherical zones
// (see radialFactors). Dividing the scaled fields by a (Holland 1983 and Marchenko et al. 2022 scale by ρ) keeps them
// equal to the physical fields on the surface. In integral form (Ampère's and Faraday's laws on each Yee face, with
// the exact face areas) this is the finite-integration form of the same grid, which conserves a discrete energy.
import { earthRadiusM, type Case } from '../schemas/case.js';
import { UserError } from '../schemas/errors.js';
import { C0, EPS0, MU0 } from './constants.js';
import { groundImpedance } from './surface-impedance.js';
import type { FieldArray } from './fdtd-kernel.js';

/** Exponential ionosphere: σ(z) = ε0·2.5e5·exp(β(z − h′)) S/m, z and h′ in km (Wait & Spies, NBS Tech. Note 300, 1964). */
export function ionosphereConductivity(heightM: number, hPrimeKm: number, betaPerKm: number): number {
  return EPS0 * 2.5e5 * Math.exp(betaPerKm * (heightM / 1000 - hPrimeKm));
}

export interface GridPlan {
  /** Cell size along range and in the air, m. */
  dxM: number;
  /** Time step, s (a whole number of steps per period). */
  dtS: number;
  stepsPerPeriod: number;
  /** Courant number actually used, as a fraction of the 2-D limit of the finest cells. */
  courant: number;
  nx: number;
  nz: number;
  /** Cells along range inside the computed region (before the absorbing layer). */
  cellsRange: number;
  /** Ex row on the ground surface. */
  groundRow: number;
  /** Cell height of each row k ∈ [0,nz), m. */
  dzM: Float64Array;
  /** Height of Ex row k ∈ [0,nz] above the ground surface, m. */
  zNodeM: Float64Array;
  /**
   * Factor s on ε, μ and σ of every cell (1 without dispersion correction). With `along_ground` the grid's medium
   * speed v = c/s is chosen so that the Yee relation along an axis, sin(ωΔt/2)/(vΔt) = sin(k̃Δx/2)/Δx, gives
   * k̃ = ω/c along range (Taflove & Hagness, ch. 4, the dispersion relation solved for the medium speed); the wave
   * impedance √(μ/ε) is unchanged, so the ground's normalised impedance is too.
   */
  materialScale: number;
  /** Sphere radius a, m, for the spherical geometry; undefined on the flat geometries. */
  earthRadiusM: number | undefined;
  /** Absorbing layer thickness at the far side (cells) and at the top (rows; 0 for a pec ceiling). */
  pmlX: number;
  pmlTop: number;
  memoryBytes: number;
}

/**
 * Most cells (nodes (nx+1)·(nz+1)) one field array may have: the longest Float64Array of Node 20's V8 has 2^32
 * elements (measured: `new Float64Array(2 ** 33)` is refused as an invalid length). Beyond it the case cannot run
 * on any machine, whatever its memory.
 */
export const MAX_GRID_CELLS = 2 ** 32;
/**
 * Most rows one grid may have (a Loamwave bound): 2^24 rows of the finest air cells (λ/400 at 3 MHz, 0.25 m) span
 * 4 200 km, and a resolved ground of sea water under dry land needs about 10^4; it keeps the per-row arrays a plan
 * builds for every job small (a thin grid of few columns could otherwise pass the cell bound with 10^8 rows).
 */
export const MAX_GRID_ROWS = 2 ** 24;

const FIELD_ARRAYS = 3; // Ex, Ez, Hy (coefficients are per column profile: see buildMaterials)

/** Cell size, time step and cell counts of a case (cheap: no arrays of cells). */
export function planGrid(c: Case): GridPlan {
  const lambdaM = C0 / c.frequency_hz;
  const dxM = c.grid.cell_size_m ?? lambdaM / (c.grid.cells_per_wavelength ?? 20);
  const npml = c.grid.absorbing_cells;
  const cellsRange = Math.ceil(c.domain.range_m / dxM);
  const nx = cellsRange + npml;

  // Rows below ground (resolved model): cells of a quarter of the smallest skin depth, down to the requested
  // number of skin depths of the most penetrable segment, then a perfect conductor (the lossy cells absorb:
  // the wave returning from the bottom is down by e^{−2·depth/δ}).
  let groundRows = 0;
  let dzGroundM = dxM;
  if (c.ground.model === 'resolved') {
    const depths = (c.ground.segments ?? []).map((s) => groundImpedance(c.frequency_hz, s.conductivity_s_per_m, s.relative_permittivity).skinDepthM);
    // reduce, not Math.min(...depths): a spread of 10^5 segments overflows the call stack
    const deltaMin = depths.reduce((m, d) => Math.min(m, d), Infinity);
    const deltaMax = depths.reduce((m, d) => Math.max(m, d), -Infinity);
    dzGroundM = Math.min(dxM, deltaMin / 4);
    groundRows = Math.ceil((c.ground.resolved_depth_skin_depths * deltaMax) / dzGroundM);
  }
  let airRows: number;
  let pmlTop: number;
  if (c.upper_boundary.kind === 'pec') {
    airRows = Math.max(2, Math.round(c.upper_boundary.height_m / dxM));
    pmlTop = 0;
  } else {
    airRows = Math.ceil(c.domain.height_m / dxM) + npml;
    pmlTop = npml;
  }
  const nz = groundRows + airRows;
  if (!((nx + 1) * (nz + 1) <= MAX_GRID_CELLS && nz <= MAX_GRID_ROWS)) {
    const ground = groundRows > 0 ? ` (${groundRows} of the rows in the resolved ground)` : '';
    throw new UserError(
      `grid: the case needs ${nx} × ${nz} cells${ground}, more than one grid can hold (${MAX_GRID_CELLS} cells, ${MAX_GRID_ROWS} rows); coarsen grid.cell_size_m or grid.cells_per_wavelength, or shrink domain.range_m and domain.height_m`,
      'loamwave.case.invalid',
    );
  }
  const dzM = new Float64Array(nz);
  for (let k = 0; k < nz; k++) dzM[k] = k < groundRows ? dzGroundM : dxM;
  const zNodeM = new Float64Array(nz + 1);
  for (let k = 0; k <= nz; k++) zNodeM[k] = (k - groundRows) * (k <= groundRows ? dzGroundM : dxM);

  // 2-D Courant limit of the finest cells, Δt ≤ 1/(c·√(1/Δx² + 1/Δz²)) (Taflove & Hagness, Computational
  // Electrodynamics, ch. 4); in the ground the local wave speed is c/√εr, which relaxes its limit.
  let dtLimit = 1 / (C0 * Math.sqrt(1 / (dxM * dxM) + 1 / (dxM * dxM)));
  // On the sphere a cell's length along θ is ρΔθ = Δx·ρ/a, shortest at the bottom of the resolved ground.
  const earthR = c.geometry === 'spherical' ? earthRadiusM(c) : undefined;
  if (earthR !== undefined && earthR + zNodeM[0] <= 0) {
    throw new UserError(
      `earth.radius_m (${earthR}) is smaller than the resolved ground's depth (${-zNodeM[0]} m); enlarge earth.radius_m`,
      'loamwave.case.invalid',
    );
  }
  const dxGroundM = earthR !== undefined ? (dxM * (earthR + zNodeM[0])) / earthR : dxM;
  if (groundRows > 0) {
    const epsMin = (c.ground.segments ?? []).reduce((m, s) => Math.min(m, s.relative_permittivity), Infinity);
    const vGround = C0 / Math.sqrt(epsMin);
    dtLimit = Math.min(dtLimit, 1 / (vGround * Math.sqrt(1 / (dxGroundM * dxGroundM) + 1 / (dzGroundM * dzGroundM))));
    // the first air row above the fine ground rows uses the air speed with the mean spacing
    const dzMix = (dxM + dzGroundM) / 2;
    dtLimit = Math.min(dtLimit, 1 / (C0 * Math.sqrt(1 / (dxM * dxM) + 1 / (dzMix * dzMix))));
  }
  if (earthR !== undefined) {
    // the whole grid, absorbing layer included, must end before the antipode θ = π
    const thetaEnd = ((nx + 1) * dxM) / earthR;
    if (thetaEnd >= Math.PI) {
      throw new UserError(
        `domain.range_m plus the absorbing layer (${Math.round((nx + 1) * dxM)} m) reaches the antipode (π·earth.radius_m = ${Math.round(Math.PI * earthR)} m); shorten domain.range_m or grid.absorbing_cells`,
        'loamwave.case.invalid',
      );
    }
  }
  // Whole number of steps per period, so a DFT over whole periods is exact (docs/references.md, Numerical notes).
  const periodS = 1 / c.frequency_hz;
  const stepsPerPeriod = Math.ceil(periodS / (c.grid.courant * dtLimit));
  const dtS = periodS / stepsPerPeriod;
  // along-range phase velocity made exact at ω: v = Δx·sin(ωΔt/2)/(Δt·sin(k0Δx/2)), scale = c/v (< 1)
  const omega = 2 * Math.PI * c.frequency_hz;
  const materialScale =
    c.grid.dispersion_correction === 'along_ground'
      ? (C0 * dtS * Math.sin((omega / C0) * dxM / 2)) / (dxM * Math.sin((omega * dtS) / 2))
      : 1;
  const cells = (nx + 1) * (nz + 1);
  const pmlCells = 2 * (npml * (nz + 1) + pmlTop * (nx + 1));
  const profiles = groundRows > 0 ? Math.max(1, (c.ground.segments ?? []).length) : 1;
  const fieldBytes = c.grid.field_precision === 'float32' ? 4 : 8;
  const memoryBytes = fieldBytes * FIELD_ARRAYS * cells + 8 * (pmlCells + 4 * profiles * (nz + 1)) + 8 * 6 * (nx + nz);
  return {
    dxM,
    dtS,
    stepsPerPeriod,
    courant: dtS / dtLimit,
    nx,
    nz,
    cellsRange,
    materialScale,
    earthRadiusM: earthR,
    groundRow: groundRows,
    dzM,
    zNodeM,
    pmlX: npml,
    pmlTop,
    memoryBytes,
  };
}

export interface Materials {
  /** Coefficient profiles (one column of S values each) and each column's offset into them (see YeeFields). */
  caEx: Float64Array;
  cbEx: Float64Array;
  caEz: Float64Array;
  cbEz: Float64Array;
  colEx: Int32Array;
  colEz: Int32Array;
}

/** Number of distinct column profiles: the materials of a column depend only on its ground segment, and only
 *  when the ground is meshed. */
function profileCount(c: Case, g: GridPlan): number {
  return g.groundRow > 0 ? Math.max(1, (c.ground.segments ?? []).length) : 1;
}

/**
 * Lossy-medium coefficients, semi-implicit in the loss term so they are stable for any σ:
 * a = σΔt/(2ε), ca = (1 − a)/(1 + a), cb = (Δt/ε)/(1 + a) (Taflove & Hagness, ch. 3), with the spatial step folded
 * into cb (Ex: the dual cell height; Ez: Δx, and the axis factor of the on-axis update).
 * Materials are horizontally layered within a ground segment, so one profile per segment serves every column.
 */
export function buildMaterials(c: Case, g: GridPlan): Materials {
  const { nx, nz, dxM, dtS, dzM, zNodeM, groundRow } = g;
  const S = nz + 1;
  const segments = c.ground.segments ?? [];
  const nProfiles = profileCount(c, g);
  const caEx = new Float64Array(nProfiles * S);
  const cbEx = new Float64Array(nProfiles * S);
  const caEz = new Float64Array(nProfiles * S);
  const cbEz = new Float64Array(nProfiles * S);
  const iono = c.upper_boundary.kind === 'exponential' ? c.upper_boundary : undefined;
  const earthR = g.earthRadiusM;

  const airSigma = (zM: number): number => (iono ? ionosphereConductivity(zM, iono.h_prime_km, iono.beta_per_km) : 0);
  const coeff = (epsPhysical: number, sigmaPhysical: number): [number, number] => {
    const eps = epsPhysical * g.materialScale;
    const sigma = sigmaPhysical * g.materialScale;
    const a = (sigma * dtS) / (2 * eps);
    return [(1 - a) / (1 + a), dtS / eps / (1 + a)];
  };

  for (let prof = 0; prof < nProfiles; prof++) {
    const seg = groundRow > 0 ? segments[prof] : undefined;
    for (let k = 0; k <= nz; k++) {
      const ik = prof * S + k;
      // Ex at z_k: dual cell from the middle of the row below to the middle of the row above
      const below = k > 0 ? dzM[k - 1] : dzM[0];
      const above = k < nz ? dzM[k] : dzM[nz - 1];
      const dual = (below + above) / 2;
      let epsEx = EPS0;
      let sigEx = airSigma(zNodeM[k]);
      if (k < groundRow && seg) {
        epsEx = EPS0 * seg.relative_permittivity;
        sigEx = seg.conductivity_s_per_m;
      } else if (k === groundRow && seg) {
        // interface node: the dual cell is half ground, half air (weighted by height)
        epsEx = (EPS0 * seg.relative_permittivity * below + EPS0 * above) / (below + above);
        sigEx = (seg.conductivity_s_per_m * below) / (below + above);
      }
      const [ca1, cb1] = coeff(epsEx, sigEx);
      caEx[ik] = ca1;
      cbEx[ik] = cb1 / dual;
      if (k < nz) {
        const zMid = zNodeM[k] + dzM[k] / 2;
        let epsEz = EPS0;
        let sigEz = airSigma(zMid);
        if (k < groundRow && seg) {
          epsEz = EPS0 * seg.relative_permittivity;
          sigEz = seg.conductivity_s_per_m;
        }
        const [ca2, cb2] = coeff(epsEz, sigEz);
        caEz[ik] = ca2;
        if (earthR === undefined) cbEz[ik] = cb2 / dxM;
        else {
          // sphere: (a/ρ)² at the E_ρ row's radius (the middle of the cell), see the module comment
          const aOverRho = earthR / (earthR + zMid);
          cbEz[ik] = ((cb2 / dxM) * aOverRho) * aOverRho;
        }
      }
    }
  }
  // each column's profile: the segment under Ex at (i+½)Δx and under Ez at i·Δx
  const segmentIndex = (xM: number): number => {
    let j = 0;
    for (let s = 0; s < segments.length; s++) if (segments[s].start_m <= xM) j = s;
    return j;
  };
  const colEx = new Int32Array(nx + 1);
  const colEz = new Int32Array(nx + 1);
  for (let i = 0; i <= nx; i++) {
    colEx[i] = nProfiles > 1 ? segmentIndex((i + 0.5) * dxM) * S : 0;
    colEz[i] = nProfiles > 1 ? segmentIndex(i * dxM) * S : 0;
  }
  return { caEx, cbEx, caEz, cbEz, colEx, colEz };
}

/** H-update coefficients Δt/(μΔx) and Δt/(μΔz_k) per row, μ = μ0·materialScale. */
export function magneticCoefficients(g: GridPlan): { chx: number; chz: Float64Array } {
  const mu = MU0 * g.materialScale;
  const chz = new Float64Array(g.nz);
  for (let k = 0; k < g.nz; k++) chz[k] = g.dtS / (mu * g.dzM[k]);
  return { chx: g.dtS / (mu * g.dxM), chz };
}

/**
 * Column factors of the Ez update, (1/r)∂(rH)/∂r ≈ (rp·H[i] − rm·H[i−1])/Δx, and the factor of the on-axis update
 * ∂Ez/∂t = (axisFactor/(εΔx))·H[0]; planar: 1, 1 and 2.
 * Spherical: Ampère's law on the zone of the sphere θ_{i−½} < θ < θ_{i+½} (area 2πρ²(cosθ_{i−½} − cosθ_{i+½}),
 * rim lengths 2πρ·sinθ_{i±½}) gives (1/(a sinθ))∂(sinθ·H)/∂θ ≈ (rp·H[i] − rm·H[i−1])/Δx with
 * rp, rm = Δθ·sinθ_{i±½}/(cosθ_{i−½} − cosθ_{i+½}), and cosθ_{i−½} − cosθ_{i+½} = 2·sinθ_i·sin(Δθ/2) written so
 * (the difference of two cosines near 1 would lose most digits at Δθ ~ 1e-5). On the axis, the polar cap
 * θ < Δθ/2 (area 2πρ²(1 − cos(Δθ/2)) = 4πρ²·sin²(Δθ/4), rim 2πρ·sin(Δθ/2)):
 * axisFactor = Δθ·sin(Δθ/2)/(2 sin²(Δθ/4)), which tends to the flat disk's 4 as Δθ → 0.
 */
export function radialFactors(c: Case, nx: number, g?: GridPlan): { rp: Float64Array; rm: Float64Array; axisFactor: number } {
  const rp = new Float64Array(nx + 1).fill(1);
  const rm = new Float64Array(nx + 1).fill(1);
  if (c.geometry === 'spherical') {
    if (g?.earthRadiusM === undefined) throw new Error('radialFactors: the spherical geometry needs the grid plan');
    const dTheta = g.dxM / g.earthRadiusM;
    const zone = 2 * Math.sin(dTheta / 2); // (cosθ_{i−½} − cosθ_{i+½})/sinθ_i
    for (let i = 1; i <= nx; i++) {
      const den = zone * Math.sin(i * dTheta);
      rp[i] = (dTheta * Math.sin((i + 0.5) * dTheta)) / den;
      rm[i] = (dTheta * Math.sin((i - 0.5) * dTheta)) / den;
    }
    const s4 = Math.sin(dTheta / 4);
    return { rp, rm, axisFactor: (dTheta * Math.sin(dTheta / 2)) / (2 * s4 * s4) };
  }
  if (c.geometry === 'axisymmetric') {
    for (let i = 1; i <= nx; i++) {
      rp[i] = (i + 0.5) / i;
      rm[i] = (i - 0.5) / i;
    }
  }
  // On the axis, Ampère's law on a disk of radius Δr/2: ∂Ez/∂t = (4/(εΔr))·Hφ(Δr/2) (Taflove & Hagness,
  // body-of-revolution chapter). On the planar symmetry plane Hy(−Δx/2) = −Hy(Δx/2), so the factor is 2.
  const axisFactor = c.geometry === 'axisymmetric' ? 4 : 2;
  return { rp, rm, axisFactor };
}

/**
 * Area of the source cell's cross-section normal to the vertical current, m²: the disk π(Δx/2)² on the
 * axisymmetric axis, the polar cap 2πa²(1 − cos(Δθ/2)) = 4πa²·sin²(Δθ/4) on the sphere (at the surface radius: the
 * E_ρ coefficient carries (a/ρ)², so J over the cap at ρ folds to this), Δx (per metre of line) on the planar grid.
 */
export function sourceCellAreaM2(c: Case, g: GridPlan): number {
  if (c.geometry === 'spherical') {
    const a = g.earthRadiusM!;
    const s4 = Math.sin(g.dxM / a / 4);
    return 4 * Math.PI * a * a * s4 * s4;
  }
  return c.geometry === 'axisymmetric' ? Math.PI * (g.dxM / 2) ** 2 : g.dxM;
}

/**
 * Factor turning the scaled fields of a row into physical ones: a/ρ at height `heightM` on the sphere (Ẽθ, H̃ are
 * (ρ/a)·E_θ, (ρ/a)·H_φ), 1 on the flat grids.
 */
export function metricUnscale(g: GridPlan, heightM: number): number {
  return g.earthRadiusM === undefined ? 1 : g.earthRadiusM / (g.earthRadiusM + heightM);
}

export { MU0 };

/** A zeroed field array (Ex, Ez or Hy) of the case's `grid.field_precision`. */
export function fieldArray(c: Case, size: number): FieldArray {
  return c.grid.field_precision === 'float32' ? new Float32Array(size) : new Float64Array(size);
}
