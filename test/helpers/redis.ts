// A real Redis for the queue tests: REDIS_URL when set, otherwise a throwaway `redis-server` from PATH on a free
// loopback port (stopped afterwards); with neither, the tests fail at once with one line saying how to get one.
// Each test takes its own key prefix and removes its keys afterwards, so tests can share one server.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { connect, createServer } from 'node:net';
import { Redis } from 'ioredis';

export interface TestRedis {
  readonly url: string;
  /** Stop the throwaway server (nothing for REDIS_URL). */
  stop(): Promise<void>;
}

export interface ThrowawayRedis extends TestRedis {
  /** Kill the server with SIGKILL (a crash: no shutdown save). */
  crash(): Promise<void>;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const port = (srv.address() as { port: number }).port;
      srv.close(() => resolve(port));
    });
  });
}

/** Any RESP reply to PING (+PONG, or -NOAUTH from a server that wants a password) means the server is up. */
function pingOnce(url: string): Promise<void> {
  const u = new URL(url);
  return new Promise((resolve, reject) => {
    const sock = connect({ host: u.hostname, port: Number(u.port || 6379) });
    sock.setTimeout(1000);
    sock.once('connect', () => sock.write('PING\r\n'));
    sock.once('data', (d) => {
      sock.destroy();
      const first = d.toString()[0];
      if (first === '+' || first === '-') resolve();
      else reject(new Error(`unexpected reply ${JSON.stringify(d.toString())}`));
    });
    sock.once('timeout', () => {
      sock.destroy();
      reject(new Error('no reply'));
    });
    sock.once('error', reject);
  });
}

async function waitForPing(url: string, timeoutMs: number): Promise<void> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    try {
      return await pingOnce(url);
    } catch (e) {
      if (Date.now() > until) throw new Error(`Redis at ${url} did not answer within ${timeoutMs} ms: ${(e as Error).message}`);
      await new Promise((r) => setTimeout(r, 50));
    }
  }
}

/**
 * The Redis to test against. `extraArgs` (e.g. a different eviction policy) always start a throwaway server,
 * since a shared server's settings must not be changed by a test.
 */
export async function startRedis(extraArgs: string[] = []): Promise<TestRedis> {
  if (process.env.REDIS_URL && extraArgs.length === 0) {
    await waitForPing(process.env.REDIS_URL, 2000);
    return { url: process.env.REDIS_URL, stop: async () => undefined };
  }
  return startThrowawayRedis(extraArgs);
}

/**
 * Always a fresh redis-server from PATH (for tests that crash and restart it). `port` and `dir` let a restart
 * reuse the address and the data folder (append-only file) of an earlier one.
 */
export async function startThrowawayRedis(extraArgs: string[] = [], at: { port?: number; dir?: string } = {}): Promise<ThrowawayRedis> {
  if (spawnSync('redis-server', ['--version']).status !== 0) {
    throw new Error('no Redis for the queue tests: set REDIS_URL=redis://host:port, or install redis-server (apt-get install redis-server)');
  }
  const port = at.port ?? (await freePort());
  const child: ChildProcess = spawn(
    'redis-server',
    ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--maxmemory-policy', 'noeviction', ...(at.dir ? ['--dir', at.dir] : []), ...extraArgs],
    { stdio: 'ignore' },
  );
  const url = `redis://127.0.0.1:${port}`;
  await waitForPing(url, 5000);
  const ended = (signal: NodeJS.Signals) =>
    new Promise<void>((resolve) => {
      if (child.exitCode !== null || child.signalCode !== null) return resolve();
      child.once('exit', () => resolve());
      child.kill(signal);
    });
  return { url, stop: () => ended('SIGTERM'), crash: () => ended('SIGKILL') };
}

/** A key prefix no other test uses. */
export function uniquePrefix(label: string): string {
  return `lwtest-${label}-${randomBytes(4).toString('hex')}`;
}

/** Delete every key under `prefix:` (SCAN, never KEYS, so a shared server is not blocked). */
export async function removeKeys(url: string, prefix: string): Promise<number> {
  const c = new Redis(url);
  let removed = 0;
  try {
    let cursor = '0';
    do {
      const [next, keys] = await c.scan(cursor, 'MATCH', `${prefix}:*`, 'COUNT', 500);
      cursor = next;
      if (keys.length > 0) removed += await c.del(...keys);
    } while (cursor !== '0');
  } finally {
    c.disconnect();
  }
  return removed;
}

/** Keys under `prefix:` now. */
export async function keysUnder(url: string, prefix: string): Promise<string[]> {
  const c = new Redis(url);
  const out: string[] = [];
  try {
    let cursor = '0';
    do {
      const [next, keys] = await c.scan(cursor, 'MATCH', `${prefix}:*`, 'COUNT', 500);
      cursor = next;
      out.push(...keys);
    } while (cursor !== '0');
  } finally {
    c.disconnect();
  }
  return out;
}
