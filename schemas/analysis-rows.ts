// The rows of the analysis tables, convergence.parquet and sensitivity.parquet: the contract between the analysis,
// the Parquet writer (which derives its columns from these schemas), the report and a user's notebook.
import { z } from 'zod';

// --- convergence.parquet: grid convergence along a sweep's resolution axis (Celik et al., J. Fluids Eng. 130(7),
// 078001, 2008), one row per group of otherwise-equal runs, receiver and output.

/** How three solutions behave as the grid is refined (convergence ratio R = ε21/ε32 of Stern et al., J. Fluids Eng. 123, 2001). */
export const ConvergenceBehaviourSchema = z.enum([
  /** 0 < R < 1: differences shrink with refinement, one sign. */
  'monotone',
  /** R < 0: the solution swings from one side to the other. */
  'oscillatory',
  /** R >= 1, or no positive apparent order: differences do not shrink. */
  'divergent',
  /** ε21 or ε32 is zero: the order cannot be estimated. */
  'zero_difference',
]);
export type ConvergenceBehaviour = z.infer<typeof ConvergenceBehaviourSchema>;

/** What the user should do: results within tolerance, refine the grid, or distrust the resolution study. */
export const ConvergenceVerdictSchema = z.enum(['converged', 'refine', 'unreliable']);
export type ConvergenceVerdict = z.infer<typeof ConvergenceVerdictSchema>;

/** The resolution parameter of the sweep and how it maps to a cell size. */
export const ResolutionAxisSchema = z.enum([
  /** `grid.cells_per_wavelength`: h ∝ 1/cpw at a fixed frequency. */
  'cells_per_wavelength',
  /** `grid.cell_size_m`: h itself. */
  'cell_size_m',
]);
export type ResolutionAxis = z.infer<typeof ResolutionAxisSchema>;

export const ConvergenceOutputSchema = z.enum(['ez_db_uv_per_m', 'ez_phase_deg']);
export type ConvergenceOutput = z.infer<typeof ConvergenceOutputSchema>;

/** One row of convergence.parquet: one group of otherwise-equal runs, one receiver, one output. Flat columns only. */
export const ConvergenceRowSchema = z.strictObject({
  /** The other varied parameters of the group, as canonical JSON (`{}` when only the resolution varies). */
  group: z.string(),
  output: ConvergenceOutputSchema,
  range_m: z.number(),
  height_m: z.number(),
  resolution_axis: ResolutionAxisSchema,
  /** Resolution values of the three finest levels (the ones analysed), finest first. */
  resolution1: z.number(),
  resolution2: z.number(),
  resolution3: z.number(),
  /** Number of resolution levels of the group (three or more). */
  levels: z.number().int(),
  /**
   * Every level as JSON `[[resolution, value], …]`, finest first (phase unwrapped against the finest): a string so
   * that the table stays flat for Parquet.
   */
  levels_json: z.string(),
  r21: z.number(),
  r32: z.number(),
  phi1: z.number(),
  phi2: z.number(),
  phi3: z.number(),
  apparent_order: z.number().nullable(),
  phi_extrapolated: z.number().nullable(),
  /**
   * Relative errors |φ1 − φ2|/|φ1|, |φext − φ1|/|φext| and the GCI as a fraction (Celik et al. 2008, eqs. 5–7): null
   * for outputs in dB or degrees, where dividing by φ1 depends on the dB reference or on where phase zero sits, and
   * where φ1 = 0.
   */
  e_a21: z.number().nullable(),
  e_ext21: z.number().nullable(),
  gci_fine21: z.number().nullable(),
  /** |φ1 − φ2|, in the output's unit (dB or degrees). */
  abs_diff21: z.number(),
  /** |φext − φ1|, in the output's unit; null without an extrapolated value. */
  abs_ext21: z.number().nullable(),
  /** Uncertainty band of the finest run, in the output's unit (dB or degrees). */
  uncertainty: z.number().nullable(),
  tolerance: z.number(),
  behaviour: ConvergenceBehaviourSchema,
  verdict: ConvergenceVerdictSchema,
  advice: z.string(),
});
export type ConvergenceRow = z.infer<typeof ConvergenceRowSchema>;

// --- sensitivity.parquet: one row per output, parameter and measure (long form).

export const SensitivityMeasureSchema = z.enum([
  /** Sobol' first-order index S_i (Saltelli et al. 2010 estimator). */
  'first_order',
  /** Sobol' total-order index S_Ti (Jansen 1999 estimator). */
  'total_order',
  /** Standardised regression coefficient b_i·s_xi/s_y. */
  'src',
  /** Mean absolute elementary effect μ* (Campolongo, Cariboni & Saltelli 2007). */
  'mu_star',
  /** Mean elementary effect μ (Morris 1991). */
  'mu',
  /** Standard deviation of the elementary effects σ (Morris 1991). */
  'sigma',
]);
export type SensitivityMeasure = z.infer<typeof SensitivityMeasureSchema>;

export const SensitivityRowSchema = z.strictObject({
  /** Output analysed, e.g. `ez_db_uv_per_m@50000m`. */
  output: z.string(),
  /** Parameter column, named by its sweep path (e.g. `ground_segments_0_conductivity_s_per_m`). */
  parameter: z.string(),
  measure: SensitivityMeasureSchema,
  value: z.number(),
  /** Bootstrap confidence interval (null where the method gives none). */
  ci_low: z.number().nullable(),
  ci_high: z.number().nullable(),
  /** Confidence level of the interval, e.g. 0.95 (null without interval). */
  confidence: z.number().nullable(),
  /** Base sample size N (Saltelli), sample count (regression) or number of elementary effects (Morris). */
  samples: z.number().int(),
  /** Coefficient of determination of the linear fit, for `src` rows (null otherwise). */
  r_squared: z.number().nullable(),
});
export type SensitivityRow = z.infer<typeof SensitivityRowSchema>;
