// `loamwave status SWEEP [--redis URL] [--json]`: how far a sweep is: job counts by state from the ledger, the
// recent completion rate and an ETA; with --redis also what its queue holds and how many workers serve it.
// Reads only: it never changes the ledger or the queue.
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import type { Command } from 'commander';
import { UserError } from '../../schemas/errors.js';
import type { LedgerJob } from '../ledger/ledger.js';
import { addQueueOptions, type QueueCliOptions } from './options.js';

interface StatusCliOptions extends QueueCliOptions {
  out?: string;
  json?: boolean;
}

/** Window over which the completion rate is measured, ms (common practice: recent enough to follow changes). */
const RATE_WINDOW_MS = 10 * 60_000;

/** Jobs finished per minute over the last ten minutes (or since the first finish in them), and the ETA, s. */
export function rateAndEta(jobs: readonly LedgerJob[], nowMs: number): { per_min: number; eta_s: number | null } {
  const recent = jobs
    .filter((j) => (j.status === 'done' || j.status === 'failed') && j.finished_at_ms !== null && j.finished_at_ms >= nowMs - RATE_WINDOW_MS)
    .map((j) => j.finished_at_ms as number);
  const outstanding = jobs.filter((j) => j.status !== 'done' && j.status !== 'failed').length;
  return rateFrom(recent, outstanding, nowMs);
}

/** The same from the finish times in the window and the count of jobs outstanding (what the ledger's queries give). */
export function rateFrom(recent: readonly number[], outstanding: number, nowMs: number): { per_min: number; eta_s: number | null } {
  if (recent.length === 0) return { per_min: 0, eta_s: outstanding === 0 ? 0 : null };
  const first = recent.reduce((m, t) => Math.min(m, t), Number.POSITIVE_INFINITY);
  const spanMin = Math.max(nowMs - first, 1000) / 60_000;
  const perMin = recent.length / spanMin;
  return { per_min: perMin, eta_s: (outstanding / perMin) * 60 };
}

export function registerStatus(program: Command): void {
  const cmd = program
    .command('status')
    .description('show how far a sweep is: jobs by state, rate, ETA (and its queue with --redis)')
    .argument('<sweep>', 'sweep file (.yaml or .json)')
    .option('--out <dir>', 'output folder holding the ledger (default: out/<sweep name>/)')
    .option('--json', 'print the status as JSON on stdout');
  addQueueOptions(cmd, { required: false, what: 'also show what the sweep\'s queue holds' });
  cmd.action(async (sweepPath: string, opts: StatusCliOptions) => {
    const [{ Ledger, LEDGER_FILE }, { openExistingSweep }, { formatDuration }] = await Promise.all([
      import('../ledger/ledger.js'),
      import('../ledger/sweep-run.js'),
      import('../dispatch/progress-bar.js'),
    ]);
    const { sweep, outDir } = openExistingSweep(sweepPath, opts.out);
    if (!existsSync(join(outDir, LEDGER_FILE))) {
      throw new UserError(`${sweep.name}: no ledger in ${outDir}; run or submit the sweep first (or give --out DIR)`);
    }
    const ledger = Ledger.open(outDir);
    let status: Record<string, unknown>;
    try {
      // Counts and the window's finish times by query: no job row is loaded, so status stays fast at any size.
      const counts = ledger.counts();
      const now = Date.now();
      const { per_min, eta_s } = rateFrom(ledger.finishedSince(now - RATE_WINDOW_MS), counts.pending + counts.queued + counts.running, now);
      status = { sweep: sweep.name, out_dir: outDir, jobs: ledger.jobCount(), counts, rate_per_min: per_min, eta_s };
      const failures = ledger.firstFailures(5);
      if (failures.length > 0) status.first_failures = failures;
    } finally {
      ledger.close();
    }
    if (opts.redis) {
      const { QueueHandles, queueTarget } = await import('../queue/target.js');
      const target = queueTarget({ redis: opts.redis, redisCa: opts.redisCa, prefix: opts.prefix }, sweep.name);
      const { handles, warnings } = await QueueHandles.open(target);
      try {
        status.queue = {
          name: target.queueName,
          counts: await handles.queue.getJobCounts('waiting', 'prioritized', 'active', 'delayed', 'completed', 'failed'),
          workers: await handles.queue.getWorkersCount(),
          warnings,
        };
      } finally {
        await handles.close();
      }
    }
    if (opts.json) {
      process.stdout.write(JSON.stringify(status) + '\n');
      return;
    }
    const c = status.counts as Record<string, number>;
    const lines = [
      `${sweep.name}: ${c.done} of ${status.jobs} done, ${c.failed} failed, ${c.running} running, ${c.queued} queued, ${c.pending} pending`,
      `rate ${(status.rate_per_min as number).toFixed(1)} jobs/min, ETA ${formatDuration(status.eta_s === null ? Number.NaN : (status.eta_s as number))}`,
    ];
    if (status.queue) {
      const q = status.queue as { name: string; counts: Record<string, number>; workers: number; warnings: string[] };
      lines.push(`queue ${q.name}: ${Object.entries(q.counts).map(([k, v]) => `${v} ${k}`).join(', ')}; ${q.workers} worker connection(s)`);
      for (const w of q.warnings) lines.push(`warning: ${w}`);
    }
    for (const f of (status.first_failures as Array<{ job_id: string; error: string }> | undefined) ?? []) {
      lines.push(`failed ${f.job_id.slice(0, 12)}: ${f.error}`);
    }
    process.stdout.write(lines.join('\n') + '\n');
  });
}
