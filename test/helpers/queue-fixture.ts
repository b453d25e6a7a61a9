// The set-up the queue tests share: a Redis (REDIS_URL, else a throwaway server), a random key prefix of their
// own, a scratch folder, the command-line processes they start, and one clean-up that kills those processes,
// removes the prefixes' keys and closes everything, each step within a time limit and every step run even when one
// fails. It registers vitest hooks where it is called (a file's top level or a describe) and knows nothing of what
// the tests check.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Queue } from 'bullmq';
import { afterAll, beforeAll } from 'vitest';
import { queueNameFor } from '../../schemas/queue-names.js';
import { redisOptions } from '../../worker/redis-connection.js';
import { runCli, runCliSync, startCli, type Background, type Finished } from './cli-process.js';
import { ensureCompiled } from './compiled.js';
import { removeKeys, startRedis, startThrowawayRedis, uniquePrefix, type TestRedis, type ThrowawayRedis } from './redis.js';

/**
 * How long one clean-up step may take (ms). Closing a BullMQ queue, a SCAN-and-DEL of one test's keys or the exit
 * of a SIGKILLed process take well under a second on a local server; 10 s leaves room on a loaded 2-core machine
 * and still fails long before vitest's 120 s hook timeout, naming the step that hung.
 */
export const CLOSE_LIMIT_MS = 10_000;

/** Run `close` and wait at most `limitMs` for it; past that, fail naming `what` (a Redis gone away, a stuck process). */
export async function closeWithin(what: string, close: () => unknown, limitMs: number = CLOSE_LIMIT_MS): Promise<void> {
  let timer: NodeJS.Timeout | undefined;
  const expired = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} did not finish within ${limitMs} ms`)), limitMs);
  });
  try {
    await Promise.race([Promise.resolve().then(close), expired]);
  } finally {
    clearTimeout(timer);
  }
}

/** Run every clean-up step in order, each within the limit; then throw what failed (one error, or all of them). */
async function cleanUp(steps: ReadonlyArray<readonly [string, () => unknown]>): Promise<void> {
  const errors: unknown[] = [];
  for (const [what, step] of steps) {
    try {
      await closeWithin(what, step);
    } catch (e) {
      errors.push(e);
    }
  }
  if (errors.length === 1) throw errors[0];
  if (errors.length > 1) throw new AggregateError(errors, `${errors.length} clean-up steps failed: ${errors.map((e) => (e as Error).message).join('; ')}`);
}

/** Fail clearly when a fixture value is read at collection time, before its beforeAll has run. */
function ready<T>(value: T | undefined, what: string): T {
  if (value === undefined) throw new Error(`queue fixture: ${what} is set in beforeAll; read it inside a test or hook, not at collection time`);
  return value;
}

const makeScratch = (label: string): string => mkdtempSync(join(tmpdir(), `loamwave-${label}-`));

/** A folder under the system temp folder made before the tests of this file (or describe) and removed after them. */
export function scratchFolder(label: string): { readonly path: string } {
  let path: string | undefined;
  beforeAll(() => {
    path = makeScratch(label);
  });
  afterAll(() => {
    if (path !== undefined) rmSync(path, { recursive: true, force: true });
  });
  return {
    get path() {
      return ready(path, 'the scratch folder');
    },
  };
}

export interface QueueFixtureOptions {
  /**
   * Whether to connect to the shared test Redis (REDIS_URL, else a throwaway server) before the tests. A test that
   * crashes and restarts its own servers (`throwawayRedis`) needs none.
   * @defaultValue true
   */
  readonly sharedRedis?: boolean;
  /**
   * Whether to compile dist/ first, for tests that spawn the command line or workers.
   * @defaultValue true
   */
  readonly compile?: boolean;
}

export interface QueueFixture {
  /** The shared test Redis's URL. */
  readonly url: string;
  /** This file's (or describe's) scratch folder; processes started here run in it. */
  readonly scratch: string;
  /** The key prefix made for this fixture (random, removed after the tests). */
  readonly prefix: string;
  /** Another random key prefix, for a test that wants one of its own; its keys are removed after the tests too. */
  newPrefix(label: string): string;
  /** `--redis URL --prefix PREFIX` for the command line (this fixture's prefix and the shared Redis by default). */
  queueArgs(prefix?: string, url?: string): string[];
  /** Start `loamwave args…` in the scratch folder in the background; it is killed after the tests if still running. */
  start(args: string[]): Background;
  /** Run `loamwave args…` in the scratch folder to completion without blocking. */
  run(args: string[]): Promise<Finished>;
  /** Run `loamwave args…` in the scratch folder to completion, blocking. */
  runSync(args: string[], env?: NodeJS.ProcessEnv): Finished;
  /** A fresh redis-server of the test's own (see startThrowawayRedis), stopped after the tests if still running. */
  throwawayRedis(extraArgs?: string[], at?: { port?: number; dir?: string }): Promise<ThrowawayRedis>;
  /** The BullMQ queue of sweep `sweepName` on the shared Redis, for looking into; closed after the tests if still open. */
  openQueue(sweepName: string, prefix?: string): Queue;
  /** Close a queue from `openQueue` now, within the time limit. */
  close(queue: Queue): Promise<void>;
}

/**
 * Register the queue tests' set-up and clean-up where this is called (top level of a test file, or a describe).
 * After the tests: background processes are killed (and their exit awaited), queues closed, every prefix's keys
 * removed from the shared Redis, servers stopped and the scratch folder removed, each step within CLOSE_LIMIT_MS.
 * Keys written to a throwaway server go with it (no save; its data folder lies in the scratch folder).
 */
export function queueFixture(label: string, options: QueueFixtureOptions = {}): QueueFixture {
  const { sharedRedis = true, compile = true } = options;
  const prefixes = [uniquePrefix(label)];
  const children: Background[] = [];
  const queues: Queue[] = [];
  const servers: ThrowawayRedis[] = [];
  let redis: TestRedis | undefined;
  let scratch: string | undefined;

  beforeAll(async () => {
    if (compile) ensureCompiled();
    scratch = makeScratch(label);
    if (sharedRedis) redis = await startRedis();
  });

  afterAll(async () => {
    const running = children.filter((c) => c.child.exitCode === null && c.child.signalCode === null);
    await cleanUp([
      ...running.map((c) => [`the exit of killed process ${c.child.pid}`, () => {
        c.child.kill('SIGKILL');
        return c.exited;
      }] as const),
      ...queues.map((q) => [`closing queue ${q.name}`, () => q.close()] as const),
      ...(redis ? prefixes.map((p) => [`removing the keys ${p}:*`, () => removeKeys(redis!.url, p)] as const) : []),
      ...servers.map((s) => [`stopping the throwaway Redis at ${s.url}`, () => s.stop()] as const),
      ...(redis ? [[`stopping the test Redis`, () => redis!.stop()] as const] : []),
      ...(scratch ? [[`removing ${scratch}`, () => rmSync(scratch!, { recursive: true, force: true })] as const] : []),
    ]);
  });

  const fx: QueueFixture = {
    get url() {
      if (!sharedRedis) throw new Error('queue fixture: made with sharedRedis: false, so it has no shared Redis URL');
      return ready(redis, 'the Redis').url;
    },
    get scratch() {
      return ready(scratch, 'the scratch folder');
    },
    prefix: prefixes[0],
    newPrefix(name) {
      const p = uniquePrefix(name);
      prefixes.push(p);
      return p;
    },
    queueArgs(prefix = fx.prefix, url = fx.url) {
      return ['--redis', url, '--prefix', prefix];
    },
    start(args) {
      const b = startCli(args, fx.scratch);
      children.push(b);
      return b;
    },
    run: (args) => runCli(args, fx.scratch),
    runSync: (args, env) => runCliSync(args, fx.scratch, env),
    async throwawayRedis(extraArgs = [], at = {}) {
      const s = await startThrowawayRedis(extraArgs, at);
      servers.push(s);
      return s;
    },
    openQueue(sweepName, prefix = fx.prefix) {
      const q = new Queue(queueNameFor(sweepName), { connection: redisOptions({ url: fx.url }), prefix });
      queues.push(q);
      return q;
    },
    async close(queue) {
      await closeWithin(`closing queue ${queue.name}`, () => queue.close());
      const i = queues.indexOf(queue);
      if (i >= 0) queues.splice(i, 1);
    },
  };
  return fx;
}
