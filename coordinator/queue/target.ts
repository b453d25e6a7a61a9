// Where a sweep's queue lives: the Redis connection (from --redis/--redis-ca), the BullMQ key prefix and the
// queue name derived from the sweep name; opens the BullMQ handles and a plain client for the registry, and
// warns once about server settings that can lose jobs.
import { Queue, QueueEvents } from 'bullmq';
import { Redis } from 'ioredis';
import { UserError } from '../../schemas/errors.js';
import { queueNameFor, registryKey } from '../../schemas/queue-names.js';
import { CLOSE_LIMIT_MS, closeClient, closeWithin, probeRedis, redactedUrl, redisOptions, type RedisSettings } from '../../worker/redis-connection.js';

/** Where a queue command connects, as the command line gives it (`--redis`, `--redis-ca`, `--prefix`). */
export interface QueueSettings {
  redis?: string;
  redisCa?: string;
  prefix: string;
}

export interface QueueTarget {
  readonly url: string;
  readonly connection: RedisSettings;
  readonly prefix: string;
  readonly queueName: string;
}

/** Validate the command-line options of a queue and name the sweep's queue. */
export function queueTarget(opts: { redis: string; redisCa?: string; prefix: string }, sweepName: string): QueueTarget {
  if (!/^[A-Za-z0-9._-]+$/.test(opts.prefix)) {
    throw new UserError(`--prefix: "${opts.prefix}" may hold only letters, digits, ".", "_" and "-" (it starts every Redis key)`);
  }
  return {
    url: opts.redis,
    connection: redisOptions({ url: opts.redis, caFile: opts.redisCa }),
    prefix: opts.prefix,
    queueName: queueNameFor(sweepName),
  };
}

/** The open handles of one sweep's queue; `close()` is safe to call twice and runs every clean-up. */
export class QueueHandles {
  readonly client: Redis;
  private queueHandle: Queue | undefined;
  private events: QueueEvents | undefined;
  private closed = false;

  private constructor(readonly target: QueueTarget) {
    this.client = new Redis({ ...target.connection, lazyConnect: true });
  }

  /**
   * Connect (one line naming the URL when Redis cannot be reached or refuses the password) and return the
   * server's warnings. The BullMQ handles open only after this check, so a bad URL never prints their errors.
   */
  static async open(target: QueueTarget): Promise<{ handles: QueueHandles; warnings: string[] }> {
    const h = new QueueHandles(target);
    let warnings: string[];
    try {
      warnings = await probeRedis(h.client, target.url);
    } catch (e) {
      await h.close();
      throw e;
    }
    // Connected: from now on ride out a Redis restart like the BullMQ connections do (ioredis' default backoff).
    h.client.options.retryStrategy = (times: number) => Math.min(times * 50, 2000);
    // The BullMQ handles report a lost connection; this client's errors would otherwise be unhandled error events.
    h.client.on('error', () => undefined);
    return { handles: h, warnings };
  }

  /** The sweep's BullMQ queue. */
  get queue(): Queue {
    if (!this.queueHandle) {
      this.queueHandle = new Queue(this.target.queueName, { connection: this.target.connection, prefix: this.target.prefix });
      this.queueHandle.on('error', (e) => process.stderr.write(`warning: queue connection: ${e.message}\n`));
    }
    return this.queueHandle;
  }

  /** Events of the queue (completed, failed, progress), opened on first use. */
  queueEvents(): QueueEvents {
    if (!this.events) {
      this.events = new QueueEvents(this.target.queueName, { connection: this.target.connection, prefix: this.target.prefix });
      this.events.on('error', (e) => process.stderr.write(`warning: queue events connection: ${e.message}\n`));
    }
    return this.events;
  }

  /** The Redis key of the registry set that workers read. */
  get registryKey(): string {
    return registryKey(this.target.prefix);
  }

  /**
   * Close the events, the queue and the client, each within `limitMs`: a step that does not finish in time (Redis
   * died or is restarting under it) is disconnected forcibly, so closing never waits for the server to return.
   * Returns false when any step had to be forced. Safe to call twice.
   */
  async close(limitMs: number = CLOSE_LIMIT_MS): Promise<boolean> {
    if (this.closed) return true;
    this.closed = true;
    const events = this.events;
    const queue = this.queueHandle;
    const clean = [
      events ? await closeWithin(() => events.close(), () => events.disconnect(), limitMs) : true,
      queue ? await closeWithin(() => queue.close(), () => queue.disconnect(), limitMs) : true,
      await closeClient(this.client, limitMs),
    ];
    return clean.every(Boolean);
  }
}
