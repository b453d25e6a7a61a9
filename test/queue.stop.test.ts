// Ctrl-C on `run --redis`: the coordinator stops following and exits 130, the jobs stay queued in Redis for the
// workers, and a later `collect --follow` (with a worker running) brings them home without queueing twins.
import type { ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Queue } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { queueNameFor } from '../schemas/queue-names.js';
import { redisOptions } from '../worker/redis-connection.js';
import { killAll, runCli, startCli, until } from './helpers/cli-process.js';
import { ensureCompiled } from './helpers/compiled.js';
import { removeKeys, startRedis, uniquePrefix, type TestRedis } from './helpers/redis.js';

let redis: TestRedis;
let scratch: string;
const prefix = uniquePrefix('stop');
const children: ChildProcess[] = [];

beforeAll(async () => {
  ensureCompiled();
  redis = await startRedis();
  scratch = mkdtempSync(join(tmpdir(), 'loamwave-stop-'));
});
afterAll(async () => {
  killAll(children);
  await removeKeys(redis.url, prefix);
  await redis.stop();
  rmSync(scratch, { recursive: true, force: true });
});

describe('run --redis stopped with Ctrl-C', () => {
  it('when the coordinator gets SIGINT then it exits 130, the jobs stay queued, and collect finishes them later', async () => {
    const name = 'ashby-stop';
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
        vary: { 'ground.segments[0].conductivity_s_per_m': { values: [0.001, 0.01, 0.1] } },
      }),
    );
    const out = join(scratch, 'out');
    const q = ['--redis', redis.url, '--prefix', prefix];
    const run = startCli(['run', sweep, '--out', out, '--no-report', ...q], scratch, children);
    await until('the jobs to be queued', () => run.log().includes('3 job(s) queued'));
    run.child.kill('SIGINT');
    expect((await run.exited).code, run.log()).toBe(130);
    expect(run.log()).toContain('the jobs stay queued');

    const queue = new Queue(queueNameFor(name), { connection: redisOptions({ url: redis.url }), prefix });
    try {
      expect(await queue.getJobCountByTypes('prioritized', 'waiting')).toBe(3);
    } finally {
      await queue.close();
    }

    const worker = startCli(['worker', ...q, '--sweep', name], scratch, children);
    const collected = await runCli(['collect', sweep, '--out', out, '--follow', '--json', '--no-report', ...q], scratch);
    expect(collected.code, collected.stderr).toBe(0);
    expect(JSON.parse(collected.stdout)).toMatchObject({ committed: 3, complete: true, counts: { done: 3 } });
    worker.child.kill('SIGTERM');
    expect((await worker.exited).code).toBe(0);
    expect(worker.log().match(/ done$/gm)?.length).toBe(3);
  });
});
