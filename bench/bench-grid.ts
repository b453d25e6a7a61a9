// A synthetic Yee grid for timing the update kernels, set up like the native reference's medium (free space over
// a lossy slab, a good conductor below the surface-impedance row, every cell non-zero from the first step), so our
// kernels and the reference do the same work per cell. Timing only: nothing here is a physical result.
import { C0, EPS0, MU0 } from '../solver/constants.js';
import { buildCpmlState } from '../solver/cpml.js';
import { buildImpedanceRow } from '../solver/surface-impedance.js';
import {
  applySurfaceImpedance,
  leapfrogStep,
  updateE,
  updateECpml,
  updateH,
  updateHCpml,
  yeeFields,
  type CpmlState,
  type ImpedanceRow,
  type YeeFields,
} from '../solver/fdtd-kernel.js';

/**
 * `plain`: updateH + surface-impedance row + updateE on per-cell coefficient arrays (the native reference's layout);
 * `cpml`: the same with both CPML updates; `profiles`: the plain step with coefficients shared by column profile,
 * as `solve()` lays them out (the slab's 16 conductivities are 16 profiles).
 */
export type KernelVariant = 'plain' | 'cpml' | 'profiles';

export interface BenchGrid {
  fields: YeeFields;
  pml: CpmlState;
  zrow: ImpedanceRow;
  /** Index of the soft source cell in Ez. */
  sourceIndex: number;
  /** Source phase advance per step, rad. */
  omegaDt: number;
}

/** Absorbing layer thickness of the `cpml` variant, cells (the case schema's default). */
export const BENCH_PML_CELLS = 40;
/** Cell size, m: the native reference's 1 cm (only ratios matter here). */
const CELL_M = 0.01;
/** Conductivity of the conductor under the impedance row, S/m (as in the native reference). */
const CONDUCTOR_S_PER_M = 1e4;

/** Build an nx × nz grid (cells), one stride S = nz + 1 for every array, as solver/grid.ts lays it out. */
export function buildBenchGrid(nx: number, nz: number, layout: 'per-cell' | 'profiles' = 'per-cell', fields32 = false): BenchGrid {
  const S = nz + 1;
  const size = (nx + 1) * S;
  const colEx = new Int32Array(nx + 1);
  for (let i = 0; i <= nx; i++) colEx[i] = layout === 'per-cell' ? i * S : (i % 16) * S;
  // 2-D Courant limit Δt ≤ Δ/(c√2) (Taflove & Hagness, Computational Electrodynamics, 3rd ed. 2005, ch. 4), at the
  // case schema's default 0.9 of it: the on-axis update needs < 0.951, so the reference's 0.99 would diverge here
  const dtS = (0.9 * CELL_M) / (C0 * Math.SQRT2);
  const caEx = new Float64Array(size);
  const cbEx = new Float64Array(size);
  // Ex and Ez of a cell share one ca and one cb, as in the native reference (its two coefficient arrays): the same
  // arrays serve both fields, so per cell we read what it reads
  const caEz = caEx;
  const cbEz = cbEx;
  const slabRows = Math.floor(nz / 8);
  for (let i = 0; i <= nx; i++) {
    for (let k = 0; k <= nz; k++) {
      const inSlab = k < slabRows;
      const eps = EPS0 * (inSlab ? 4 : 1);
      const sigma = inSlab ? 0.005 * (1 + (i % 16) / 16) : 0;
      // semi-implicit loss: a = σΔt/(2ε), ca = (1−a)/(1+a), cb = (Δt/ε)/(1+a)/Δ
      // (Taflove & Hagness 2005, ch. 3, lossy media)
      const a = (sigma * dtS) / (2 * eps);
      const ca = (1 - a) / (1 + a);
      const cb = dtS / eps / (1 + a) / CELL_M;
      const ik = i * S + k;
      caEx[ik] = ca;
      cbEx[ik] = cb;
    }
  }
  const chz = new Float64Array(nz).fill(dtS / (MU0 * CELL_M));
  const rp = new Float64Array(nx + 1).fill(1);
  const rm = new Float64Array(nx + 1).fill(1);
  // axisymmetric radial factors (i ± ½)/i, as solver/grid.ts radialFactors builds them
  for (let i = 1; i <= nx; i++) {
    rp[i] = (i + 0.5) / i;
    rm[i] = (i - 0.5) / i;
  }
  const fields = yeeFields({
    nx,
    nz,
    S,
    // grid.field_precision float32: only the three field arrays are single precision
    ex: fields32 ? new Float32Array(size) : new Float64Array(size),
    ez: fields32 ? new Float32Array(size) : new Float64Array(size),
    hy: fields32 ? new Float32Array(size) : new Float64Array(size),
    caEx,
    cbEx,
    caEz,
    cbEz,
    colEx,
    colEz: colEx,
    chx: dtS / (MU0 * CELL_M),
    chz,
    rp,
    rm,
    axisFactor: 4,
  });
  // deterministic integer patterns, so every cell carries a non-zero value from the first step
  for (let i = 1; i < nx; i++) for (let k = 0; k < nz; k++) fields.ez[i * S + k] = 1e-3 * (((i * 7 + k * 13) % 17) - 8);
  for (let i = 0; i < nx; i++) {
    for (let k = 0; k < nz; k++) fields.hy[i * S + k] = 2.5e-6 * (((i * 11 + k * 5) % 19) - 9);
  }

  const px = Math.min(BENCH_PML_CELLS, nx - 1);
  const pz = Math.min(BENCH_PML_CELLS, nz - 1);
  const frequencyHz = C0 / (20 * CELL_M);
  const pml = buildCpmlState(nx, nz, px, pz, CELL_M, dtS, frequencyHz);

  // good-conductor surface impedance Rs = √(ωμ0/(2σ)), Ls = Rs/ω (Jackson, Classical
  // Electrodynamics, 3rd ed. 1999, §8.1; section from memory)
  const omega = 2 * Math.PI * frequencyHz;
  const rsOhm = Math.sqrt((omega * MU0) / (2 * CONDUCTOR_S_PER_M));
  const lsH = rsOhm / omega;
  const zrow: ImpedanceRow = buildImpedanceRow(new Float64Array(nx).fill(rsOhm), new Float64Array(nx).fill(lsH), dtS, 'extrapolated');
  for (let i = 0; i < nx; i++) zrow.hsPrev[i] = fields.hy[i * S];
  const sourceIndex = Math.floor(nx / 4) * S + slabRows + Math.floor(nz / 16);
  return { fields, pml, zrow, sourceIndex, omegaDt: omega * dtS };
}

export interface KernelTiming {
  /** Wall-clock seconds (monotonic clock). */
  wallS: number;
  /** CPU seconds this process used meanwhile; cpuS/wallS below 1 means the machine was busy. */
  cpuS: number;
}

/**
 * How a step is run: `step`, one leapfrogStep (one sweep over the columns); `in-turn`, the five updates one after
 * another over the whole grid (the same numbers, bit for bit).
 */
export type StepEntry = 'step' | 'in-turn';

/** Advance `steps` leapfrog steps in the order solve() uses, timing them. */
export function runKernel(g: BenchGrid, variant: KernelVariant, steps: number, entry: StepEntry = 'step'): KernelTiming {
  const { fields, pml, zrow, sourceIndex, omegaDt } = g;
  const withPml = variant === 'cpml';
  const cpu0 = process.cpuUsage();
  const t0 = process.hrtime.bigint();
  for (let n = 0; n < steps; n++) {
    if (entry === 'step') {
      leapfrogStep(fields, withPml ? pml : undefined, zrow);
    } else {
      updateH(fields);
      if (withPml) updateHCpml(fields, pml);
      applySurfaceImpedance(fields, zrow);
      updateE(fields);
      if (withPml) updateECpml(fields, pml);
    }
    fields.ez[sourceIndex] += Math.sin(omegaDt * (n + 1));
  }
  const wallS = Number(process.hrtime.bigint() - t0) / 1e9;
  const cpu = process.cpuUsage(cpu0);
  return { wallS, cpuS: (cpu.user + cpu.system) / 1e6 };
}

/** Sum of squares of every field, so a run whose result is never read cannot be optimised away. */
export function fieldEnergy(g: BenchGrid): number {
  const { ex, ez, hy } = g.fields;
  let s = 0;
  for (let p = 0; p < ex.length; p++) s += ex[p] * ex[p] + ez[p] * ez[p] + hy[p] * hy[p];
  return s;
}
