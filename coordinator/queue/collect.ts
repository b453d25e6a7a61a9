// Moves finished jobs from Redis into the ledger: each completed job's result is committed (one transaction)
// before the job is removed from Redis, and each failed job's reason is recorded before it is removed, so a
// crash anywhere loses nothing (a result committed twice is kept once). The coordinator is the ledger's only writer.
import type { Job } from 'bullmq';
import { JobResultSchema } from '../../schemas/result.js';
import type { Ledger } from '../ledger/ledger.js';
import type { QueueHandles } from './target.js';

/** Jobs fetched per round trip. */
const PAGE = 200;

export interface CollectSummary {
  /** Results committed to the ledger and removed from Redis. */
  readonly committed: number;
  /** Failures recorded in the ledger and removed from Redis. */
  readonly failed: number;
  /** Finished jobs left in Redis because the ledger does not hold them (another output folder's jobs). */
  readonly foreign: number;
  /** Ids of the jobs committed or recorded as failed in this round. */
  readonly finishedIds: readonly string[];
}

/** Collect every completed and failed job the queue holds now. */
export async function collectOnce(handles: QueueHandles, ledger: Ledger): Promise<CollectSummary> {
  let committed = 0;
  let failed = 0;
  let foreign = 0;
  const finishedIds: string[] = [];
  for (const kind of ['completed', 'failed'] as const) {
    let skip = 0;
    for (;;) {
      const page: Job[] =
        kind === 'completed'
          ? await handles.queue.getCompleted(skip, skip + PAGE - 1)
          : await handles.queue.getFailed(skip, skip + PAGE - 1);
      if (page.length === 0) break;
      for (const job of page) {
        if (!job?.id) continue;
        if (!ledger.get(job.id)) {
          foreign++;
          skip++;
          continue;
        }
        if (kind === 'completed') {
          const r = JobResultSchema.safeParse(job.returnvalue);
          if (r.success && r.data.job_id === job.id) {
            ledger.commitResult(r.data);
            committed++;
          } else {
            ledger.markFailed(job.id, 'internal: the worker returned an unreadable result', job.attemptsMade);
            failed++;
          }
        } else {
          ledger.markFailed(job.id, job.failedReason || 'failed without a reason', job.attemptsMade);
          failed++;
        }
        finishedIds.push(job.id);
        // Only now, with the outcome durable in the ledger, does the job leave Redis.
        await job.remove();
      }
      if (page.length < PAGE) break;
    }
  }
  return { committed, failed, foreign, finishedIds };
}

/** Fraction done of each job being solved now, from the progress the workers report (percent). */
export async function activeProgress(handles: QueueHandles): Promise<Map<string, number>> {
  const out = new Map<string, number>();
  for (const job of await handles.queue.getActive(0, 999)) {
    if (!job?.id) continue;
    const p = typeof job.progress === 'number' ? job.progress / 100 : 0;
    out.set(job.id, Math.min(1, Math.max(0, p)));
  }
  return out;
}

/** Jobs Redis holds for the sweep in any state (0 when the queue was lost, e.g. Redis restarted without persistence). */
export async function jobsInRedis(handles: QueueHandles): Promise<number> {
  const counts = await handles.queue.getJobCounts(
    'waiting', 'active', 'delayed', 'prioritized', 'completed', 'failed', 'waiting-children',
  );
  return Object.values(counts).reduce((a, b) => a + b, 0);
}

export interface FollowOptions {
  /** Called after every collection round. */
  readonly onRound?: (summary: CollectSummary) => void | Promise<void>;
  /** Aborting ends the follow after the current round. */
  readonly signal?: AbortSignal;
  /** Longest wait between rounds when no event arrives, ms. @defaultValue 1000 */
  readonly pollMs?: number;
  /** Called when the ledger expects jobs that Redis no longer holds at all; may resubmit them. */
  readonly onLost?: (missing: number) => Promise<void>;
}

/**
 * Collect until every ledger job is done or failed (returns true) or `signal` aborts (returns false). Wakes on the
 * queue's completed and failed events, with a poll as a fallback.
 */
export async function followCollection(handles: QueueHandles, ledger: Ledger, opts: FollowOptions = {}): Promise<boolean> {
  const events = handles.queueEvents();
  let wake: (() => void) | undefined;
  const onEvent = () => wake?.();
  events.on('completed', onEvent);
  events.on('failed', onEvent);
  opts.signal?.addEventListener('abort', onEvent);
  await events.waitUntilReady();
  try {
    for (;;) {
      const summary = await collectOnce(handles, ledger);
      await opts.onRound?.(summary);
      const c = ledger.counts();
      const outstanding = c.pending + c.queued + c.running;
      if (outstanding === 0) return true;
      if (opts.signal?.aborted) return false;
      if (summary.committed + summary.failed === 0 && opts.onLost && (await jobsInRedis(handles)) === 0) {
        await opts.onLost(outstanding);
      }
      await new Promise<void>((resolve) => {
        const t = setTimeout(resolve, opts.pollMs ?? 1000);
        wake = () => {
          clearTimeout(t);
          resolve();
        };
      });
      wake = undefined;
    }
  } finally {
    events.off('completed', onEvent);
    events.off('failed', onEvent);
    opts.signal?.removeEventListener('abort', onEvent);
  }
}

/** The sweep is complete: take its queue out of the registry so workers stop serving it, and drop its keys. */
export async function retireQueue(handles: QueueHandles): Promise<void> {
  await handles.client.srem(handles.registryKey, handles.target.queueName);
  try {
    await handles.queue.obliterate({ force: false });
  } catch {
    // a job still active (a twin add racing the end) keeps the queue; it is harmless and collected next time
  }
}
