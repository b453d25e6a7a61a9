// The result of one case: rms phasors (SI, e^{jωt}) at each receiver, the grid actually used, and warnings.
import { z } from 'zod';
import { GeometrySchema } from './case.js';

export const ComplexSchema = z.strictObject({ re: z.number(), im: z.number() });
export type Complex = z.infer<typeof ComplexSchema>;

export const ReceiverResultSchema = z.strictObject({
  range_m: z.number(),
  height_m: z.number(),
  /** Vertical electric field, V/m rms (V/m per unit length of source for planar). */
  ez: ComplexSchema,
  /** Horizontal electric field (Er or Ex), V/m rms. */
  e_horizontal: ComplexSchema,
  /** Magnetic field (Hφ or Hy), A/m rms. */
  h: ComplexSchema,
  /** 20·log10(|Ez| / 1 µV/m). */
  ez_db_uv_per_m: z.number(),
  /** Phase of Ez relative to the source current, degrees, in (−180, 180]. */
  ez_phase_deg: z.number(),
});
export type ReceiverResult = z.infer<typeof ReceiverResultSchema>;

export const GridReportSchema = z.strictObject({
  cell_size_m: z.number(),
  time_step_s: z.number(),
  steps: z.number().int(),
  steps_per_period: z.number().int(),
  cells_range: z.number().int(),
  cells_height: z.number().int(),
  cells_ground: z.number().int(),
  cells_total: z.number().int(),
  courant: z.number(),
  memory_bytes: z.number().int(),
  cell_updates: z.number(),
  settled: z.boolean(),
  /** Largest relative change of the receiver phasors between the last two DFT windows. */
  settling_change: z.number(),
});
export type GridReport = z.infer<typeof GridReportSchema>;

export const SolveResultSchema = z.strictObject({
  solver_version: z.string(),
  geometry: GeometrySchema,
  frequency_hz: z.number(),
  receivers: z.array(ReceiverResultSchema),
  grid: GridReportSchema,
  warnings: z.array(z.string()),
});
export type SolveResult = z.infer<typeof SolveResultSchema>;

/** A solve result as the worker returns it: with the job id and the wall time, which the pure solver cannot know. */
export const JobResultSchema = SolveResultSchema.extend({
  job_id: z.string(),
  wall_time_s: z.number(),
});
export type JobResult = z.infer<typeof JobResultSchema>;
