// The local pool of the embedded default: a fixed number of solver threads, each running one case at a time,
// fed from a first-in first-out queue (the caller orders it, e.g. longest first). The main thread stays free
// for the progress bar, signals and the ledger. Knows nothing of sweeps, the ledger or Redis.
import { Worker } from 'node:worker_threads';
import type { JobResult } from '../schemas/result.js';
import { CaseFailure } from './case-failure.js';
import { defaultMemoryCapBytes } from './run-case.js';
import type { RunMessage, SolverThreadData, ThreadMessage } from './thread-protocol.js';

export interface SolverPoolOptions {
  /** Number of solver threads (cases solved at once). */
  readonly threads: number;
  /**
   * Largest memory one case may need, bytes; larger cases fail with kind `too_large` before they start.
   * @defaultValue `defaultMemoryCapBytes(threads)`
   */
  readonly maxMemoryBytes?: number;
  /**
   * The compiled thread entry.
   * @defaultValue dist/worker/solve-thread.js
   */
  readonly threadEntry?: URL;
}

interface Task {
  readonly id: number;
  readonly caseInput: unknown;
  readonly jobId: string;
  readonly onProgress?: (fraction: number) => void;
  readonly resolve: (r: JobResult) => void;
  readonly reject: (e: CaseFailure) => void;
}

interface Slot {
  worker: Worker;
  readonly stopFlag: Int32Array;
  task: Task | undefined;
}

/** Where the compiled thread entry is, whether this module runs compiled (dist/) or from source under vitest. */
function defaultThreadEntry(): URL {
  const here = import.meta.url;
  return here.endsWith('.ts') ? new URL('../dist/worker/solve-thread.js', here) : new URL('./solve-thread.js', here);
}

export class SolverPool {
  private readonly slots: Slot[] = [];
  private readonly queue: Task[] = [];
  private readonly maxMemoryBytes: number;
  private readonly entry: URL;
  private nextTaskId = 1;
  private closed = false;
  private startedCount = 0;

  constructor(opts: SolverPoolOptions) {
    if (!Number.isInteger(opts.threads) || opts.threads < 1) {
      throw new Error(`Expected \`threads\` to be a positive integer (got ${opts.threads})`);
    }
    this.maxMemoryBytes = opts.maxMemoryBytes ?? defaultMemoryCapBytes(opts.threads);
    this.entry = opts.threadEntry ?? defaultThreadEntry();
    for (let i = 0; i < opts.threads; i++) this.slots.push(this.spawn());
  }

  /** How many cases have been handed to a solver thread so far (a resumed run that recomputes nothing shows 0). */
  get solvesStarted(): number {
    return this.startedCount;
  }

  /** Cases waiting for a free thread. */
  get queued(): number {
    return this.queue.length;
  }

  /** Cases being solved now. */
  get running(): number {
    return this.slots.filter((s) => s.task).length;
  }

  /** Solve one case on the next free thread; rejects with a `CaseFailure`. */
  run(caseInput: unknown, jobId: string, onProgress?: (fraction: number) => void): Promise<JobResult> {
    if (this.closed) return Promise.reject(new CaseFailure('cancelled', 'the pool is closed'));
    return new Promise<JobResult>((resolve, reject) => {
      this.queue.push({ id: this.nextTaskId++, caseInput, jobId, onProgress, resolve, reject });
      this.dispatch();
    });
  }

  /** Reject every case not yet started with kind `cancelled`; running cases go on. Returns how many. */
  cancelQueued(): number {
    const dropped = this.queue.splice(0);
    for (const t of dropped) t.reject(new CaseFailure('cancelled', 'not started: the run is stopping'));
    return dropped.length;
  }

  /** Ask every running case to stop; each then rejects with kind `cancelled` within one solver progress check. */
  stopRunning(): void {
    for (const s of this.slots) if (s.task) Atomics.store(s.stopFlag, 0, 1);
  }

  /** Stop everything and end the threads. Safe to call twice; every outstanding case rejects as `cancelled`. */
  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    this.cancelQueued();
    const ending: Promise<number>[] = [];
    for (const s of this.slots) {
      const t = s.task;
      s.task = undefined;
      t?.reject(new CaseFailure('cancelled', 'the pool was closed while the case ran'));
      ending.push(s.worker.terminate().catch(() => 0));
    }
    await Promise.all(ending);
  }

  private spawn(): Slot {
    const stopBuffer = new SharedArrayBuffer(Int32Array.BYTES_PER_ELEMENT);
    const data: SolverThreadData = { stopFlag: stopBuffer };
    const worker = new Worker(this.entry, { workerData: data });
    const slot: Slot = { worker, stopFlag: new Int32Array(stopBuffer), task: undefined };
    worker.on('message', (m: ThreadMessage) => this.onMessage(slot, m));
    worker.on('error', (err) => this.onThreadDeath(slot, `the solver thread failed: ${err.message}`));
    worker.on('exit', (code) => this.onThreadDeath(slot, `the solver thread exited (code ${code})`));
    return slot;
  }

  private onMessage(slot: Slot, m: ThreadMessage): void {
    const t = slot.task;
    if (!t || m.taskId !== t.id) return;
    if (m.type === 'progress') {
      t.onProgress?.(m.fraction);
      return;
    }
    slot.task = undefined;
    if (m.type === 'done') t.resolve(m.result);
    else t.reject(CaseFailure.fromWire(m.failure));
    this.dispatch();
  }

  /** A thread died (uncaught error, out of memory, exit): fail its case as `crashed` and start a fresh thread. */
  private onThreadDeath(slot: Slot, why: string): void {
    if (this.closed) return;
    const i = this.slots.indexOf(slot);
    if (i < 0) return; // 'error' and 'exit' both fire for one death
    const t = slot.task;
    slot.task = undefined;
    slot.worker.removeAllListeners();
    void slot.worker.terminate().catch(() => 0);
    this.slots[i] = this.spawn();
    t?.reject(new CaseFailure('crashed', why));
    this.dispatch();
  }

  private dispatch(): void {
    for (const s of this.slots) {
      if (s.task || this.queue.length === 0) continue;
      const t = this.queue.shift()!;
      s.task = t;
      Atomics.store(s.stopFlag, 0, 0);
      this.startedCount++;
      const msg: RunMessage = {
        type: 'run',
        taskId: t.id,
        caseInput: t.caseInput,
        jobId: t.jobId,
        maxMemoryBytes: this.maxMemoryBytes,
      };
      s.worker.postMessage(msg);
    }
  }
}
