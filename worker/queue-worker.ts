// The Redis worker behind `loamwave worker`: finds the sweep queues listed in the registry (or the ones it is
// told), runs one BullMQ worker per queue with the sandboxed processor in worker threads, and shuts down cleanly:
// a graceful stop lets running cases finish; an urgent stop cancels them and hands the jobs back to the queue.
import { Worker, type Job } from 'bullmq';
import { Redis } from 'ioredis';
import { fileURLToPath } from 'node:url';
import type { ProcessorThreadData } from './queue-processor.js';
import { registryKey } from '../schemas/queue-names.js';
import { CLOSE_LIMIT_MS, closeClient, closeWithin, type RedisSettings } from './redis-connection.js';
import { resultKeyFromEnv } from './result-seal.js';

export interface QueueWorkerOptions {
  /** ioredis options (see `redisOptions`). */
  readonly connection: RedisSettings;
  /** BullMQ key prefix. */
  readonly prefix: string;
  /** Cases solved at once per sweep queue. @defaultValue 1 */
  readonly concurrency?: number;
  /** How long a job's lock lasts without renewal, ms; a dead worker's job is taken over after about this. @defaultValue 30000 */
  readonly lockMs?: number;
  /** How often stalled jobs (lock expired) are looked for, ms. @defaultValue 30000 */
  readonly stalledIntervalMs?: number;
  /** How many times a job may stall (its worker died) before it fails. @defaultValue 2 */
  readonly maxStalledCount?: number;
  /** How many times a job may start, whatever the outcome: the last bound on a case that keeps killing its worker. @defaultValue 6 */
  readonly maxStartedAttempts?: number;
  /** Serve only these queues; otherwise serve every queue in the registry. */
  readonly queues?: readonly string[];
  /** How often the registry is read for new or finished sweeps, ms. @defaultValue 2000 */
  readonly discoverIntervalMs?: number;
  /** Largest memory one case may need, bytes. */
  readonly maxMemoryBytes: number;
  /**
   * Key shared with the coordinator: results are sealed with an HMAC-SHA256 (result-seal.ts).
   * @defaultValue the LOAMWAVE_RESULT_KEY environment variable, when set
   */
  readonly resultKey?: string;
  /** How long Redis may stay unreachable during a stop before the connections are dropped, ms. @defaultValue CLOSE_LIMIT_MS */
  readonly closeLimitMs?: number;
  /** One line per event (job started, done, failed, queue found), for the log. */
  readonly log?: (line: string) => void;
}

/** The compiled processor, whether this module runs compiled (dist/) or from source under vitest. */
function processorFile(): string {
  const here = import.meta.url;
  const url = here.endsWith('.ts') ? new URL('../dist/worker/queue-processor.js', here) : new URL('./queue-processor.js', here);
  return fileURLToPath(url);
}

export class QueueWorker {
  private readonly workers = new Map<string, Worker>();
  private readonly stopBuffer = new SharedArrayBuffer(Int32Array.BYTES_PER_ELEMENT);
  private readonly registry: Redis;
  private timer: NodeJS.Timeout | undefined;
  private closing: Promise<void> | undefined;
  private readonly retiring = new Set<Promise<void>>();
  /** Cases each BullMQ worker is running now (from its active, completed and failed events). */
  private readonly running = new Map<Worker, number>();
  private urgent = false;
  private urgentAtMs: number | undefined;

  constructor(private readonly opts: QueueWorkerOptions) {
    this.registry = new Redis({ ...opts.connection, lazyConnect: true });
    // Its status tells a stop whether Redis is reachable; a lost connection is reported by the BullMQ workers.
    this.registry.on('error', () => undefined);
  }

  /** Queue names being served now. */
  get serving(): string[] {
    return [...this.workers.keys()];
  }

  async start(): Promise<void> {
    await this.registry.connect();
    await this.discover();
    if (!this.opts.queues) {
      this.timer = setInterval(() => void this.discover().catch((e) => this.log(`registry read failed: ${(e as Error).message}`)), this.opts.discoverIntervalMs ?? 2000);
    }
  }

  /**
   * Stop. Graceful: running cases finish and are committed to the queue, no new ones start. Urgent (or a second
   * call while a graceful stop waits): running solves are cancelled and their jobs go back to the queue.
   * Safe to call more than once; every clean-up runs even when one throws.
   */
  stop(urgent = false): Promise<void> {
    if (urgent) {
      Atomics.store(new Int32Array(this.stopBuffer), 0, 1);
      this.urgent = true;
    }
    if (this.closing) return this.closing;
    if (this.timer) clearInterval(this.timer);
    this.closing = (async () => {
      const results = await Promise.allSettled([...this.workers.entries()].map(([name, w]) => this.closeWorker(name, w)));
      for (const r of results) if (r.status === 'rejected') this.log(`closing a queue worker failed: ${String(r.reason)}`);
      this.workers.clear();
      // Workers of finished sweeps still closing; the registry connection is their sign of a reachable Redis.
      await Promise.allSettled([...this.retiring]);
      await closeClient(this.registry, this.closeLimitMs);
    })();
    return this.closing;
  }

  private get closeLimitMs(): number {
    return this.opts.closeLimitMs ?? CLOSE_LIMIT_MS;
  }

  /**
   * Close one BullMQ worker. A graceful close waits for its running cases however long they take, but not for a
   * Redis that is gone nor for a close with no case left to finish: once either has lasted the close limit (or
   * the limit after an urgent stop), its connections are dropped. A job it held then stalls and
   * another worker takes it over, as after a crash.
   */
  private async closeWorker(name: string, w: Worker): Promise<void> {
    const limit = this.closeLimitMs;
    const closing = w.close();
    closing.catch(() => undefined);
    let unreachableSinceMs: number | undefined;
    for (;;) {
      const done = await Promise.race([closing.then(() => true), new Promise<false>((r) => setTimeout(() => r(false), 250))]);
      if (done) return;
      // Nothing left to wait for when Redis is gone, or when no case of this worker is running any more.
      const waiting = this.registry.status === 'ready' && (this.running.get(w) ?? 0) > 0;
      unreachableSinceMs = waiting ? undefined : (unreachableSinceMs ?? Date.now());
      const urgentOver = this.urgent && (this.urgentAtMs ??= Date.now()) + limit < Date.now();
      if (urgentOver || (unreachableSinceMs !== undefined && Date.now() - unreachableSinceMs > limit)) break;
    }
    this.log(`${name}: Redis did not answer while closing; disconnecting`);
    await closeWithin(() => w.close(true), () => w.disconnect(), limit);
    w.disconnect().catch(() => undefined);
  }

  private log(line: string): void {
    this.opts.log?.(line);
  }

  private async discover(): Promise<void> {
    if (this.closing) return;
    const wanted = this.opts.queues ? [...this.opts.queues] : await this.registry.smembers(registryKey(this.opts.prefix));
    for (const name of wanted) if (!this.workers.has(name)) this.serve(name);
    for (const [name, w] of this.workers) {
      if (!wanted.includes(name)) {
        this.workers.delete(name);
        this.log(`${name}: sweep finished, no longer serving it`);
        const retired = this.closeWorker(name, w).catch((e) => this.log(`closing a queue worker failed: ${String(e)}`));
        this.retiring.add(retired);
        void retired.finally(() => this.retiring.delete(retired));
      }
    }
  }

  private serve(name: string): void {
    const data: ProcessorThreadData = {
      maxMemoryBytes: this.opts.maxMemoryBytes,
      stopFlag: this.stopBuffer,
      resultKey: this.opts.resultKey ?? resultKeyFromEnv(),
    };
    const w = new Worker(name, processorFile(), {
      connection: this.opts.connection,
      prefix: this.opts.prefix,
      concurrency: this.opts.concurrency ?? 1,
      lockDuration: this.opts.lockMs ?? 30_000,
      stalledInterval: this.opts.stalledIntervalMs ?? 30_000,
      maxStalledCount: this.opts.maxStalledCount ?? 2,
      maxStartedAttempts: this.opts.maxStartedAttempts ?? 6,
      useWorkerThreads: true,
      workerThreadsOptions: { workerData: data },
    });
    const short = (job: Job | undefined) => (job?.id ?? '?').slice(0, 12);
    const count = (d: number) => this.running.set(w, Math.max(0, (this.running.get(w) ?? 0) + d));
    w.on('active', () => count(1));
    w.on('completed', () => count(-1));
    w.on('failed', () => count(-1));
    w.on('active', (job) => this.log(`${name}: job ${short(job)} started (attempt ${job.attemptsStarted})`));
    w.on('completed', (job) => this.log(`${name}: job ${short(job)} done`));
    w.on('failed', (job, err) => this.log(`${name}: job ${short(job)} failed: ${err.message}`));
    w.on('error', (err) => this.log(`${name}: ${err.message}`));
    this.workers.set(name, w);
    this.log(`${name}: serving (concurrency ${this.opts.concurrency ?? 1})`);
  }
}
