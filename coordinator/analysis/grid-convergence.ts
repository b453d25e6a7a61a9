// Grid convergence on the resolution axis of a sweep: apparent order, Richardson extrapolation and the grid
// convergence index (GCI, Roache's safety factor 1.25), after Celik et al., "Procedure for estimation and reporting
// of uncertainty due to discretization in CFD applications", J. Fluids Eng. 130(7), 078001, 2008. Pure functions.
import {
  ConvergenceBehaviourSchema,
  ConvergenceOutputSchema,
  ResolutionAxisSchema,
  type ConvergenceBehaviour,
  type ConvergenceOutput,
  type ConvergenceRow,
  type ConvergenceVerdict,
  type ResolutionAxis,
} from '../../schemas/analysis-rows.js';
import { unwrapNearDeg } from '../../solver/phase.js';

export interface GridLevel {
  /** Representative cell size (any unit: only ratios enter). */
  h: number;
  /** The solution on this grid. */
  phi: number;
}

export interface GridConvergenceOptions {
  /** Safety factor of the GCI. @defaultValue 1.25 (Celik et al. 2008, eq. 8 with three grids) */
  readonly safetyFactor?: number;
  /** Largest acceptable uncertainty of the fine solution, in its own unit, for the `converged` verdict. @defaultValue Infinity */
  readonly tolerance?: number;
  /** Unit of φ for the advice text, e.g. `dB`. @defaultValue '' */
  readonly unit?: string;
}

export interface GridConvergenceResult {
  /** Every level given, finest first. */
  levels: GridLevel[];
  h1: number;
  h2: number;
  h3: number;
  phi1: number;
  phi2: number;
  phi3: number;
  r21: number;
  r32: number;
  eps21: number;
  eps32: number;
  /** Apparent order p (NaN where it cannot be estimated). */
  apparentOrder: number;
  /** Richardson-extrapolated value φ_ext21 (NaN without an order). */
  phiExtrapolated: number;
  /** e_a21 = |(φ1 − φ2)/φ1|. */
  relativeError21: number;
  /** e_ext21 = |(φ_ext − φ1)/φ_ext| (NaN without an order). */
  extrapolatedRelativeError21: number;
  /** GCI_fine21 = Fs·e_a21/(r21^p − 1) (NaN without an order). */
  gciFine21: number;
  /** The same band in the solution's own unit: Fs·|ε21|/(r21^p − 1); half the range of the three when oscillatory. */
  uncertainty: number;
  behaviour: ConvergenceBehaviour;
  verdict: ConvergenceVerdict;
  /** One sentence on what the numbers mean and what to do. */
  advice: string;
}

/**
 * Apparent order by fixed-point iteration p = |ln|ε32/ε21| + q(p)|/ln r21, q(p) = ln((r21^p − s)/(r32^p − s)),
 * s = sign(ε32/ε21) (Celik et al. 2008, eqs. 3a–3c), started from q = 0. NaN if it does not settle.
 */
export function apparentOrder(r21: number, r32: number, eps21: number, eps32: number): number {
  const s = Math.sign(eps32 / eps21);
  const lnRatio = Math.log(Math.abs(eps32 / eps21));
  const lnR21 = Math.log(r21);
  let p = Math.abs(lnRatio) / lnR21;
  for (let k = 0; k < 200; k++) {
    const num = r21 ** p - s;
    const den = r32 ** p - s;
    if (!(num > 0 && den > 0)) return Number.NaN;
    const next = Math.abs(lnRatio + Math.log(num / den)) / lnR21;
    if (!Number.isFinite(next)) return Number.NaN;
    if (Math.abs(next - p) <= 1e-12 * Math.max(1, p)) return next;
    p = next;
  }
  return Number.NaN;
}

/** Convergence figures of the three finest of `levels` (at least three, distinct cell sizes). */
export function gridConvergence(levels: readonly GridLevel[], options: GridConvergenceOptions = {}): GridConvergenceResult {
  const fs = options.safetyFactor ?? 1.25;
  const tolerance = options.tolerance ?? Number.POSITIVE_INFINITY;
  const unit = options.unit ? ` ${options.unit}` : '';
  const sorted = [...levels].sort((a, b) => a.h - b.h);
  if (sorted.length < 3) throw new Error(`gridConvergence: needs three grid levels (got ${sorted.length})`);
  for (let k = 1; k < sorted.length; k++) {
    if (!(sorted[k].h > sorted[k - 1].h)) throw new Error(`gridConvergence: cell sizes must differ (h = ${sorted[k].h} twice)`);
  }
  for (const l of sorted) if (!(l.h > 0) || !Number.isFinite(l.phi)) throw new Error('gridConvergence: h must be > 0 and φ finite');
  const [g1, g2, g3] = sorted;
  const r21 = g2.h / g1.h;
  const r32 = g3.h / g2.h;
  const eps21 = g2.phi - g1.phi;
  const eps32 = g3.phi - g2.phi;
  // e_a21 (Celik et al. 2008, eq. 5a).
  const relativeError21 = Math.abs((g1.phi - g2.phi) / g1.phi);
  const scale = Math.max(Math.abs(g1.phi), Math.abs(g2.phi), Math.abs(g3.phi), Number.MIN_VALUE);
  const zero = (e: number) => Math.abs(e) <= 1e-12 * scale;
  // What follows depends on the behaviour; every result is then built in one literal of one shape (measured: a
  // result spread from partial objects cost several times the arithmetic, at 500,000 calls in a large study).
  let apparentOrderP = Number.NaN;
  let phiExtrapolated = Number.NaN;
  let extrapolatedRelativeError21 = Number.NaN;
  let gciFine21 = Number.NaN;
  let uncertainty: number;
  let behaviour: ConvergenceBehaviour;
  let verdict: ConvergenceVerdict;
  let advice: string;
  const ratio = eps21 / eps32;
  if (zero(eps21) || zero(eps32)) {
    const both = zero(eps21) && zero(eps32);
    uncertainty = both ? 0 : Number.NaN;
    behaviour = 'zero_difference';
    verdict = both ? 'converged' : 'unreliable';
    advice = both
      ? 'the three finest grids agree exactly: no discretisation error is visible at these resolutions'
      : 'two neighbouring grids agree exactly while the third differs: the order cannot be estimated; add a finer level';
  } else if (ratio < 0) {
    // Oscillatory: the uncertainty is half the range of the three solutions (Stern et al. 2001, §"oscillatory").
    uncertainty = (Math.max(g1.phi, g2.phi, g3.phi) - Math.min(g1.phi, g2.phi, g3.phi)) / 2;
    apparentOrderP = apparentOrder(r21, r32, eps21, eps32);
    const within = uncertainty <= tolerance;
    behaviour = 'oscillatory';
    verdict = within ? 'converged' : 'refine';
    advice = within
      ? `oscillates between grids within ±${formatValue(uncertainty, unit)}, inside the tolerance`
      : `oscillates between grids by ±${formatValue(uncertainty, unit)}: refine the grid until the swing is inside the tolerance`;
  } else {
    const p = apparentOrder(r21, r32, eps21, eps32);
    apparentOrderP = p;
    if (ratio >= 1 || !(p > 0)) {
      uncertainty = Number.NaN;
      behaviour = 'divergent';
      verdict = 'unreliable';
      advice = 'differences do not shrink as the grid is refined: the grids are too coarse or something other than the cell size limits the accuracy';
    } else {
      const rp = r21 ** p;
      // φ_ext21 = (r21^p·φ1 − φ2)/(r21^p − 1) (Celik et al. 2008, eq. 4a).
      phiExtrapolated = (rp * g1.phi - g2.phi) / (rp - 1);
      // e_ext21 = |(φ_ext − φ1)/φ_ext| (eq. 5b); GCI_fine21 = Fs·e_a21/(r21^p − 1) (eq. 5c).
      extrapolatedRelativeError21 = Math.abs((phiExtrapolated - g1.phi) / phiExtrapolated);
      gciFine21 = (fs * relativeError21) / (rp - 1);
      uncertainty = (fs * Math.abs(eps21)) / (rp - 1);
      const within = uncertainty <= tolerance;
      behaviour = 'monotone';
      verdict = within ? 'converged' : 'refine';
      advice = within
        ? `converges at order ${p.toFixed(2)}; the fine grid is within ±${formatValue(uncertainty, unit)} of the grid-independent value`
        : `converges at order ${p.toFixed(2)} but the fine grid is only within ±${formatValue(uncertainty, unit)}: refine the grid`;
    }
  }
  return {
    levels: sorted,
    h1: g1.h,
    h2: g2.h,
    h3: g3.h,
    phi1: g1.phi,
    phi2: g2.phi,
    phi3: g3.phi,
    r21,
    r32,
    eps21,
    eps32,
    apparentOrder: apparentOrderP,
    phiExtrapolated,
    relativeError21,
    extrapolatedRelativeError21,
    gciFine21,
    uncertainty,
    behaviour,
    verdict,
    advice,
  };
}

/** A value for the advice text: three significant digits and the unit (` dB`, ` °` or nothing). */
function formatValue(v: number, unit: string): string {
  return (Number.isFinite(v) ? v.toPrecision(3) : String(v)) + unit;
}

// ---- Grouping the runs of a sweep ----------------------------------------------------------------------------



export type ParamValue = string | number | boolean | null;

/**
 * Whether the relative errors of Celik et al. (e_a, e_ext, GCI as fractions of φ1) mean anything for an output: not
 * for a level in dB or a phase in degrees, whose zero is a convention (common practice: report such outputs'
 * discretisation error in their own unit).
 */
const RELATIVE_ERRORS_MEANINGFUL: Record<ConvergenceOutput, boolean> = { ez_db_uv_per_m: false, ez_phase_deg: false };

/** One finished run as the grouping needs it. */
export interface ConvergenceRun {
  /** The varied parameters (the resolution parameter may be among them; it is ignored for grouping). */
  params: Readonly<Record<string, ParamValue>>;
  /** Value of the resolution parameter of this run. */
  resolution: number;
  receivers: ReadonlyArray<{ range_m: number; height_m: number; ez_db_uv_per_m: number; ez_phase_deg: number }>;
}

export interface ConvergenceTableOptions {
  readonly axis: ResolutionAxis;
  /** Sweep column of the resolution parameter, left out of the grouping. @defaultValue `grid_<axis>` */
  readonly resolutionColumn?: string;
  /** Tolerance on field strength, dB. @defaultValue 0.2 (a Loamwave choice, not a published value) */
  readonly toleranceDb?: number;
  /** Tolerance on phase, degrees. @defaultValue 1 (a Loamwave choice, not a published value) */
  readonly tolerancePhaseDeg?: number;
}

/** Representative cell size of a resolution value: h ∝ 1/cpw, or h itself. */
export function cellSizeOf(axis: ResolutionAxis, resolution: number): number {
  return axis === 'cells_per_wavelength' ? 1 / resolution : resolution;
}

/** The group of a run: its other inputs, sorted, as JSON (the runs of a group differ only in resolution). */
export function convergenceGroupKey(params: Readonly<Record<string, ParamValue>>, skip: string): string {
  const keys = Object.keys(params).filter((k) => k !== skip).sort();
  return JSON.stringify(Object.fromEntries(keys.map((k) => [k, params[k]])));
}

/** `{"frequency_hz":20000}` → `frequency_hz = 20000`: a group's other inputs as text (`all runs` for `{}`). */
export function describeGroup(group: string): string {
  const entries = Object.entries(JSON.parse(group) as Record<string, unknown>);
  return entries.length === 0 ? 'all runs' : entries.map(([k, v]) => `${k} = ${String(v)}`).join(', ');
}

/**
 * Convergence rows for every group of runs that differ only in resolution and have at least three distinct
 * resolution levels, per receiver and output (field strength in dB, phase in degrees unwrapped against the
 * finest level). Groups with fewer levels give no rows. More than three levels: the three finest are analysed
 * and every level is listed.
 */
export function convergenceTable(runs: readonly ConvergenceRun[], options: ConvergenceTableOptions): ConvergenceRow[] {
  const column = options.resolutionColumn ?? `grid_${options.axis}`;
  const groups = new Map<string, ConvergenceRun[]>();
  for (const run of runs) {
    const key = convergenceGroupKey(run.params, column);
    const list = groups.get(key) ?? [];
    list.push(run);
    groups.set(key, list);
  }
  const rows: ConvergenceRow[] = [];
  const orNull = (v: number) => (Number.isFinite(v) ? v : null);
  for (const [group, list] of [...groups.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
    // One run per resolution level, finest first.
    const byLevel = new Map<number, ConvergenceRun>();
    for (const run of list) if (!byLevel.has(run.resolution)) byLevel.set(run.resolution, run);
    const ordered = [...byLevel.values()].sort(
      (a, b) => cellSizeOf(options.axis, a.resolution) - cellSizeOf(options.axis, b.resolution),
    );
    if (ordered.length < 3) continue;
    ordered[0].receivers.forEach((receiver, k) => {
      // The same receiver in each run: at the same place in the list when the runs share their receivers (the
      // usual case), else looked up.
      const at = ordered.map((run) => {
        const same = run.receivers[k];
        return same !== undefined && same.range_m === receiver.range_m && same.height_m === receiver.height_m
          ? same
          : run.receivers.find((r) => r.range_m === receiver.range_m && r.height_m === receiver.height_m);
      });
      if (at.some((r) => r === undefined)) return;
      for (const output of ConvergenceOutputSchema.options) {
        const raw = at.map((r) => r![output]);
        const values = output === 'ez_phase_deg' ? raw.map((v) => unwrapNearDeg(v, raw[0])) : raw;
        const tolerance = output === 'ez_phase_deg' ? (options.tolerancePhaseDeg ?? 1) : (options.toleranceDb ?? 0.2);
        const result = gridConvergence(
          ordered.map((run, k) => ({ h: cellSizeOf(options.axis, run.resolution), phi: values[k] })),
          { tolerance, unit: output === 'ez_phase_deg' ? '°' : 'dB' },
        );
        rows.push({
          group,
          output,
          range_m: receiver.range_m,
          height_m: receiver.height_m,
          resolution_axis: options.axis,
          resolution1: ordered[0].resolution,
          resolution2: ordered[1].resolution,
          resolution3: ordered[2].resolution,
          levels: ordered.length,
          levels_json: JSON.stringify(ordered.map((run, k) => [run.resolution, values[k]])),
          r21: result.r21,
          r32: result.r32,
          phi1: result.phi1,
          phi2: result.phi2,
          phi3: result.phi3,
          apparent_order: orNull(result.apparentOrder),
          phi_extrapolated: orNull(result.phiExtrapolated),
          // Relative errors divide by φ1: for a level in dB or a phase in degrees that depends on the dB reference
          // and on where phase zero sits, so they mean nothing here and stay null; the absolute ones carry the study.
          e_a21: RELATIVE_ERRORS_MEANINGFUL[output] ? orNull(result.relativeError21) : null,
          e_ext21: RELATIVE_ERRORS_MEANINGFUL[output] ? orNull(result.extrapolatedRelativeError21) : null,
          gci_fine21: RELATIVE_ERRORS_MEANINGFUL[output] ? orNull(result.gciFine21) : null,
          abs_diff21: Math.abs(result.phi1 - result.phi2),
          abs_ext21: orNull(Math.abs(result.phiExtrapolated - result.phi1)),
          uncertainty: orNull(result.uncertainty),
          tolerance,
          behaviour: result.behaviour,
          verdict: result.verdict,
          advice: result.advice,
        });
      }
    });
  }
  return rows;
}
