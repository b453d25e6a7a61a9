// `loamwave run SWEEP`: the embedded default runs every pending job on this machine's cores (longest first) and
// commits each result as it arrives; with `--redis URL` it submits to the queue and collects what the workers
// return instead. Either way a rerun recomputes nothing that is done, and the outputs are written at the end.
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { Option, type Command } from 'commander';
import { ExitCode } from '../../schemas/exit-codes.js';
import type { LocalDispatchSummary } from '../dispatch/local-pool.js';
import type { SweepRun } from '../ledger/sweep-run.js';
import { addQueueOptions, integerOption, memoryOption, mibToBytes, RETRY_FAILED_HELP, retryFailedJobs, type QueueCliOptions } from './options.js';
import { finishOutputs } from './finish-outputs.js';

interface RunCliOptions extends QueueCliOptions {
  out?: string;
  workers: number;
  maxMemoryMib?: number;
  json?: boolean;
  report?: boolean;
  retryFailed?: boolean;
}

export function registerRun(program: Command): void {
  const cmd = program
    .command('run')
    .description('run a sweep on this machine (or through a Redis queue with --redis) and write its outputs')
    .argument('<sweep>', 'sweep file (.yaml or .json)')
    .option('--out <dir>', 'output folder (default: out/<sweep name>/)')
    .addOption(
      new Option('--workers <n>', 'solver threads on this machine (without --redis)')
        .argParser(integerOption(1, 1024))
        .default(availableParallelism()),
    )
    .addOption(memoryOption(' / workers'))
    .option('--no-report', 'write the tables but not report.html')
    .option('--retry-failed', RETRY_FAILED_HELP)
    .option('--json', 'print a summary as JSON on stdout');
  addQueueOptions(cmd, { required: false, what: 'submit to this queue and collect what the workers return' });
  cmd.action(async (sweepPath: string, opts: RunCliOptions) => {
    const started = performance.now();
    if (opts.redis) {
      const { queueSession, withQueue } = await import('../queue/session.js');
      await withQueue(sweepPath, opts, async (run, handles) => {
        if (opts.retryFailed) retryFailedJobs(run);
        const r = await queueSession(run, handles, { submit: true, follow: true, progress: true });
        await finish(run, { stopped: r.stopped, solvedNow: r.collected.committed, solverCalls: null }, opts, started);
      });
      return;
    }
    const [{ openSweepRun }, { defaultMemoryCapBytes }] = await Promise.all([import('../ledger/sweep-run.js'), import('../../worker/run-case.js')]);
    // the cap the local pool holds each case to, checked on every job before the ledger is touched
    const maxMemoryBytes = opts.maxMemoryMib === undefined ? defaultMemoryCapBytes(opts.workers) : mibToBytes(opts.maxMemoryMib);
    const run = openSweepRun(sweepPath, opts.out, { maxMemoryBytes });
    try {
      if (opts.retryFailed) retryFailedJobs(run);
      await finish(run, await runEmbedded(run, opts), opts, started);
    } finally {
      run.ledger.close();
    }
  });
}

/** After the jobs: outputs (unless stopped), the exit code, and the --json summary. */
async function finish(run: SweepRun, outcome: RunOutcome, opts: RunCliOptions, startedMs: number): Promise<void> {
  const counts = run.ledger.counts();
  if (outcome.stopped) {
    process.stderr.write(`stopped: ${counts.done} of ${run.jobs.length} job(s) done; run the same command again to go on\n`);
    process.exitCode = ExitCode.stopped;
  } else {
    await finishOutputs(run, opts.report !== false);
    if (outcome.solvingS !== undefined && outcome.solvedNow > 0) {
      // what this run spent beyond solving, for `plan`'s next wall-time estimate on this machine
      const { recordRunOverhead } = await import('../sweep/kernel-speed.js');
      const rows = run.jobs.reduce((n, j) => n + j.case.receivers.ranges_m.length, 0);
      recordRunOverhead(rows, (performance.now() - startedMs) / 1000 - outcome.solvingS);
    }
    if (counts.failed > 0) {
      process.stderr.write(`error: ${counts.failed} job(s) failed; their reasons are in the error column of runs.parquet (and \`loamwave status\`)\n`);
      process.exitCode = ExitCode.jobsFailed;
    }
    if (!opts.json) {
      // one closing line on stderr (data stays on stdout, and only with --json): where to look next
      const report = opts.report !== false ? `, report ${join(run.outDir, 'report.html')}` : '';
      process.stderr.write(`${counts.done} of ${run.jobs.length} job(s) done; tables in ${run.outDir}${report}\n`);
    }
  }
  if (opts.json) {
    const summary = {
      sweep: run.sweep.name,
      out_dir: run.outDir,
      mode: opts.redis ? 'queue' : 'embedded',
      jobs: run.jobs.length,
      counts,
      solved_now: outcome.solvedNow,
      solver_calls: outcome.solverCalls,
      stopped: outcome.stopped,
      wall_time_s: (performance.now() - startedMs) / 1000,
    };
    process.stdout.write(JSON.stringify(summary) + '\n');
  }
}

interface RunOutcome {
  readonly stopped: boolean;
  /** Results committed by this invocation. */
  readonly solvedNow: number;
  /** Solver starts on this machine (embedded) or null (queue: the workers solve). */
  readonly solverCalls: number | null;
  /** Seconds the local pool spent solving (embedded). */
  readonly solvingS?: number;
}

async function runEmbedded(run: SweepRun, opts: RunCliOptions): Promise<RunOutcome> {
  const [{ LocalDispatch }, { ProgressBar }, { SweepProgress }, { onStopSignals }, { longestFirst }, { LiveFieldSegments }] = await Promise.all([
    import('../dispatch/local-pool.js'),
    import('../dispatch/progress-bar.js'),
    import('../dispatch/progress.js'),
    import('../dispatch/stop-signals.js'),
    import('../ledger/sweep-run.js'),
    import('../outputs/live-segments.js'),
  ]);
  const { ledger } = run;
  // The local queue died with any earlier process: whatever was running or queued is pending again.
  ledger.resetInterrupted({ includeQueued: true });
  const todo = longestFirst(ledger.list('pending'), run.costById);
  const progress = new SweepProgress(ledger, run.costById);
  const bar = new ProgressBar({ stream: process.stderr });
  // field rows written while the jobs run, so the outputs at the end have only the last ones to write
  const segments = new LiveFieldSegments(run, { warn: (line) => process.stderr.write(`\n${line}\n`) });
  const dispatch = new LocalDispatch({
    ledger,
    jobs: todo,
    threads: opts.workers,
    maxMemoryBytes: opts.maxMemoryMib === undefined ? undefined : mibToBytes(opts.maxMemoryMib),
    onFinished: (id, outcome) => {
      progress.finished(id);
      if (outcome === 'done') segments.jobDone(id);
    },
    onChange: (running) => bar.update(progress.state(running)),
  });
  const dispose = onStopSignals(
    () => {
      process.stderr.write('\nstopping: letting running jobs finish; press Ctrl-C again to abandon them\n');
      dispatch.finishRunning();
    },
    () => {
      process.stderr.write('\nabandoning running jobs; they stay pending for the next run\n');
      dispatch.abandonRunning();
    },
  );
  let summary: LocalDispatchSummary;
  const solvingFrom = performance.now();
  try {
    summary = await dispatch.run();
  } finally {
    dispose();
    await segments.close();
  }
  const solvingS = (performance.now() - solvingFrom) / 1000;
  bar.finish(progress.state(new Map()));
  return { stopped: summary.stopped, solvedNow: summary.solved, solverCalls: summary.solverCalls, solvingS };
}
