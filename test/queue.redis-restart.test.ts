// Redis crashing under a running sweep (SIGKILL, then a restart on the same port): with an append-only file the
// queue survives and the sweep completes without resubmitting; without persistence the queue is gone, and
// `run --redis` notices and queues the missing jobs again. Either way every job ends done, none twice.
import type { ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { killAll, startCli, until } from './helpers/cli-process.js';
import { ensureCompiled } from './helpers/compiled.js';
import { startThrowawayRedis, type ThrowawayRedis } from './helpers/redis.js';

let scratch: string;
const children: ChildProcess[] = [];
const servers: ThrowawayRedis[] = [];

beforeAll(() => {
  ensureCompiled();
  scratch = mkdtempSync(join(tmpdir(), 'loamwave-restart-'));
});
afterAll(async () => {
  killAll(children);
  for (const s of servers) await s.stop();
  rmSync(scratch, { recursive: true, force: true });
});

describe('Redis restart mid-sweep', () => {
  it.each<[string, string[], boolean]>([
    ['an append-only file', ['--appendonly', 'yes', '--appendfsync', 'always'], false],
    ['no persistence', [], true],
  ])('when Redis with %s is killed and restarted then the sweep still completes', async (_what, persistence, resubmits) => {
    const dir = mkdtempSync(join(scratch, 'redis-'));
    const first = await startThrowawayRedis(persistence, { dir });
    servers.push(first);
    const port = Number(new URL(first.url).port);
    const name = `moorgate-restart-${resubmits ? 'lost' : 'kept'}`;
    const sweep = join(scratch, `${name}.json`);
    writeFileSync(
      sweep,
      JSON.stringify({
        name,
        base: {
          frequency_hz: 20000,
          ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
          domain: { range_m: 60000, height_m: 20000 },
          grid: { cells_per_wavelength: 8 },
          receivers: { ranges_m: [10000, 50000] },
        },
        vary: { 'ground.segments[0].conductivity_s_per_m': { values: [0.001, 0.003, 0.01, 0.03] } },
      }),
    );
    const out = join(scratch, `out-${name}`);
    const q = ['--redis', first.url, '--prefix', 'lwtest-restart'];

    // The coordinator submits and follows; no worker yet, so all four jobs sit in Redis.
    const run = startCli(['run', sweep, '--out', out, '--no-report', '--json', ...q], scratch, children);
    await until('the jobs to be queued', () => run.log().includes('4 job(s) queued'));
    await first.crash();
    const second = await startThrowawayRedis(persistence, { port, dir });
    servers.push(second);

    const worker = startCli(['worker', ...q, '--sweep', name], scratch, children);
    const { code } = await run.exited;
    expect(code, run.log()).toBe(0);
    expect(JSON.parse(run.log().slice(run.log().indexOf('{'))).counts).toMatchObject({ done: 4, failed: 0 });
    expect(run.log().includes('queueing them again')).toBe(resubmits);

    const db = new Database(join(out, 'ledger.sqlite'), { readonly: true });
    const n = (db.prepare('SELECT COUNT(*) AS n FROM results').get() as { n: number }).n;
    db.close();
    expect(n).toBe(4);
    // Each job ran once: the worker logged four completions, no more.
    expect(worker.log().match(/ done$/gm)?.length).toBe(4);
    worker.child.kill('SIGTERM');
    expect((await worker.exited).code).toBe(0);
    await second.stop();
  });
});
