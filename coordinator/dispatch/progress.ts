// Tracks how far a sweep is, for the progress bar: job counts from the ledger and the estimated work (cell
// updates) of finished jobs plus the solved share of running ones, so the ETA reflects that long jobs run first.
import type { Ledger } from '../ledger/ledger.js';
import type { ProgressState } from './progress-bar.js';

export class SweepProgress {
  private readonly workTotal: number;
  private finishedWork = 0;
  private readonly finishedIds = new Set<string>();

  constructor(
    private readonly ledger: Ledger,
    private readonly costById: ReadonlyMap<string, number>,
  ) {
    let total = 0;
    for (const c of costById.values()) total += c;
    this.workTotal = total;
    for (const j of ledger.list()) if (j.status === 'done' || j.status === 'failed') this.finished(j.job_id);
  }

  /** A job reached done or failed. */
  finished(jobId: string): void {
    if (this.finishedIds.has(jobId)) return;
    this.finishedIds.add(jobId);
    this.finishedWork += this.costById.get(jobId) ?? 0;
  }

  /** The state to show, given the solved fraction of each running job. */
  state(running: ReadonlyMap<string, number>): ProgressState {
    const c = this.ledger.counts();
    let partial = 0;
    for (const [id, f] of running) if (!this.finishedIds.has(id)) partial += Math.min(1, f) * (this.costById.get(id) ?? 0);
    return {
      total: c.pending + c.queued + c.running + c.done + c.failed,
      done: c.done,
      failed: c.failed,
      running: running.size,
      workTotal: this.workTotal,
      workDone: this.finishedWork + partial,
    };
  }
}
