// The Redis key names the submitting coordinator and the workers both derive from a sweep name. Plain strings, no
// schema library, so the command line can name its defaults without loading one.

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
