// `loamwave collect SWEEP --redis URL [--follow]`: move finished jobs from the sweep's queue into its ledger
// (each result committed before it leaves Redis; failures recorded with their reason); with --follow, keep
// collecting until the sweep is complete. When it is, the outputs are written.
import type { Command } from 'commander';
import { addQueueOptions, type QueueCliOptions } from './options.js';
import { ExitCode } from '../../schemas/exit-codes.js';
import { finishOutputs } from './finish-outputs.js';

interface CollectCliOptions extends QueueCliOptions {
  out?: string;
  follow?: boolean;
  json?: boolean;
  report?: boolean;
}

export function registerCollect(program: Command): void {
  const cmd = program
    .command('collect')
    .description('move finished jobs from Redis into the ledger; write the outputs once the sweep is complete')
    .argument('<sweep>', 'sweep file (.yaml or .json)')
    .option('--out <dir>', 'output folder holding the ledger (default: out/<sweep name>/)')
    .option('--follow', 'keep collecting, with a progress bar, until every job is done or failed')
    .option('--no-report', 'write the tables but not report.html')
    .option('--json', 'print what was collected as JSON on stdout');
  addQueueOptions(cmd, { required: true, what: 'the queue to collect from' });
  cmd.action(async (sweepPath: string, opts: CollectCliOptions) => {
    const { queueSession, withQueue } = await import('../queue/session.js');
    await withQueue(sweepPath, opts, async (run, handles) => {
      const r = await queueSession(run, handles, { submit: false, follow: opts.follow === true, progress: true });
      if (r.complete) await finishOutputs(run, opts.report !== false);
      const counts = run.ledger.counts();
      if (opts.json) {
        process.stdout.write(
          JSON.stringify({ sweep: run.sweep.name, committed: r.collected.committed, failed: r.collected.failed, complete: r.complete, counts }) + '\n',
        );
      } else if (!opts.follow) {
        process.stderr.write(
          `collected ${r.collected.committed} result(s) and ${r.collected.failed} failure(s); ${counts.done} of ${run.jobs.length} done${r.complete ? ', outputs written' : ''}\n`,
        );
      }
      if (r.stopped) process.exitCode = ExitCode.stopped;
      else if (r.complete && counts.failed > 0) {
        // as `run`: the outputs are written, and the exit code says that some jobs failed
        process.stderr.write(`error: ${counts.failed} job(s) failed; their reasons are in the error column of runs.parquet (and \`loamwave status\`)\n`);
        process.exitCode = ExitCode.jobsFailed;
      }
    });
  });
}
