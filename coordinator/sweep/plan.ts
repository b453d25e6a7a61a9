// What a sweep will cost before anything runs: per-job cells, steps, memory and core-hours (from the solver's
// own estimate and the measured costs of this machine: cell updates, a fixed cost per job, a cost per receiver
// and step), the wall time on N workers with longest-first list scheduling, and the largest job against a memory
// cap. Pure: the costs and the cap are passed in.
import { estimateCost } from '../../solver/index.js';
import { describeParams, type Expansion } from './expand.js';

export interface JobPlan {
  index: number;
  job_id: string;
  params: Record<string, number | string>;
  cells_total: number;
  steps: number;
  memory_bytes: number;
  cell_updates: number;
  receivers: number;
  /** jobSeconds(...) / 3600. */
  core_hours: number;
}

/** What one solver thread pays on this machine (coordinator/sweep/kernel-speed.ts measures it). */
export interface CostModel {
  readonly cell_updates_per_s: number;
  /** Seconds per job beyond its updates and receivers. */
  readonly job_overhead_s: number;
  /** Seconds per receiver per time step. */
  readonly receiver_step_s: number;
}

/** Seconds one job takes on one solver thread: overhead + updates / rate + receivers × steps × per-step cost. */
export function jobSeconds(job: { cell_updates: number; steps: number; receivers: number }, m: CostModel): number {
  return m.job_overhead_s + job.cell_updates / m.cell_updates_per_s + job.receivers * job.steps * m.receiver_step_s;
}

export interface SweepPlan {
  design_points: number;
  jobs: number;
  duplicates: number;
  workers: number;
  cell_updates_per_s: number;
  job_overhead_s: number;
  receiver_step_s: number;
  total_cell_updates: number;
  total_core_hours: number;
  /** Makespan of longest-first list scheduling on `workers` identical workers, plus overhead_s, hours. */
  wall_hours: number;
  /** What the run spends beyond solving (start-up, ledger, outputs), seconds, as learned from earlier runs. */
  overhead_s: number;
  /** Field rows the sweep writes (jobs × receivers). */
  field_rows: number;
  largest_memory_bytes: number;
  largest_memory_job: number | null;
  memory_cap_bytes: number;
  fits: boolean;
  per_job: JobPlan[];
}

/** A binary min-heap of worker loads (no allocation per push/pop beyond the array). */
class LoadHeap {
  private readonly a: number[];
  constructor(n: number) {
    this.a = new Array<number>(n).fill(0);
  }
  /** Add `t` to the least-loaded worker and restore the heap. */
  addToLeast(t: number): void {
    const a = this.a;
    a[0] += t;
    let i = 0;
    for (;;) {
      const l = 2 * i + 1;
      const r = l + 1;
      let m = i;
      if (l < a.length && a[l] < a[m]) m = l;
      if (r < a.length && a[r] < a[m]) m = r;
      if (m === i) return;
      [a[i], a[m]] = [a[m], a[i]];
      i = m;
    }
  }
  max(): number {
    return this.a.reduce((m, x) => Math.max(m, x), 0);
  }
}

/**
 * Makespan of longest-processing-time-first list scheduling: sort durations in decreasing order and give each
 * to the least-loaded worker (Graham, "Bounds on multiprocessing timing anomalies", SIAM J. Appl. Math. 17(2),
 * 1969: within 4/3 − 1/(3m) of the optimum). This is the order `run` dispatches in.
 */
export function longestFirstMakespan(durations: readonly number[], workers: number): number {
  if (!(Number.isInteger(workers) && workers >= 1)) throw new Error(`longestFirstMakespan: workers must be a positive integer (got ${workers})`);
  const heap = new LoadHeap(Math.min(workers, Math.max(1, durations.length)));
  for (const t of [...durations].sort((x, y) => y - x)) heap.addToLeast(t);
  return heap.max();
}

/**
 * Plan a sweep's expansion on `workers` workers with the machine's costs (a bare number is an update rate with no
 * other cost), against `memoryCapBytes` per job.
 */
export function planSweep(
  expansion: Expansion,
  workers: number,
  costs: CostModel | number,
  memoryCapBytes: number,
  overhead: { readonly fixed_s: number; readonly per_row_s: number } = { fixed_s: 0, per_row_s: 0 },
): SweepPlan {
  const m: CostModel = typeof costs === 'number' ? { cell_updates_per_s: costs, job_overhead_s: 0, receiver_step_s: 0 } : costs;
  const perJob: JobPlan[] = expansion.jobs.map((j) => {
    const cost = { ...estimateCost(j.case), receivers: j.case.receivers.ranges_m.length };
    return {
      index: j.index,
      job_id: j.job_id,
      params: j.params,
      ...cost,
      core_hours: jobSeconds(cost, m) / 3600,
    };
  });
  let largest: JobPlan | undefined;
  for (const p of perJob) if (!largest || p.memory_bytes > largest.memory_bytes) largest = p;
  const totalUpdates = perJob.reduce((s, p) => s + p.cell_updates, 0);
  const fieldRows = perJob.reduce((s, p) => s + p.receivers, 0);
  const overheadS = overhead.fixed_s + overhead.per_row_s * fieldRows;
  return {
    design_points: expansion.points,
    jobs: perJob.length,
    duplicates: expansion.duplicates.length,
    workers,
    cell_updates_per_s: m.cell_updates_per_s,
    job_overhead_s: m.job_overhead_s,
    receiver_step_s: m.receiver_step_s,
    total_cell_updates: totalUpdates,
    total_core_hours: perJob.reduce((sum, p) => sum + p.core_hours, 0),
    wall_hours: longestFirstMakespan(perJob.map((p) => p.core_hours), workers) + overheadS / 3600,
    overhead_s: overheadS,
    field_rows: fieldRows,
    largest_memory_bytes: largest?.memory_bytes ?? 0,
    largest_memory_job: largest?.index ?? null,
    memory_cap_bytes: memoryCapBytes,
    fits: (largest?.memory_bytes ?? 0) <= memoryCapBytes,
    per_job: perJob,
  };
}

/** `job 3 (frequency_hz=20000)`: a job as messages name it. */
export function describeJob(p: Pick<JobPlan, 'index' | 'params'>): string {
  return `job ${p.index} (${describeParams(p.params)})`;
}
