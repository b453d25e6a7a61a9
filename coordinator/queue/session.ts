// The coordinator's side of a queued sweep, shared by `run --redis` and `collect --follow`: connect, submit when
// asked, follow the collection with the progress bar (resubmitting if Redis lost the queue), and on Ctrl-C stop
// following while the jobs stay queued for the workers. Everything here writes the ledger; workers never do.
import type { Ledger } from '../ledger/ledger.js';
import { ProgressBar } from '../dispatch/progress-bar.js';
import { activeProgress, collectOnce, followCollection, retireQueue, type CollectSummary } from './collect.js';
import { submitSweep, type SubmitSummary } from './submit.js';
import { QueueHandles, queueTarget, type QueueSettings } from './target.js';
import { openLedgerFor, prepareSweep, type SweepRun } from '../ledger/sweep-run.js';
import { LiveFieldSegments } from '../outputs/live-segments.js';
import { onStopSignals } from '../dispatch/stop-signals.js';
import { CLOSE_LIMIT_MS, exitIfStillHeld } from '../../worker/redis-connection.js';
import { SweepProgress } from '../dispatch/progress.js';

export interface QueueSessionResult {
  readonly submitted?: SubmitSummary;
  /** Results committed, failures recorded, and results refused (forged or stray; each logged on stderr). */
  readonly collected: { committed: number; failed: number; refused: number };
  /** Every job of the sweep is done or failed. */
  readonly complete: boolean;
  /** Stopped by a signal before the sweep was complete. */
  readonly stopped: boolean;
}

/**
 * Validate the sweep and the queue options and connect to Redis before the output folder is touched, so a bad
 * URL or an unreachable server leaves nothing behind; then open the ledger and run `body`. Closes everything.
 */
export async function withQueue<T>(
  sweepPath: string,
  opts: QueueSettings & { out?: string },
  body: (run: SweepRun, handles: QueueHandles) => Promise<T>,
): Promise<T> {
  const prepared = prepareSweep(sweepPath, opts.out);
  const target = queueTarget({ redis: opts.redis!, redisCa: opts.redisCa, prefix: opts.prefix }, prepared.sweep.name);
  const { handles, warnings } = await QueueHandles.open(target);
  for (const w of warnings) process.stderr.write(`warning: ${w}\n`);
  let run: SweepRun | undefined;
  try {
    run = openLedgerFor(prepared);
    return await body(run, handles);
  } finally {
    run?.ledger.close();
    const clean = await handles.close();
    if (!clean) process.stderr.write(`warning: Redis did not answer while closing; disconnected after ${CLOSE_LIMIT_MS / 1000} s\n`);
    exitIfStillHeld((line) => process.stderr.write(`${line}\n`));
  }
}

/** Submit (when `submit`), then collect: once, or until the sweep is complete (`follow`). */
export async function queueSession(
  run: SweepRun,
  handles: QueueHandles,
  how: { submit: boolean; follow: boolean; progress: boolean },
): Promise<QueueSessionResult> {
  // Following: Ctrl-C and SIGTERM are taken from the start, so a signal while the jobs are being queued also
  // stops cleanly (the jobs stay queued) instead of killing the process mid-submit.
  const stop = new AbortController();
  const dispose = how.follow
    ? onStopSignals(
        () => {
          process.stderr.write('\nstopping: the jobs stay queued for the workers; run the same command again to go on collecting\n');
          stop.abort();
        },
        () => stop.abort(),
      )
    : () => undefined;
  try {
    return await session(run, handles, how, stop.signal);
  } finally {
    dispose();
  }
}

async function session(
  run: SweepRun,
  handles: QueueHandles,
  how: { submit: boolean; follow: boolean; progress: boolean },
  signal: AbortSignal,
): Promise<QueueSessionResult> {
  const { ledger } = run;
  let submitted: SubmitSummary | undefined;
  if (how.submit) {
    submitted = await submitSweep(handles, ledger, run.costById);
    process.stderr.write(
      `${handles.target.queueName}: ${submitted.added} job(s) queued, ${submitted.alreadyQueued} already queued, ${submitted.finished} finished before\n`,
    );
  }
  const totals = { committed: 0, failed: 0, refused: 0 };
  const add = (s: CollectSummary) => {
    totals.committed += s.committed;
    totals.failed += s.failed;
    totals.refused += s.refused.length;
  };
  if (!how.follow) {
    add(await collectOnce(handles, ledger));
    const complete = isComplete(ledger);
    if (complete) await retireQueue(handles);
    reportRefusals(totals.refused);
    return { submitted, collected: totals, complete, stopped: false };
  }

  const progress = new SweepProgress(ledger, run.costById);
  const bar = how.progress ? new ProgressBar({ stream: process.stderr }) : undefined;
  // field rows written while the workers solve (a failed job's id counts nothing: it has no result to write)
  const segments = new LiveFieldSegments(run, { warn: (line) => process.stderr.write(`\n${line}\n`) });
  const complete = await followCollection(handles, ledger, {
    signal,
    onRound: async (s) => {
      add(s);
      for (const id of s.finishedIds) if (ledger.get(id)?.status === 'done') segments.jobDone(id);
      if (!bar) return;
      for (const id of s.finishedIds) progress.finished(id);
      bar.update(progress.state(await activeProgress(handles)));
    },
    onLost: async (missing) => {
      process.stderr.write(`warning: Redis holds none of the ${missing} outstanding job(s) (restarted without persistence?); queueing them again\n`);
      await submitSweep(handles, ledger, run.costById);
    },
  });
  await segments.close();
  bar?.finish(progress.state(new Map()));
  if (complete) await retireQueue(handles);
  reportRefusals(totals.refused);
  return { submitted, collected: totals, complete, stopped: !complete };
}

function reportRefusals(n: number): void {
  if (n > 0) process.stderr.write(`warning: ${n} result(s) refused (one line each above): forged, stray, or sealed with another LOAMWAVE_RESULT_KEY\n`);
}

export function isComplete(ledger: Ledger): boolean {
  const c = ledger.counts();
  return c.pending + c.queued + c.running === 0;
}
