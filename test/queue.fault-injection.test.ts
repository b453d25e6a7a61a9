// A queued sweep of 60 small jobs through every fault the night can bring, on loopback with a Redis of its own
// (append-only file): workers SIGKILLed mid-job again and again, the `run --redis` coordinator SIGKILLed and rerun,
// `collect --follow` SIGKILLed and restarted, Redis SIGKILLed and restarted on its append-only file, and at the very
// end a worker, the collector and then Redis killed just as the collector completes the ledger (the shutdown race:
// its closes must end within their limit and the process exit by itself). Afterwards every job is in the ledger and
// in runs.parquet exactly once, bit-identical (DuckDB reading both files) to a fault-free embedded run.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { ExitCode } from '../schemas/exit-codes.js';
import { until, type Background } from './helpers/cli-process.js';
import { queueFixture } from './helpers/queue-fixture.js';
import type { ThrowawayRedis } from './helpers/redis.js';

// Its own Redis only (crashed and restarted here).
const fx = queueFixture('faults', { sharedRedis: false });

/** 6 × 10 = 60 small cases (20 cells per wavelength over 60 km × 20 km: under a second each), slow enough that faults land mid-sweep. */
const CONDUCTIVITIES_S_PER_M = [0.001, 0.002, 0.003, 0.005, 0.01, 0.02];
const PERMITTIVITIES = [4, 5, 7, 10, 13, 15, 20, 25, 30, 40];
const N = CONDUCTIVITIES_S_PER_M.length * PERMITTIVITIES.length;
const SWEEP_NAME = 'quorvessin-night';

/**
 * How long a process that was not killed may take to exit once its work is done, ms: the collector's close limit
 * (5 s per step, CLOSE_LIMIT_MS in worker/redis-connection.ts: retire, events, queue, client) plus the exit guard's
 * 5 s would be at most 25 s in the worst case; a clean exit takes well under a second. Common practice.
 */
const EXIT_BOUND_MS = 30_000;

/** Columns that differ between any two runs by nature (clock and retry count), left out of the comparison. */
const RUN_DEPENDENT = ['wall_time_s', 'attempts', 'queued_at_ms', 'started_at_ms', 'finished_at_ms'];

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

function doneInLedger(out: string): number {
  try {
    const db = new Database(join(out, 'ledger.sqlite'), { readonly: true, fileMustExist: true });
    try {
      return (db.prepare(`SELECT COUNT(*) AS n FROM jobs WHERE status = 'done'`).get() as { n: number }).n;
    } finally {
      db.close();
    }
  } catch {
    return 0; // not created yet, or busy for a moment
  }
}

const count = (text: string, re: RegExp) => text.match(re)?.length ?? 0;

describe('a queued sweep under repeated faults', () => {
  it('when workers, coordinators, collectors and Redis are SIGKILLed throughout and at the end then every job is there once, bit-identical to an embedded run', async () => {
    const startedMs = Date.now();
    const sweep = join(fx.scratch, `${SWEEP_NAME}.json`);
    writeFileSync(
      sweep,
      JSON.stringify({
        name: SWEEP_NAME,
        base: {
          frequency_hz: 20000,
          ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
          domain: { range_m: 60000, height_m: 20000 },
          grid: { cells_per_wavelength: 20 },
          receivers: { ranges_m: [10000, 30000, 50000] },
        },
        vary: {
          'ground.segments[0].conductivity_s_per_m': { values: CONDUCTIVITIES_S_PER_M },
          'ground.segments[0].relative_permittivity': { values: PERMITTIVITIES },
        },
      }),
    );

    // The fault-free reference: the embedded run.
    const refOut = join(fx.scratch, 'out-embedded');
    const ref = await fx.run(['run', sweep, '--out', refOut, '--no-report', '--workers', '2']);
    expect(ref.code, ref.stderr).toBe(ExitCode.done);

    const dir = mkdtempSync(join(fx.scratch, 'redis-'));
    const aof = ['--appendonly', 'yes', '--save', ''];
    let redis: ThrowawayRedis = await fx.throwawayRedis(aof, { dir });
    const port = Number(new URL(redis.url).port);
    const q = fx.queueArgs(fx.prefix, redis.url);
    const out = join(fx.scratch, 'out-queued');
    const kills = { worker: 0, coordinator: 0, collector: 0, redis: 0 };
    const allWorkers: Background[] = [];
    let live: Background[] = [];

    const startWorker = () => {
      const w = fx.start(['worker', ...q, '--sweep', SWEEP_NAME, '--lock-ms', '2000', '--stalled-interval-ms', '1000', '--max-stalled', '50']);
      allWorkers.push(w);
      live.push(w);
      return w;
    };
    const busy = (w: Background) => count(w.log(), / started \(attempt /g) > count(w.log(), / done$/gm) + count(w.log(), / failed: /g);
    /** SIGKILL a worker while it solves a case (a fraction of a second window: poll until one is caught), and replace it. */
    const killWorkerMidJob = async (withinMs = 30_000): Promise<boolean> => {
      let victim: Background | undefined;
      try {
        await until('a worker in the middle of a job', () => (victim = live.find(busy)) !== undefined, withinMs);
      } catch (e) {
        if (withinMs >= 30_000) throw new Error(`${(e as Error).message} (${doneInLedger(out)} done in the ledger); the workers' last lines:\n${live.map((w) => w.log().split('\n').slice(-6).join('\n')).join('\n--\n')}`);
        return false; // the sweep's last jobs were all finished already
      }
      victim!.child.kill('SIGKILL');
      expect((await victim!.exited).signal).toBe('SIGKILL');
      kills.worker++;
      live = live.filter((w) => w !== victim);
      startWorker();
      return true;
    };
    const kill = async (p: Background, what: 'coordinator' | 'collector') => {
      p.child.kill('SIGKILL');
      expect((await p.exited).signal).toBe('SIGKILL');
      kills[what]++;
    };
    const crashRedis = async (downMs: number) => {
      await redis.crash();
      kills.redis++;
      await sleep(downMs);
      redis = await fx.throwawayRedis(aof, { port, dir });
    };
    const atLeast = (n: number) => until(`${n} jobs done in the ledger`, () => doneInLedger(out) >= n, 90_000);
    const collect = () => fx.start(['collect', sweep, '--out', out, '--follow', '--no-report', ...q]);

    startWorker();
    startWorker();
    const run1 = fx.start(['run', sweep, '--out', out, '--no-report', ...q]);
    await atLeast(5);
    await killWorkerMidJob();
    await atLeast(10);
    await kill(run1, 'coordinator');
    const run2 = fx.start(['run', sweep, '--out', out, '--no-report', ...q]);
    await atLeast(18);
    await crashRedis(500);
    await atLeast(25);
    await killWorkerMidJob();
    await kill(run2, 'coordinator');
    const collect1 = collect();
    await atLeast(33);
    await kill(collect1, 'collector');
    const collect2 = collect();
    await atLeast(42);
    await crashRedis(1000);
    await killWorkerMidJob();
    // The very end: the collector, a worker, then Redis just as the collector completes the ledger. The collector
    // goes first: hunting a worker mid-job may take seconds, in which a faster solver can finish the last jobs and
    // let the collector complete the ledger and exit by itself before the SIGKILL.
    await atLeast(N - 8);
    await kill(collect2, 'collector');
    const collect3 = collect();
    const lateWorkerKill = await killWorkerMidJob(5_000);
    await until('the ledger to be complete', () => doneInLedger(out) === N, 90_000);
    const completeMs = Date.now();
    await redis.crash();
    kills.redis++;
    // Redis comes back while the collector shuts down (a restart during shutdown) only after 3 s.
    const restarted = sleep(3000).then(async () => (redis = await fx.throwawayRedis(aof, { port, dir })));
    const ended = await Promise.race([collect3.exited, sleep(EXIT_BOUND_MS).then(() => undefined)]);
    const collectorExitS = (Date.now() - completeMs) / 1000;
    expect(ended, `collect --follow did not exit within ${EXIT_BOUND_MS} ms of completing the ledger:\n${collect3.log()}`).toBeDefined();
    expect(ended!.code, collect3.log()).toBe(ExitCode.done);
    await restarted;

    // A rerun of the coordinator after all this: nothing to do, exits by itself with success.
    const run3 = fx.start(['run', sweep, '--out', out, '--no-report', '--json', ...q]);
    const rerun = await Promise.race([run3.exited, sleep(EXIT_BOUND_MS).then(() => undefined)]);
    expect(rerun?.code, run3.log()).toBe(ExitCode.done);
    expect(JSON.parse(run3.log().slice(run3.log().indexOf('{'))).counts).toMatchObject({ done: N, failed: 0 });

    // Workers not killed: a SIGTERM (finish running cases, there are none) and they exit by themselves with success.
    for (const w of live) w.child.kill('SIGTERM');
    for (const w of live) {
      const e = await Promise.race([w.exited, sleep(EXIT_BOUND_MS).then(() => undefined)]);
      expect(e?.code, w.log()).toBe(ExitCode.done);
    }

    // The ledger: every job done, one result each.
    const ledger = new Database(join(out, 'ledger.sqlite'), { readonly: true });
    const l = ledger.prepare(`SELECT COUNT(*) AS jobs, SUM(status = 'done') AS done, (SELECT COUNT(*) FROM results) AS results, (SELECT COUNT(DISTINCT job_id) FROM results) AS distinct_results FROM jobs`).get();
    ledger.close();
    expect(l).toEqual({ jobs: N, done: N, results: N, distinct_results: N });

    // runs.parquet and fields/: each job once, and every value equal to the embedded run's (Object.is: bit-identical).
    const duck = await DuckDBInstance.create(':memory:');
    const conn = await duck.connect();
    try {
      const read = async (sql: string) => (await conn.runAndReadAll(sql)).getRowObjectsJS() as Record<string, unknown>[];
      const runs = (d: string) => `SELECT * EXCLUDE (${RUN_DEPENDENT.join(', ')}) FROM read_parquet('${join(d, 'runs.parquet')}') ORDER BY job_id`;
      const [{ rows, ids }] = await read(`SELECT COUNT(*) AS rows, COUNT(DISTINCT job_id) AS ids FROM read_parquet('${join(out, 'runs.parquet')}')`);
      expect([Number(rows), Number(ids)]).toEqual([N, N]);
      const got = await read(runs(out));
      const want = await read(runs(refOut));
      expect(got.length).toBe(N);
      expect(got).toStrictEqual(want);
      const fields = (d: string) => `SELECT * FROM read_parquet('${join(d, 'fields', '**', '*.parquet')}', hive_partitioning = true) ORDER BY ALL`;
      const gotFields = await read(fields(out));
      expect(gotFields.length).toBe(N * 3);
      expect(gotFields).toStrictEqual(await read(fields(refOut)));
    } finally {
      conn.closeSync();
      duck.closeSync();
    }

    const logs = allWorkers.map((w) => w.log()).join('\n');
    const starts = count(logs, / started \(attempt /g);
    const retries = count(logs, / started \(attempt ([2-9]|\d\d+)\)/g);
    console.info(
      `fault injection: ${N} jobs; SIGKILLs: ${kills.worker} workers mid-job, ${kills.coordinator} run --redis coordinators, ` +
        `${kills.collector} collectors, ${kills.redis} Redis; ${starts} job starts (${starts - N} more than jobs, ${retries} with attempt > 1); ` +
        `collector exit ${collectorExitS.toFixed(1)} s after the ledger was complete with Redis down; wall ${((Date.now() - startedMs) / 1000).toFixed(1)} s`,
    );
    if (!lateWorkerKill) console.info('fault injection: no worker was mid-job at the end of the sweep this time');
    expect(kills).toEqual({ worker: lateWorkerKill ? 4 : 3, coordinator: 2, collector: 2, redis: 3 });
  }, 240_000);
});
