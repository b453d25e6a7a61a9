// The last step of `run` and `collect`: the tables from the ledger (outputs/), then, unless --no-report, the
// report page from those tables (report/), each written exactly once. Lives in the command layer because it is the
// only place that may decide to write the report.
import { UserError } from '../../schemas/errors.js';
import { ExitCode } from '../../schemas/exit-codes.js';
import type { SweepRun } from '../ledger/sweep-run.js';

/**
 * Write the tables and, when `withReport`, report.html. A report that cannot be written is one error line and a
 * non-zero exit (2 for a mistake in the folder's files, 70 otherwise), not a lost run: the tables are in place and
 * `loamwave report DIR` can be rerun.
 */
export async function finishOutputs(run: SweepRun, withReport: boolean): Promise<void> {
  const { writeOutputs } = await import('../outputs/tables.js');
  await writeOutputs(run.ledger, run.sweep, run.text, run.outDir, { jobs: run.jobs });
  if (!withReport) return;
  const { writeReport } = await import('../report/write.js');
  try {
    await writeReport(run.outDir);
  } catch (e) {
    const message = (e as Error).message.split('\n')[0];
    process.stderr.write(`error: report.html not written (${message}); the tables are written, run \`loamwave report ${run.outDir}\` to retry\n`);
    process.exitCode = e instanceof UserError ? e.exitCode : ExitCode.internalError;
  }
}
