// The last step of `run` and `collect`: the tables from the ledger (outputs/), then, unless --no-report, the
// report page from those tables (report/), each written exactly once. Lives in the command layer because it is the
// only place that may decide to write the report. A rerun with nothing new writes neither (outputs/state.ts).
// The writing runs in a thread of its own with a capped heap (output-thread.ts says why).
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { UserError } from '../../schemas/errors.js';
import { ExitCode } from '../../schemas/exit-codes.js';
import type { SweepRun } from '../ledger/sweep-run.js';

/** What the output stage needs of a sweep run. */
export type OutputRun = Pick<SweepRun, 'ledger' | 'sweep' | 'text' | 'path' | 'outDir' | 'jobs'>;

/** What the output thread is given, and what it answers. */
export interface OutputStageRequest {
  readonly outDir: string;
  readonly path: string;
  readonly text: string;
  readonly withReport: boolean;
}
export type OutputStageReply =
  | { exitCode: number | undefined }
  | { userError: { message: string; code: string; exitCode: number } }
  | { internalError: string };

/** The output thread's heap cap, MB (a Loamwave choice: the stage's live heap at 10 M field rows is about 230 MB). */
const DEFAULT_OUTPUT_HEAP_MB = 384;

/**
 * Write the tables and, when `withReport`, report.html, in the output thread (in this thread when
 * LOAMWAVE_OUTPUT_THREAD=0). A report that cannot be written is one error line and a non-zero exit (2 for a mistake in
 * the folder's files, 70 otherwise), not a lost run: the tables are in place and `loamwave report DIR` can be rerun.
 */
export async function finishOutputs(run: OutputRun, withReport: boolean): Promise<void> {
  // Nothing new since the tables (and the report) were written: nothing to start a thread for.
  if (await outputsCurrent(run, withReport)) return;
  if (process.env.LOAMWAVE_OUTPUT_THREAD === '0') {
    const code = await writeOutputStage(run, withReport);
    if (code !== undefined) process.exitCode = code;
    return;
  }
  const heapMb = outputHeapMb();
  const here = import.meta.url;
  const entry = here.endsWith('.ts') ? new URL('../../dist/coordinator/commands/output-thread.js', here) : new URL('./output-thread.js', here);
  const request: OutputStageRequest = { outDir: run.outDir, path: run.path, text: run.text, withReport };
  const reply = await new Promise<OutputStageReply>((resolveReply, reject) => {
    const worker = new Worker(entry, { workerData: request, resourceLimits: { maxOldGenerationSizeMb: heapMb } });
    let answered = false;
    worker.on('message', (m: OutputStageReply) => {
      answered = true;
      resolveReply(m);
    });
    worker.on('error', (e: Error & { code?: string }) => {
      if (e.code === 'ERR_WORKER_OUT_OF_MEMORY') {
        reject(
          new UserError(
            `the output stage needed more than its ${heapMb} MB heap; set LOAMWAVE_OUTPUT_HEAP_MB higher and run again (the tables are rebuilt from the ledger)`,
            'loamwave.outputs.heap',
            ExitCode.internalError,
          ),
        );
      } else reject(e);
    });
    worker.on('exit', (code) => {
      if (!answered) reject(new Error(`the output thread stopped (exit code ${code}) without an answer`));
    });
  });
  if ('userError' in reply) throw new UserError(reply.userError.message, reply.userError.code, reply.userError.exitCode);
  if ('internalError' in reply) throw new Error(reply.internalError);
  if (reply.exitCode !== undefined) process.exitCode = reply.exitCode;
}

export function outputHeapMb(): number {
  const v = process.env.LOAMWAVE_OUTPUT_HEAP_MB;
  if (v === undefined || v === '') return DEFAULT_OUTPUT_HEAP_MB;
  const n = Number(v);
  if (!Number.isInteger(n) || n < 64) {
    throw new UserError(`LOAMWAVE_OUTPUT_HEAP_MB: must be a whole number of MB, 64 or more (got "${v}")`, 'loamwave.outputs.heap-option');
  }
  return n;
}

/** Whether the tables, and the report when asked for, were written from this very ledger state. */
async function outputsCurrent(run: OutputRun, withReport: boolean): Promise<boolean> {
  const state = await import('../outputs/state.js');
  const { OUTPUT_FILES } = await import('../outputs/tables.js');
  const before = state.readOutputState(run.outDir);
  const revision = run.ledger.revision();
  if (!state.tablesCurrent(before, revision, run.text, [OUTPUT_FILES.runs, OUTPUT_FILES.fields], run.outDir)) return false;
  return !withReport || (before!.report_revision === revision && existsSync(join(run.outDir, OUTPUT_FILES.report)));
}

/**
 * The output stage itself: the tables unless current, then the report unless not asked for or current. Returns the
 * exit code a failed report calls for (undefined when all went well).
 */
export async function writeOutputStage(run: OutputRun, withReport: boolean): Promise<number | undefined> {
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
  if (!withReport) return undefined;
  if (current && before!.report_revision === revision && existsSync(join(run.outDir, OUTPUT_FILES.report))) return undefined;
  const { writeReport } = await import('../report/write.js');
  try {
    await writeReport(run.outDir);
    const after = state.readOutputState(run.outDir);
    if (after) state.writeOutputState(run.outDir, { ...after, report_revision: revision });
  } catch (e) {
    const message = (e as Error).message.split('\n')[0];
    process.stderr.write(`error: report.html not written (${message}); the tables are written, run \`loamwave report ${run.outDir}\` to retry\n`);
    return e instanceof UserError ? e.exitCode : ExitCode.internalError;
  }
  return undefined;
}
