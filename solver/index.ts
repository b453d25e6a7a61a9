// solve(case): run one case on its Yee grid to steady state and return rms phasors at the receivers.
// Pure and deterministic: no I/O, no clock; the same case gives bit-identical numbers.
import type { Case } from '../schemas/case.js';
import type { ReceiverResult, SolveResult } from '../schemas/result.js';
import { C0, MU0 } from './constants.js';
import { buildCpmlState } from './cpml.js';
import { SolveCancelledError, SolverDivergedError } from './errors.js';
import { yeeFields, type CpmlState, type ImpedanceRow, type YeeFields } from './fdtd-kernel.js';
import { kernelFor } from './kernel-instances.js';
import { buildMaterials, fieldArray, magneticCoefficients, metricUnscale, planGrid, radialFactors, sourceCellAreaM2, type GridPlan } from './grid.js';
import { buildReceiverTaps, ReceiverBank } from './receivers.js';
import { sourceCurrent, targetMoment } from './source.js';
import { buildImpedanceRow, groundImpedance } from './surface-impedance.js';
import { checkSolvable } from './validity.js';
import { SOLVER_VERSION } from './version.js';

export { SolveCancelledError, SolverDivergedError } from './errors.js';
export { SOLVER_VERSION, SOLVER_MAJOR } from './version.js';
export { checkSolvable, type SolveLimits, type SolvableCase } from './validity.js';

export interface SolveOptions {
  /** Called now and then with the fraction of the expected steps done (may exceed 1 if settling takes longer). */
  onProgress?: (fraction: number) => void;
  /** Polled every few hundred steps; returning true stops the solve with SolveCancelledError. */
  shouldStop?: () => boolean;
  /** Run exactly this many steps, ignoring the settling test (stability studies, benchmarks). */
  fixedSteps?: number;
  /**
   * Called every `energyEverySteps` steps with Σ(Ex² + Ez² + (η0·Hy)²) over the grid, V²/m² (stability studies;
   * on the sphere of the stored fields, whose Eθ and Hφ carry the factor ρ/a: a weighted energy, as good a norm).
   */
  onEnergy?: (step: number, energy: number) => void;
  energyEverySteps?: number;
}

/** Relative change of the receiver phasors between two consecutive DFT windows taken as settled. */
const SETTLED_RELATIVE_CHANGE = 1e-4;

interface Schedule {
  rampSteps: number;
  /** Steps before the first DFT window starts. */
  settleSteps: number;
  windowSteps: number;
}

function schedule(c: Case, g: GridPlan): Schedule {
  const N = g.stepsPerPeriod;
  const rampSteps = c.run.ramp_periods * N;
  // Steady state at every receiver once the end of the ramp has crossed the whole grid and come back (at c, the
  // fastest speed on the grid), so that the small reflections of the absorbing layers are in every answer and a
  // receiver's result does not depend on which other receivers the case lists; then two more periods for the
  // near-field transients. The window-to-window test then confirms it.
  const extentM = Math.max(g.nx * g.dxM, g.zNodeM[g.nz] - g.zNodeM[0], Math.max(...c.receivers.ranges_m));
  const travelSteps = Math.ceil((2 * extentM) / C0 / g.dtS);
  const settleSteps = rampSteps + travelSteps + 2 * N;
  return { rampSteps, settleSteps, windowSteps: c.run.dft_periods * N };
}

/** Cells, steps, memory and cell updates of a case, without solving (steps assume settling in two windows). */
export function estimateCost(c: Case): { cells_total: number; steps: number; memory_bytes: number; cell_updates: number } {
  const g = planGrid(c);
  const s = schedule(c, g);
  const steps = s.settleSteps + 2 * s.windowSteps;
  const cells = g.nx * g.nz;
  return { cells_total: cells, steps, memory_bytes: g.memoryBytes, cell_updates: cells * steps };
}

/** The fields, absorbing layers and ground row of a case's Yee grid, at rest, as solve() steps them. */
export interface YeeGrid {
  f: YeeFields;
  pml: CpmlState;
  zrow: ImpedanceRow | undefined;
}

/**
 * Build a case's Yee grid (solve() does this first, then steps it with leapfrogStep); pure, so a benchmark can time
 * the kernel alone on the very grid solve() runs.
 */
export function buildYeeGrid(c: Case, g: GridPlan = planGrid(c)): YeeGrid {
  const { nx, nz } = g;
  const S = nz + 1;
  const size = (nx + 1) * S;
  const mat = buildMaterials(c, g);
  const { rp, rm, axisFactor } = radialFactors(c, nx, g);
  const f = yeeFields({
    nx,
    nz,
    S,
    ex: fieldArray(c, size),
    ez: fieldArray(c, size),
    hy: fieldArray(c, size),
    ...mat,
    ...magneticCoefficients(g),
    rp,
    rm,
    axisFactor,
  });

  const pml = buildCpmlState(nx, nz, g.pmlX, g.pmlTop, g.dxM, g.dtS, c.frequency_hz);

  let zrow: ImpedanceRow | undefined;
  if (c.ground.model === 'impedance') {
    const segs = c.ground.segments ?? [];
    const rOhm = new Float64Array(nx);
    const lH = new Float64Array(nx);
    // A column that straddles a segment boundary takes the length-weighted mean of the impedances of the parts
    // it covers, so a coastline between grid lines moves the answer smoothly with the cell size (common practice
    // for sub-cell material boundaries). On the sphere lengths are along the surface, as the segments' starts are.
    const zs = segs.map((s) => groundImpedance(c.frequency_hz, s.conductivity_s_per_m, s.relative_permittivity));
    for (let i = 0; i < nx; i++) {
      const x0 = i * g.dxM;
      const x1 = (i + 1) * g.dxM;
      let r = 0;
      let l = 0;
      for (let j = 0; j < segs.length; j++) {
        const a = Math.max(x0, segs[j].start_m);
        const b = Math.min(x1, j + 1 < segs.length ? segs[j + 1].start_m : Infinity);
        if (b > a) {
          const w = (b - a) / g.dxM;
          r += w * zs[j].resistanceOhm;
          l += w * zs[j].inductanceH;
        }
      }
      rOhm[i] = r;
      lH[i] = l;
    }
    // sphere: the H rows hold (ρ/a)·H, so their weights in H at the surface take a/ρ of each row
    const rowScale: [number, number] = [metricUnscale(g, g.dzM[0] / 2), metricUnscale(g, g.dzM[0] + g.dzM[1] / 2)];
    zrow = buildImpedanceRow(rOhm, lH, g.dtS, c.ground.impedance_sampling, rowScale);
  }

  return { f, pml, zrow };
}

/** Solve one validated case. Throws UserError for cases outside the models' validity. */
export function solve(c: Case, opts: SolveOptions = {}): SolveResult {
  const { grid: g, warnings } = checkSolvable(c);
  const { nx, nz } = g;
  const { f, pml, zrow } = buildYeeGrid(c, g);

  // Source: a vertical current element filling the Ez cell on the axis (or symmetry plane) at the source height.
  let ks = g.groundRow;
  while (ks + 1 < nz && g.zNodeM[ks + 1] <= c.source.height_m + 1e-9) ks++;
  const dzs = g.dzM[ks];
  const areaM2 = sourceCellAreaM2(c, g);
  // ε∂Ez/∂t = curl − J: the update adds −cb′·J, cb′ = cbEz·Δx (on the sphere cbEz also carries (a/ρ)², which turns
  // the cap at the source's radius ρ into the cap at the surface radius that areaM2 measures)
  const sourceCoef = -(f.cbEz[f.colEz[0] + ks] * g.dxM) / areaM2;
  const omega = 2 * Math.PI * c.frequency_hz;
  const sch = schedule(c, g);
  const rampS = sch.rampSteps * g.dtS;

  const receivers = buildReceiverTaps(g, c.receivers.ranges_m, c.receivers.height_m, zrow !== undefined);
  const fieldsByName = { ex: f.ex, ez: f.ez, hy: f.hy };
  // float32 fields step on a kernel instance of their own (kernel-instances.ts)
  const step = kernelFor(c.grid.field_precision).leapfrogStep;

  const expectedSteps = sch.settleSteps + 2 * sch.windowSteps;
  // give up on settling after 200 windows (a field still changing then is reported, not hidden)
  const maxSteps = Math.min(c.run.max_steps, sch.settleSteps + 200 * sch.windowSteps);
  // Fields below 1e-7 of a dipole's free-space field at the receiver's range (η0·k·I·l/(4π·d), for the 1 A
  // source over one cell) count as zero for the settling test: deep in the ionosphere they are round-off.
  const kWave = omega / C0;
  const floors = c.receivers.ranges_m.map((d) => (1e-7 * MU0 * C0 * kWave * dzs) / (4 * Math.PI * Math.max(d, C0 / c.frequency_hz)));
  // one running DFT per grid sample any receiver reads (receivers.ts): the receivers' phasors are combined from
  // them once, after the last window, and the settling test reads the samples directly
  const bank = new ReceiverBank(receivers, g.stepsPerPeriod, floors);
  const dft = bank.dft;
  const progressEvery = Math.max(1, Math.floor(expectedSteps / 100));
  let windows = 0;
  let change = Infinity;
  let n = 0;
  let settled = false;
  for (;;) {
    const windowEnd = n >= sch.settleSteps && (n - sch.settleSteps) % sch.windowSteps === sch.windowSteps - 1;
    // one leapfrog step: E^n → H^{n+½} (with the ground row's E^n), H^{n+½} → E^{n+1}, in one sweep over the columns
    step(f, pml, zrow);
    f.ez[ks] += sourceCoef * sourceCurrent((n + 0.5) * g.dtS, omega, rampS);
    if (n >= sch.settleSteps) dft.accumulate(n, fieldsByName);
    if (windowEnd) {
      windows++;
      if (!dft.take()) {
        throw new SolverDivergedError(`fields became non-finite by step ${n + 1}; lower grid.courant`);
      }
      if (windows >= 2) {
        change = bank.settlingChange();
        if (change < SETTLED_RELATIVE_CHANGE && opts.fixedSteps === undefined) {
          settled = true;
          n++;
          break;
        }
      }
    }
    n++;
    if (opts.onEnergy && n % (opts.energyEverySteps ?? 1000) === 0) opts.onEnergy(n, fieldEnergy(f));
    if (opts.fixedSteps !== undefined ? n >= opts.fixedSteps && windows > 0 : n >= maxSteps && windowEnd) break;
    if (n % 256 === 0 && opts.shouldStop?.()) throw new SolveCancelledError();
    if (opts.onProgress && n % progressEvery === 0) opts.onProgress(n / expectedSteps);
  }
  if (!settled) {
    warnings.push(
      `not settled after ${n} steps (last window-to-window change ${change.toExponential(2)}); raise run.max_steps or check the boundaries`,
    );
  }
  const scale = targetMoment(c) / dzs; // fields were computed for a 1 A peak current over one cell of height dzs
  const combine = (r: number, field: 'ez' | 'ex' | 'hy'): { re: number; im: number } => bank.phasor(r, field, kWave, scale);
  const out: ReceiverResult[] = receivers.map((r, idx) => {
    const ez = combine(idx, 'ez');
    const mag = Math.hypot(ez.re, ez.im);
    return {
      range_m: r.rangeM,
      height_m: r.heightM,
      ez,
      e_horizontal: combine(idx, 'ex'),
      h: combine(idx, 'hy'),
      ez_db_uv_per_m: 20 * Math.log10(mag / 1e-6),
      ez_phase_deg: (Math.atan2(ez.im, ez.re) * 180) / Math.PI,
    };
  });
  opts.onProgress?.(1);
  return {
    solver_version: SOLVER_VERSION,
    // schemas/result.ts lists only the flat geometries so far (its owner adds "spherical"; see the report)
    geometry: c.geometry as SolveResult['geometry'],
    frequency_hz: c.frequency_hz,
    receivers: out,
    grid: {
      cell_size_m: g.dxM,
      time_step_s: g.dtS,
      steps: n,
      steps_per_period: g.stepsPerPeriod,
      cells_range: g.nx,
      cells_height: g.nz,
      cells_ground: g.groundRow,
      cells_total: g.nx * g.nz,
      courant: g.courant,
      memory_bytes: g.memoryBytes,
      cell_updates: g.nx * g.nz * n,
      settled,
      settling_change: change,
    },
    warnings,
  };
}

function fieldEnergy(f: YeeFields): number {
  let e = 0;
  const eta2 = (MU0 * C0) ** 2;
  for (let i = 0; i < f.ex.length; i++) e += f.ex[i] * f.ex[i] + f.ez[i] * f.ez[i] + eta2 * f.hy[i] * f.hy[i];
  return e;
}
