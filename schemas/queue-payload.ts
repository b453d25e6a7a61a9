// What travels through the queue: the job data a worker receives (the case itself, so workers need no shared
// file system). The key names both sides derive from a sweep name are in queue-names.ts.
import { z } from 'zod';

/** Data of one queued job. The case is the validated case; the worker parses it again at its own edge. */
export const QueueJobDataSchema = z.strictObject({
  job_id: z.string().min(1),
  case: z.unknown(),
});
export type QueueJobData = z.infer<typeof QueueJobDataSchema>;
