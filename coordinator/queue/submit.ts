// Puts a sweep's outstanding jobs on its BullMQ queue, idempotently: a job done or failed in the ledger, or
// already in Redis in any state, is not added again. Priorities come from the estimated cost so that the longest
// jobs start first; retries with exponential backoff cover crashes, never deterministic failures.
import type { JobsOptions } from 'bullmq';
import type { QueueJobData } from '../../schemas/queue-payload.js';
import type { Ledger, LedgerJob } from '../ledger/ledger.js';
import type { QueueHandles } from './target.js';

/** Highest priority number BullMQ accepts (2^21 − 1; BullMQ docs, "Prioritized": 1 is the highest priority). */
export const PRIORITY_LIMIT = 2 ** 21 - 1;
/** Tries of a job whose worker crashed or hit an internal error (deterministic failures are not retried). */
export const JOB_ATTEMPTS = 3;
/** First retry delay, ms; doubles each retry (BullMQ's exponential backoff: delay·2^(attempt−1)). */
export const BACKOFF_DELAY_MS = 5_000;
/** Jobs added (and keys checked) per round trip. */
const BATCH = 1_000;
/** log10 of the largest cost the priority scale resolves (1e18 cell updates: far beyond any real case). */
const LOG10_COST_MAX = 18;

/**
 * BullMQ priority for a job of `cellUpdates` estimated cell updates: lower numbers run first, so the priority
 * falls as the cost grows, 1 + ⌊(18 − log10 cost)·10^5⌋ clamped to [1, 2^21 − 1]. The scale is absolute, so jobs
 * submitted at different times still order by cost; costs a factor 1.00002 apart can share a priority.
 */
export function priorityForCost(cellUpdates: number): number {
  const logCost = Math.log10(Math.max(1, cellUpdates));
  const p = 1 + Math.floor((LOG10_COST_MAX - Math.min(LOG10_COST_MAX, logCost)) * 1e5);
  return Math.min(PRIORITY_LIMIT, Math.max(1, p));
}

export interface SubmitSummary {
  /** Jobs added to Redis now. */
  readonly added: number;
  /** Outstanding jobs that were already in Redis. */
  readonly alreadyQueued: number;
  /** Jobs the ledger holds as done or failed (not submitted). */
  readonly finished: number;
}

/** Submit every outstanding ledger job (pending, queued, running) that Redis does not hold. */
export async function submitSweep(
  handles: QueueHandles,
  ledger: Ledger,
  costById: ReadonlyMap<string, number>,
): Promise<SubmitSummary> {
  const all = ledger.list();
  const outstanding = all.filter((j) => j.status === 'pending' || j.status === 'queued' || j.status === 'running');
  // Register the queue first, so that workers started with only the URL find it.
  await handles.client.sadd(handles.registryKey, handles.target.queueName);
  let added = 0;
  let alreadyQueued = 0;
  for (let i = 0; i < outstanding.length; i += BATCH) {
    const batch = outstanding.slice(i, i + BATCH);
    const present = await existingInRedis(handles, batch);
    const missing = batch.filter((_, k) => !present[k]);
    alreadyQueued += batch.length - missing.length;
    if (missing.length > 0) {
      await handles.queue.addBulk(
        missing.map((j) => ({ name: 'solve', data: payloadOf(j), opts: jobOptions(j, costById.get(j.job_id) ?? 1) })),
      );
      added += missing.length;
    }
    ledger.markQueued(batch.filter((j) => j.status !== 'queued').map((j) => j.job_id));
  }
  return { added, alreadyQueued, finished: all.length - outstanding.length };
}

function payloadOf(j: LedgerJob): QueueJobData {
  return { job_id: j.job_id, case: j.case };
}

function jobOptions(j: LedgerJob, cost: number): JobsOptions {
  return {
    // The job id is the content hash: BullMQ ignores a second add of an id it holds in any state.
    jobId: j.job_id,
    priority: priorityForCost(cost),
    attempts: JOB_ATTEMPTS,
    backoff: { type: 'exponential', delay: BACKOFF_DELAY_MS },
    // `collect` removes jobs once their outcome is in the ledger; nothing is dropped before.
    removeOnComplete: false,
    removeOnFail: false,
  };
}

/** Whether each job's hash exists in Redis (one pipelined round trip per batch). */
async function existingInRedis(handles: QueueHandles, jobs: readonly LedgerJob[]): Promise<boolean[]> {
  const pipe = handles.client.pipeline();
  for (const j of jobs) pipe.exists(handles.queue.toKey(j.job_id));
  const replies = (await pipe.exec()) ?? [];
  return replies.map(([err, n]) => {
    if (err) throw err;
    return n === 1;
  });
}
