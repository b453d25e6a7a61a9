// The last step of `run` and `collect`: the tables from the ledger (outputs/), then, unless --no-report, the
// report page from those tables (report/), each written exactly once. Lives in the command layer because it is the
// only place that may decide to write the report. A rerun with nothing new writes neither (outputs/state.ts).
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { UserError } from '../../schemas/errors.js';
import { ExitCode } from '../../schemas/exit-codes.js';
import type { SweepRun } from '../ledger/sweep-run.js';

/**
 * Write the tables and, when `withReport`, report.html. A report that cannot be written is one error line and a
 * non-zero exit (2 for a mistake in the folder's files, 70 otherwise), not a lost run: the tables are in place and
 * `loamwave report DIR` can be rerun.
 */
export async function finishOutputs(run: SweepRun, withReport: boolean): Promise<void> {
  const state = await import('../outputs/state.js');
  const { OUTPUT_FILES } = await import('../outputs/tables.js');
  const revision = run.ledger.revision();
  const before = state.readOutputState(run.outDir);
  // Nothing new since the tables were written (same ledger revision, sweep text and solver): leave them, and the
  // report too when it was drawn from them. A rerun of a finished sweep then writes nothing.
  const current = state.tablesCurrent(before, revision, run.text, [OUTPUT_FILES.runs, OUTPUT_FILES.fields], run.outDir);
  if (!current) {
    const { writeOutputs } = await import('../outputs/tables.js');
    await writeOutputs(run.ledger, run.sweep, run.text, run.outDir, { jobs: run.jobs });
  }
  if (!withReport) return;
  if (current && before!.report_revision === revision && existsSync(join(run.outDir, OUTPUT_FILES.report))) return;
  const { writeReport } = await import('../report/write.js');
  try {
    await writeReport(run.outDir);
    const after = state.readOutputState(run.outDir);
    if (after) state.writeOutputState(run.outDir, { ...after, report_revision: revision });
  } catch (e) {
    const message = (e as Error).message.split('\n')[0];
    process.stderr.write(`error: report.html not written (${message}); the tables are written, run \`loamwave report ${run.outDir}\` to retry\n`);
    process.exitCode = e instanceof UserError ? e.exitCode : ExitCode.internalError;
  }
}
