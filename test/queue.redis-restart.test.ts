// Redis crashing under a running sweep (SIGKILL, then a restart on the same port): with an append-only file the
// queue survives and the sweep completes without resubmitting; without persistence the queue is gone, and
// `run --redis` notices and queues the missing jobs again. Either way every job ends done, none twice.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { until } from './helpers/cli-process.js';
import { queueFixture } from './helpers/queue-fixture.js';

// Its own servers only (crashed and restarted here): the shared test Redis is not needed.
const fx = queueFixture('restart', { sharedRedis: false });

describe('Redis restart mid-sweep', () => {
  it.each<[string, string[], boolean]>([
    ['an append-only file', ['--appendonly', 'yes', '--appendfsync', 'always'], false],
    ['no persistence', [], true],
  ])('when Redis with %s is killed and restarted then the sweep still completes', async (_what, persistence, resubmits) => {
    const dir = mkdtempSync(join(fx.scratch, 'redis-'));
    const first = await fx.throwawayRedis(persistence, { dir });
    const port = Number(new URL(first.url).port);
    const name = `moorgate-restart-${resubmits ? 'lost' : 'kept'}`;
    const sweep = join(fx.scratch, `${name}.json`);
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
    const out = join(fx.scratch, `out-${name}`);
    const q = fx.queueArgs(fx.newPrefix('restart'), first.url);

    // The coordinator submits and follows; no worker yet, so all four jobs sit in Redis.
    const run = fx.start(['run', sweep, '--out', out, '--no-report', '--json', ...q]);
    await until('the jobs to be queued', () => run.log().includes('4 job(s) queued'));
    await first.crash();
    const second = await fx.throwawayRedis(persistence, { port, dir });

    const worker = fx.start(['worker', ...q, '--sweep', name]);
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
