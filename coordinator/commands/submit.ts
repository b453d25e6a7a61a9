// `loamwave submit SWEEP --redis URL`: put the sweep's outstanding jobs on its queue (longest first by priority)
// and return; workers anywhere solve them and `loamwave collect` brings the results home. Idempotent: jobs done
// in the ledger or already queued are not added again.
import type { Command } from 'commander';
import { addQueueOptions, RETRY_FAILED_HELP, retryFailedJobs, type QueueCliOptions } from './options.js';

interface SubmitCliOptions extends QueueCliOptions {
  out?: string;
  json?: boolean;
  retryFailed?: boolean;
}

export function registerSubmit(program: Command): void {
  const cmd = program
    .command('submit')
    .description('queue the outstanding jobs of a sweep on Redis for workers to solve')
    .argument('<sweep>', 'sweep file (.yaml or .json)')
    .option('--out <dir>', 'output folder holding the ledger (default: out/<sweep name>/)')
    .option('--retry-failed', RETRY_FAILED_HELP)
    .option('--json', 'print what was queued as JSON on stdout');
  addQueueOptions(cmd, { required: true, what: 'the queue to submit to' });
  cmd.action(async (sweepPath: string, opts: SubmitCliOptions) => {
    const [{ submitSweep }, { withQueue }] = await Promise.all([import('../queue/submit.js'), import('../queue/session.js')]);
    await withQueue(sweepPath, opts, async (run, handles) => {
      if (opts.retryFailed) retryFailedJobs(run);
      const s = await submitSweep(handles, run.ledger, run.costById);
      if (opts.json) {
        process.stdout.write(
          JSON.stringify({ sweep: run.sweep.name, queue: handles.target.queueName, prefix: handles.target.prefix, added: s.added, already_queued: s.alreadyQueued, finished: s.finished }) + '\n',
        );
      } else {
        process.stderr.write(`${handles.target.queueName}: ${s.added} job(s) queued, ${s.alreadyQueued} already queued, ${s.finished} finished before\n`);
      }
    });
  });
}
