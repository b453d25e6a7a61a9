// What the HTML report shows, as one plain data structure: the report builder takes it and returns HTML, so it can
// be filled from an output folder (the `report` command) or from numbers computed in a test. No I/O here.
import { z } from 'zod';
import { ConvergenceRowSchema } from '../../schemas/analysis-rows.js';
import { SensitivityRowSchema } from '../../schemas/analysis-rows.js';

export { CellSchema, type Cell } from '../analysis/read-tables.js';
import { CellSchema } from '../analysis/read-tables.js';
import { FieldSummarySchema, MAX_DRAWN_RUNS } from '../analysis/field-spread.js';
export { FieldSummarySchema, type FieldSummary, type FieldSpread, type DrawnRun } from '../analysis/field-spread.js';

/**
 * Most rows the report's data holds for a table (runs, curvature) and the page shows of any table or warning list;
 * every row is in the Parquet files the page points to. Bounds the page whatever the sweep's size.
 */
export const MAX_TABLE_ROWS = 200;

/** Most lines (group and receiver) drawn in a convergence plot; beyond it an even choice (the table has them all). */
export const MAX_CONVERGENCE_LINES = MAX_DRAWN_RUNS;

/** Most sensitivity charts (one per output and family of measures); the rest are in the table. */
export const MAX_SENSITIVITY_CHARTS = 12;

export const VariedInputSchema = z.strictObject({
  /** Sweep path, e.g. `ground.segments[0].conductivity_s_per_m`. */
  path: z.string(),
  /** Its column in runs.parquet, e.g. `ground_segments_0_conductivity_s_per_m`. */
  column: z.string(),
  /** Smallest and largest value among the runs (null for text values). */
  min: z.number().nullable(),
  max: z.number().nullable(),
  /** Number of distinct values among the runs. */
  distinct: z.number().int().min(0),
});
export type VariedInput = z.infer<typeof VariedInputSchema>;

export const WarningKindSchema = z.enum([
  /** The surface-impedance model is near or past its validity limit for a run. */
  'impedance_validity',
  /** The resolution study says a mesh is not converged (or cannot tell). */
  'unconverged_mesh',
  /** A job failed. */
  'failed_job',
  /** Any other warning a run reported. */
  'solver',
]);
export type WarningKind = z.infer<typeof WarningKindSchema>;

export const ReportWarningSchema = z.strictObject({
  kind: WarningKindSchema,
  job_id: z.string().nullable(),
  message: z.string(),
});
export type ReportWarning = z.infer<typeof ReportWarningSchema>;

/**
 * One receiver of a sweep that sets a flat geometry against a spherical earth: the sphere's field minus the flat
 * field, for runs otherwise equal. What curvature does, at a glance.
 */
export const CurvatureRowSchema = z.strictObject({
  /** The other varied inputs of the pair, as `path=value` text (empty when only the earth model varies). */
  group: z.string(),
  /** Radius of the spherical run, m. */
  earth_radius_m: z.number(),
  range_m: z.number(),
  flat_db: z.number(),
  sphere_db: z.number(),
  /** sphere_db − flat_db: negative where the flat earth overstates the field. */
  difference_db: z.number(),
  /** Phase of the sphere's Ez minus the flat one's, degrees, within ±180°. */
  phase_difference_deg: z.number(),
});
export type CurvatureRow = z.infer<typeof CurvatureRowSchema>;

export const ReportDataSchema = z.strictObject({
  title: z.string(),
  /** Program and version that made the report, e.g. `loamwave 1.0.0`. */
  generated_by: z.string(),
  sweep: z.strictObject({
    name: z.string(),
    description: z.string().nullable(),
    /** The sweep file in the output folder, by name. */
    file_name: z.string().nullable(),
    /** `full_factorial`, `latin_hypercube` or `saltelli` (with its sample count and seed where it has them). */
    design: z.string(),
    /** The varied `grid.*` path judged for convergence, or null. */
    resolution_axis: z.string().nullable(),
    varied: z.array(VariedInputSchema),
    jobs: z.strictObject({
      total: z.number().int().min(0),
      done: z.number().int().min(0),
      failed: z.number().int().min(0),
      pending: z.number().int().min(0),
    }),
    wall_time_s_total: z.number().min(0),
  }),
  /** Field strength and residual phase against range: per-group quantiles and a few runs (bounded in size). */
  fields: FieldSummarySchema,
  /** Rows of convergence.parquet: all of them, or the first MAX_TABLE_ROWS when there are more (see the summary). */
  convergence: z.array(ConvergenceRowSchema),
  /** When `convergence` holds only the first rows: how many rows there are, their verdicts and rows per output. */
  convergence_summary: z
    .strictObject({
      rows: z.number().int().min(0),
      verdicts: z.record(z.string(), z.number().int().min(0)),
      rows_per_output: z.record(z.string(), z.number().int().min(0)),
    })
    .nullable()
    .default(null),
  /** The rows the convergence plots draw when `convergence` holds only the first rows (null: draw from it). */
  convergence_plotted: z.array(ConvergenceRowSchema).nullable().default(null),
  /** Rows of sensitivity.parquet: the first MAX_TABLE_ROWS and every row of the outputs charted, in table order. */
  sensitivity: z.array(SensitivityRowSchema),
  /** How many sensitivity rows there are in all; null when `sensitivity` holds them all. */
  sensitivity_total: z.number().int().min(0).nullable().default(null),
  /** How the sensitivity rows were obtained, when the reader needs to know (e.g. which grid level they use). */
  sensitivity_note: z.string().nullable().default(null),
  /**
   * Flat against sphere, when the sweep varies `geometry` over both (empty otherwise): the rows of at most
   * MAX_CURVATURE_LINES pairs, at most MAX_RANGES_PER_LINE ranges each (all of them in a small sweep).
   */
  curvature: z.array(CurvatureRowSchema).default([]),
  /** How many curvature rows and pairs (radius and group) there are in all; null when `curvature` holds them all. */
  curvature_total: z.strictObject({ rows: z.number().int().min(0), lines: z.number().int().min(0) }).nullable().default(null),
  runs: z.strictObject({
    columns: z.array(z.string()),
    /** The first MAX_TABLE_ROWS rows of runs.parquet at most. */
    rows: z.array(z.array(CellSchema)).max(MAX_TABLE_ROWS),
    /** Rows in runs.parquet (the table may show fewer). */
    total: z.number().int().min(0),
  }),
  /** At most MAX_TABLE_ROWS warnings of each kind (the page shows no more). */
  warnings: z.array(ReportWarningSchema),
  /** Warnings of each kind in all, when some kind had more than `warnings` holds; null otherwise. */
  warning_counts: z.record(z.string(), z.number().int().min(0)).nullable().default(null),
});
export type ReportData = z.output<typeof ReportDataSchema>;
/** Report data as a caller may give it (defaults not yet filled in). */
export type ReportDataInput = z.input<typeof ReportDataSchema>;
