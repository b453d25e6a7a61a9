// What travels through the queue: the job data a worker receives (the case itself, so workers need no shared
// file system) and the key names both the submitting coordinator and the workers derive from a sweep name.
import { z } from 'zod';

/** Data of one queued job. The case is the validated case; the worker parses it again at its own edge. */
export const QueueJobDataSchema = z.strictObject({
  job_id: z.string().min(1),
  case: z.unknown(),
});
export type QueueJobData = z.infer<typeof QueueJobDataSchema>;

/** BullMQ key prefix used when none is given (`--prefix`). */
export const DEFAULT_QUEUE_PREFIX = 'loamwave';

/** Queue names of sweeps start with this, so no queue can collide with the registry key below. */
const QUEUE_NAME_PREFIX = 'sweep-';

/**
 * Queue name of a sweep: `sweep-` + the sweep name with every character other than letters, digits, `-`, `_`
 * and `.` replaced by `-` (BullMQ forbids `:` in queue names, and the name appears in Redis keys).
 */
export function queueNameFor(sweepName: string): string {
  return QUEUE_NAME_PREFIX + sweepName.replace(/[^A-Za-z0-9._-]/g, '-');
}

/** Redis set listing the queue names that have work, so a worker started with only a URL finds them. */
export function registryKey(prefix: string): string {
  return `${prefix}:registry`;
}
