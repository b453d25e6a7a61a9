// The rows Loamwave stores and publishes, declared once: a job as the ledger holds it, a row of runs.parquet and a
// row of fields/. The Parquet column lists are derived from these schemas (coordinator/outputs/columns.ts), the
// ledger's row types from the job schema, so a column means the same in the ledger, the files and a notebook.
import { z } from 'zod';
import type { Case } from './case.js';

/** Where a job is: pending (not yet sent), queued, running, done (result committed) or failed (reason kept). */
export const JobStatusSchema = z.enum(['pending', 'queued', 'running', 'done', 'failed']);
export type JobStatus = z.infer<typeof JobStatusSchema>;
export const JOB_STATUSES = JobStatusSchema.options;

/** Times in milliseconds since 1970 (INT64 in Parquet: the writer's own timestamp type cannot be read back). */
const epochMs = z.number().int().nullable();

/** A job as the ledger holds it. */
export const LedgerJobSchema = z.object({
  job_id: z.string(),
  /** Position of the job in the sweep's expansion. */
  index: z.number().int(),
  /** The varied parameters of the job, by sweep path. */
  params: z.record(z.string(), z.union([z.number(), z.string()])),
  /** The validated case (the schema of schemas/case.ts), as stored. */
  case: z.custom<Case>(),
  status: JobStatusSchema,
  /** Times the job was started (markRunning) or the count a failure reported, whichever is larger. */
  attempts: z.number().int(),
  error: z.string().nullable(),
  queued_at_ms: epochMs,
  started_at_ms: epochMs,
  finished_at_ms: epochMs,
  /** Sampled designs: `A`, `B`, `AB_<i>` or `LHS`; null for a full factorial. */
  design_role: z.string().nullable(),
  design_sample: z.number().int().nullable(),
});
export type LedgerJob = z.infer<typeof LedgerJobSchema>;

/** The first columns of runs.parquet, before the varied parameters (one column each, named by columnNameFor). */
export const RunKeySchema = z.object({
  job_id: z.string(),
  index: z.number().int(),
  status: JobStatusSchema,
});

/** The columns of runs.parquet after the varied parameters; null where a job does not have the value yet. */
export const RunFactsSchema = z.object({
  design_role: z.string().nullable(),
  design_sample: z.number().int().nullable(),
  cell_size_m: z.number().nullable(),
  time_step_s: z.number().nullable(),
  steps: z.number().int().nullable(),
  steps_per_period: z.number().int().nullable(),
  cells_total: z.number().int().nullable(),
  memory_bytes: z.number().int().nullable(),
  /** A DOUBLE, not an INT64: cell updates can pass 2^53, beyond what the Parquet writer stores exactly. */
  cell_updates: z.number().nullable(),
  settled: z.boolean().nullable(),
  settling_change: z.number().nullable(),
  wall_time_s: z.number().nullable(),
  solver_version: z.string().nullable(),
  /** The job's warnings joined with "; ". */
  warnings: z.string().nullable(),
  error: z.string().nullable(),
  attempts: z.number().int().nullable(),
  queued_at_ms: epochMs,
  started_at_ms: epochMs,
  finished_at_ms: epochMs,
});
export type RunFacts = z.infer<typeof RunFactsSchema>;

/** The first columns of a fields/ row (one row per job and receiver), before the varied parameters. */
export const FieldRowSchema = z.object({
  job_id: z.string(),
  index: z.number().int(),
  range_m: z.number(),
  height_m: z.number(),
  /** Rms phasors, SI units, e^{jωt}: Ez, the horizontal E (Er or Ex) and H (Hφ or Hy). */
  ez_re: z.number(),
  ez_im: z.number(),
  e_horizontal_re: z.number(),
  e_horizontal_im: z.number(),
  h_re: z.number(),
  h_im: z.number(),
  ez_db_uv_per_m: z.number(),
  ez_phase_deg: z.number(),
});
export type FieldRow = z.infer<typeof FieldRowSchema>;

/** A column name fit for Parquet and SQL: `ground.segments[0].conductivity_s_per_m` → `ground_segments_0_conductivity_s_per_m`. */
export function columnNameFor(path: string): string {
  return path.replace(/[.[\]]+/g, '_').replace(/_+$/, '');
}
