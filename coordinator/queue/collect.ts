// Moves finished jobs from Redis into the ledger: each completed job's result is committed (one transaction)
// before the job is removed from Redis, and each failed job's reason is recorded before it is removed, so a
// crash anywhere loses nothing (a result committed twice is kept once). The coordinator is the ledger's only writer.
import type { Job } from 'bullmq';
import { CaseSchema } from '../../schemas/case.js';
import { formatIssue } from '../../schemas/errors.js';
import { QueueJobDataSchema } from '../../schemas/queue-payload.js';
import { JobResultSchema, type JobResult } from '../../schemas/result.js';
import { CLOSE_LIMIT_MS, closeWithin } from '../../worker/redis-connection.js';
import { resultKeyFromEnv, SealedResultSchema, sealRefusal } from '../../worker/result-seal.js';
import type { Ledger, LedgerJob } from '../ledger/ledger.js';
import { jobIdFor } from '../sweep/job-id.js';
import type { QueueHandles } from './target.js';

/** Jobs fetched per round trip. */
const PAGE = 200;

/** A result the collector would not let into the ledger, and why. */
export interface Refusal {
  readonly job_id: string;
  readonly reason: string;
}

export interface CollectSummary {
  /** Results committed to the ledger and removed from Redis. */
  readonly committed: number;
  /** Failures recorded in the ledger and removed from Redis (refused results among them). */
  readonly failed: number;
  /** Finished jobs left in Redis because the ledger does not hold them (another output folder's jobs). */
  readonly foreign: number;
  /** Results refused in this round (each also logged): forged or stray ones, and foreign jobs first seen now. */
  readonly refused: readonly Refusal[];
  /** Ids of the jobs committed or recorded as failed in this round. */
  readonly finishedIds: readonly string[];
}

export interface CollectOptions {
  /**
   * Key shared with the workers: with one, a result must carry a valid HMAC-SHA256 (worker/result-seal.ts).
   * @defaultValue the LOAMWAVE_RESULT_KEY environment variable, when set
   */
  readonly resultKey?: string;
  /** Where the one-line refusal notices go. @defaultValue stderr */
  readonly log?: (line: string) => void;
  /** Foreign job ids already reported, so that each is logged once however many rounds see it. */
  readonly seenForeign?: Set<string>;
}

const short = (id: string) => id.slice(0, 12);

/**
 * Why the result BullMQ holds for `job` may not enter the ledger (undefined: it may). A result is accepted only
 * when the job's id is the hash of the case the ledger holds for it and of the case the job carried, the value
 * carries a valid seal when a key is set, it is a valid result (schemas/result.ts), and it names the job's id.
 */
export function refusalOf(job: Job, entry: LedgerJob, key: string | undefined): { reason: string } | { result: JobResult } {
  const id = job.id!;
  if (jobIdFor(entry.case) !== id) return { reason: `the case the ledger holds does not hash to the job id` };
  const data = QueueJobDataSchema.safeParse(job.data);
  if (!data.success || data.data.job_id !== id) return { reason: 'the queued job data does not carry the job id' };
  const queued = CaseSchema.safeParse(data.data.case);
  if (!queued.success) return { reason: 'the queued case is not a valid case' };
  const queuedId = jobIdFor(queued.data);
  if (queuedId !== id) return { reason: `the queued case hashes to ${short(queuedId)}…, not to the job id` };
  const sealed = SealedResultSchema.safeParse(job.returnvalue);
  if (!sealed.success) return { reason: 'the returned value is not a loamwave result' };
  const badSeal = sealRefusal(sealed.data, key);
  if (badSeal) return { reason: badSeal };
  const r = JobResultSchema.safeParse(sealed.data.result);
  if (!r.success) return { reason: `the result is invalid: ${formatIssue(r.error.issues[0]!)}` };
  if (r.data.job_id !== id) return { reason: `the result carries job id ${short(r.data.job_id)}…, not the job's` };
  return { result: r.data };
}

/** The one-line notice of a refused result. */
export function refusalNotice(r: Refusal): string {
  return `refused result of job ${r.job_id}: ${r.reason}`;
}

/** Collect every completed and failed job the queue holds now. */
export async function collectOnce(handles: QueueHandles, ledger: Ledger, opts: CollectOptions = {}): Promise<CollectSummary> {
  const key = opts.resultKey ?? resultKeyFromEnv();
  const log = opts.log ?? ((line: string) => process.stderr.write(`${line}\n`));
  const seenForeign = opts.seenForeign ?? new Set<string>();
  let committed = 0;
  let failed = 0;
  let foreign = 0;
  const refused: Refusal[] = [];
  const refuse = (job_id: string, reason: string) => {
    refused.push({ job_id, reason });
    log(refusalNotice({ job_id, reason }));
  };
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
        const entry = ledger.get(job.id);
        if (!entry) {
          // Another output folder's job on a shared queue: not ours to accept or to remove.
          foreign++;
          skip++;
          if (kind === 'completed' && !seenForeign.has(job.id)) {
            seenForeign.add(job.id);
            refuse(job.id, "not a job of this sweep's ledger (left in Redis)");
          }
          continue;
        }
        if (kind === 'completed') {
          const verdict = refusalOf(job, entry, key);
          if ('result' in verdict) {
            ledger.commitResult(verdict.result);
            committed++;
          } else {
            refuse(job.id, verdict.reason);
            ledger.markFailed(job.id, `refused: ${verdict.reason}`, job.attemptsMade);
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
  return { committed, failed, foreign, refused, finishedIds };
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
  /** How results are checked and refusals logged (see collectOnce). */
  readonly collect?: CollectOptions;
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
  const collectOpts: CollectOptions = { seenForeign: new Set(), ...opts.collect };
  try {
    for (;;) {
      const summary = await collectOnce(handles, ledger, collectOpts);
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

/**
 * The sweep is complete: take its queue out of the registry so workers stop serving it, and drop its keys. Within
 * CLOSE_LIMIT_MS: the ledger already holds everything, so a Redis that died at this moment must not hold the
 * command up; the queue is then left (harmless: workers find it empty, and the next collect retires it).
 */
export async function retireQueue(handles: QueueHandles, limitMs: number = CLOSE_LIMIT_MS): Promise<boolean> {
  const retired = await closeWithin(async () => {
    await handles.client.srem(handles.registryKey, handles.target.queueName);
    try {
      await handles.queue.obliterate({ force: false });
    } catch {
      // a job still active (a twin add racing the end) keeps the queue; it is harmless and collected next time
    }
  }, () => undefined, limitMs);
  if (!retired) process.stderr.write(`warning: Redis did not answer within ${limitMs / 1000} s; the finished queue ${handles.target.queueName} stays in Redis until the next collect\n`);
  return retired;
}
