// One row of the sensitivity table (sensitivity.parquet and the report's bar charts), in long form: one row per
// output, parameter and measure. The schema is the contract between the analysis, the Parquet writer and the report.
import { z } from 'zod';

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
