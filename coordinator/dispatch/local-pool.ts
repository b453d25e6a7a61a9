// The embedded default's dispatcher: feeds the ledger's pending jobs (longest first) to the local solver pool, at
// most one per thread, and commits each result to the ledger the moment it arrives. A stop request either lets
// running jobs finish (no new ones start) or abandons them; either way the ledger stays consistent for a resume.
import type { JobResult } from '../../schemas/result.js';
import { CaseFailure } from '../../worker/case-failure.js';
import { SolverPool } from '../../worker/thread-pool.js';
import type { Ledger, LedgerJob } from '../ledger/ledger.js';

export interface LocalDispatchOptions {
  readonly ledger: Ledger;
  /** Jobs to run, in the order to start them. */
  readonly jobs: readonly LedgerJob[];
  readonly threads: number;
  /** Largest memory one case may need, bytes. @defaultValue pool default */
  readonly maxMemoryBytes?: number;
  /** Tries of a job whose thread crashed or hit an internal error before it is marked failed. @defaultValue 3 */
  readonly maxAttempts?: number;
  /** Called on every start, finish and progress message. */
  readonly onChange?: (running: ReadonlyMap<string, number>) => void;
  /** Called when a job's outcome is in the ledger. */
  readonly onFinished?: (jobId: string, outcome: 'done' | 'failed') => void;
}

export interface LocalDispatchSummary {
  /** Results committed in this run. */
  readonly solved: number;
  /** Jobs marked failed in this run. */
  readonly failed: number;
  /** Cases handed to a solver thread in this run (every attempt counts). */
  readonly solverCalls: number;
  /** Whether the run stopped before every job had its turn. */
  readonly stopped: boolean;
}

export class LocalDispatch {
  private readonly pool: SolverPool;
  private readonly running = new Map<string, number>();
  private readonly tries = new Map<string, number>();
  private readonly todo: LedgerJob[];
  private starting = true;
  private solved = 0;
  private failed = 0;
  private cancelled = 0;

  constructor(private readonly opts: LocalDispatchOptions) {
    this.pool = new SolverPool({ threads: opts.threads, maxMemoryBytes: opts.maxMemoryBytes });
    this.todo = [...opts.jobs];
  }

  /** Fraction solved of each running job, by job id. */
  get runningFractions(): ReadonlyMap<string, number> {
    return this.running;
  }

  /** Start no more jobs; running ones finish and are committed. */
  finishRunning(): void {
    this.starting = false;
  }

  /** Start no more jobs and stop the running ones; they stay pending in the ledger. */
  abandonRunning(): void {
    this.starting = false;
    this.pool.stopRunning();
  }

  async run(): Promise<LocalDispatchSummary> {
    try {
      await new Promise<void>((resolveAll, rejectAll) => {
        const next = (): void => {
          while (this.starting && this.todo.length > 0 && this.running.size < this.opts.threads) {
            const job = this.todo.shift()!;
            this.start(job).then(next, rejectAll);
          }
          if (this.running.size === 0 && (!this.starting || this.todo.length === 0)) resolveAll();
        };
        next();
      });
    } finally {
      await this.pool.close();
      // Jobs that were stopped mid-run, or never started, stay or go back to pending for the next run.
      this.opts.ledger.resetInterrupted({ includeQueued: true });
    }
    return {
      solved: this.solved,
      failed: this.failed,
      solverCalls: this.pool.solvesStarted,
      stopped: this.todo.length > 0 || this.cancelled > 0,
    };
  }

  private async start(job: LedgerJob): Promise<void> {
    const { ledger } = this.opts;
    ledger.markRunning(job.job_id);
    this.running.set(job.job_id, 0);
    this.opts.onChange?.(this.running);
    let result: JobResult | undefined;
    let failure: CaseFailure | undefined;
    try {
      result = await this.pool.run(job.case, job.job_id, (f) => {
        this.running.set(job.job_id, f);
        this.opts.onChange?.(this.running);
      });
    } catch (err) {
      failure = err instanceof CaseFailure ? err : new CaseFailure('internal', String(err));
    }
    this.running.delete(job.job_id);
    if (result) {
      ledger.commitResult(result);
      this.solved++;
      this.opts.onFinished?.(job.job_id, 'done');
    } else if (failure?.kind === 'cancelled') {
      this.cancelled++;
    } else if (failure) {
      const tries = (this.tries.get(job.job_id) ?? 0) + 1;
      this.tries.set(job.job_id, tries);
      if (failure.retryable && tries < (this.opts.maxAttempts ?? 3)) {
        this.todo.unshift(job);
      } else {
        ledger.markFailed(job.job_id, failure.reason, tries);
        this.failed++;
        this.opts.onFinished?.(job.job_id, 'failed');
      }
    }
    this.opts.onChange?.(this.running);
  }
}
