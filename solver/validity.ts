// Every check a case must pass before the solver takes its first step, in one place: solve() runs it, and the
// sweep expansion runs it on every job before anything is queued or written, so a case the solver would refuse is
// refused at plan time with the same line. Pure: no I/O; a refusal is a UserError naming the field and the fix.
import type { Case } from '../schemas/case.js';
import { UserError } from '../schemas/errors.js';
import { planGrid, type GridPlan } from './grid.js';
import { groundImpedance } from './surface-impedance.js';

/** Loss tangent below which the impedance model draws a warning (rule of thumb: common practice). */
export const LOSS_TANGENT_WARN = 10;
/**
 * Loss tangent below which the surface-impedance model is refused: the Leontovich condition needs the ground's
 * refractive index large against 1, |ε_c| ≫ 1 with conduction dominating (Senior & Volakis, Approximate Boundary
 * Conditions in Electromagnetics, 1995, ch. 2); below σ/(ωε) = 1 displacement current dominates.
 */
export const LOSS_TANGENT_MIN = 1;

/** Limits of the machine that will run the case; checked only when given. */
export interface SolveLimits {
  /**
   * Largest memory one case may need, bytes (compared with the grid's `memoryBytes`).
   * @defaultValue no limit
   */
  readonly maxMemoryBytes?: number;
}

/** A case that passed every check: its grid plan (computed once) and the warnings the solve carries. */
export interface SolvableCase {
  readonly grid: GridPlan;
  readonly warnings: string[];
}

/**
 * The checks, in order: the ground model's validity (loss tangent of each impedance segment), the source and the
 * receivers inside the computed region, the grid (cell counts, the sphere's radius and antipode: `planGrid`), and
 * the memory limit when one is given. Throws UserError (code `loamwave.case.impedance_invalid`,
 * `loamwave.case.invalid` or `loamwave.case.too_large`) with one line naming the field and the fix.
 */
export function checkSolvable(c: Case, limits: SolveLimits = {}): SolvableCase {
  const warnings = impedanceValidity(c);
  regionChecks(c);
  const grid = planGrid(c);
  const cap = limits.maxMemoryBytes;
  if (cap !== undefined && grid.memoryBytes > cap) {
    throw new UserError(
      `grid: the case needs about ${mib(grid.memoryBytes)} MiB (${grid.nx} × ${grid.nz} cells), more than the ${mib(cap)} MiB allowed per case; ` +
        'coarsen grid.cells_per_wavelength or grid.cell_size_m, shrink the domain, or allow more memory per case',
      'loamwave.case.too_large',
    );
  }
  return { grid, warnings };
}

/** Refuses an impedance ground below loss tangent 1; warns below LOSS_TANGENT_WARN. */
function impedanceValidity(c: Case): string[] {
  const warnings: string[] = [];
  if (c.ground.model !== 'impedance') return warnings;
  (c.ground.segments ?? []).forEach((s, i) => {
    const z = groundImpedance(c.frequency_hz, s.conductivity_s_per_m, s.relative_permittivity);
    const where = `ground.segments[${i}]`;
    if (!(z.lossTangent >= LOSS_TANGENT_MIN)) {
      throw new UserError(
        `${where}: loss tangent σ/(ωε0εr) = ${z.lossTangent.toPrecision(3)} is below ${LOSS_TANGENT_MIN}, outside the surface-impedance model's validity; use "ground": {"model": "resolved"} for this ground`,
        'loamwave.case.impedance_invalid',
      );
    }
    if (z.lossTangent < LOSS_TANGENT_WARN) {
      warnings.push(
        `${where}: loss tangent ${z.lossTangent.toPrecision(3)} < ${LOSS_TANGENT_WARN}: the surface-impedance model is near its validity limit; cross-check with ground model "resolved"`,
      );
    }
  });
  return warnings;
}

/**
 * The source and the receivers must lie below the top of the computed region: domain.height_m, or the ceiling of
 * a `pec` upper boundary (which closes the grid there). Above it the source would sit in the absorbing layer or
 * beyond the ceiling, and a receiver's taps would extrapolate past the last row. (The case schema holds the
 * receivers to domain.range_m and domain.height_m; the ceiling it cannot know per receiver.)
 */
function regionChecks(c: Case): void {
  const ceiling = c.upper_boundary.kind === 'pec' ? c.upper_boundary.height_m : undefined;
  const topM = ceiling ?? c.domain.height_m;
  const topName = ceiling !== undefined ? 'upper_boundary.height_m' : 'domain.height_m';
  if (!(c.source.height_m < topM)) {
    throw new UserError(
      `source.height_m: must be below ${topName} (${topM}) (got ${c.source.height_m}); lower the source or raise ${topName}`,
      'loamwave.case.invalid',
    );
  }
  if (ceiling !== undefined && !(c.receivers.height_m < ceiling)) {
    throw new UserError(
      `receivers.height_m: must be below the ceiling upper_boundary.height_m (${ceiling}) (got ${c.receivers.height_m}); lower the receivers or raise the ceiling`,
      'loamwave.case.invalid',
    );
  }
}

function mib(bytes: number): string {
  return (bytes / 2 ** 20).toFixed(bytes < 2 ** 20 ? 3 : 0);
}
