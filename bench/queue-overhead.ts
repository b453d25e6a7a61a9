// Benchmark: what the Redis path costs per job beyond the solve itself, against the embedded pool. One worker
// process (concurrency 1) and one local thread run the same sweep of trivial cases one at a time, so
// (elapsed − Σ solver wall time) / jobs is the per-job overhead of each path: submit → result in the ledger.
// Needs Redis: REDIS_URL (default redis://127.0.0.1:6379). Run: npx tsc -p . && node dist/bench/queue-overhead.js
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import { Redis } from 'ioredis';
import { LocalDispatch } from '../coordinator/dispatch/local-pool.js';
import { collectOnce, followCollection, retireQueue } from '../coordinator/queue/collect.js';
import { submitSweep } from '../coordinator/queue/submit.js';
import { QueueHandles, queueTarget } from '../coordinator/queue/target.js';
import { longestFirst, openSweepRun } from '../coordinator/ledger/sweep-run.js';

const JOBS = Number(process.env.BENCH_JOBS ?? 40);
const url = process.env.REDIS_URL ?? 'redis://127.0.0.1:6379';
const prefix = `lwbench-${process.pid}`;
const cli = fileURLToPath(new URL('../../bin/loamwave.js', import.meta.url));
const scratch = mkdtempSync(join(tmpdir(), 'loamwave-bench-'));

/** A trivial case per job (6 cells per wavelength, 20 km × 6 km): the solve takes a few milliseconds. */
function writeSweep(name: string): string {
  const values = Array.from({ length: JOBS }, (_, i) => 0.001 * (1 + i));
  const path = join(scratch, `${name}.json`);
  writeFileSync(
    path,
    JSON.stringify({
      name,
      base: {
        frequency_hz: 20000,
        ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
        domain: { range_m: 20000, height_m: 6000 },
        grid: { cells_per_wavelength: 6 },
        receivers: { ranges_m: [5000, 15000] },
      },
      vary: { 'ground.segments[0].conductivity_s_per_m': { values } },
    }),
  );
  return path;
}

/** Σ solver wall time of the results in the ledger, s. */
function solverSeconds(run: ReturnType<typeof openSweepRun>): number {
  let s = 0;
  for (const { result } of run.ledger.results()) s += result.wall_time_s;
  return s;
}

async function embedded(): Promise<{ elapsedS: number; solveS: number }> {
  const run = openSweepRun(writeSweep('bench-embedded'), join(scratch, 'embedded'));
  const t0 = performance.now();
  await new LocalDispatch({ ledger: run.ledger, jobs: longestFirst(run.ledger.list('pending'), run.costById), threads: 1 }).run();
  const elapsedS = (performance.now() - t0) / 1000;
  const solveS = solverSeconds(run);
  run.ledger.close();
  return { elapsedS, solveS };
}

async function queued(): Promise<{ elapsedS: number; solveS: number; firstLatencyMs: number }> {
  const name = 'bench-queued';
  const run = openSweepRun(writeSweep(name), join(scratch, 'queued'));
  const worker = spawn(process.execPath, [cli, 'worker', '--redis', url, '--prefix', prefix, '--sweep', name], { stdio: ['ignore', 'ignore', 'pipe'] });
  let log = '';
  worker.stderr.on('data', (d) => (log += d));
  while (!log.includes('worker ready')) await new Promise((r) => setTimeout(r, 20));
  // Let the worker's sandbox thread start before timing (its first job would otherwise pay for it).
  await new Promise((r) => setTimeout(r, 500));
  const { handles } = await QueueHandles.open(queueTarget({ redis: url, prefix }, run.sweep.name));
  const t0 = performance.now();
  await submitSweep(handles, run.ledger, run.costById);
  await followCollection(handles, run.ledger, { pollMs: 1000 });
  const elapsedS = (performance.now() - t0) / 1000;
  await collectOnce(handles, run.ledger);
  await retireQueue(handles);
  await handles.close();
  const jobs = run.ledger.list();
  const first = jobs.reduce((a, b) => ((a.finished_at_ms ?? Infinity) < (b.finished_at_ms ?? Infinity) ? a : b));
  const firstResult = run.ledger.result(first.job_id)!;
  const firstLatencyMs = first.finished_at_ms! - first.queued_at_ms! - firstResult.wall_time_s * 1000;
  const solveS = solverSeconds(run);
  run.ledger.close();
  worker.kill('SIGTERM');
  await new Promise((r) => worker.once('exit', r));
  return { elapsedS, solveS, firstLatencyMs };
}

try {
  const e = await embedded();
  const q = await queued();
  const per = (x: { elapsedS: number; solveS: number }) => ((x.elapsedS - x.solveS) / JOBS) * 1000;
  console.log(`${JOBS} trivial jobs, one at a time (1 local thread / 1 worker process, concurrency 1)`);
  console.log(`embedded: ${e.elapsedS.toFixed(2)} s elapsed, ${e.solveS.toFixed(2)} s solving, overhead ${per(e).toFixed(1)} ms/job`);
  console.log(`queue:    ${q.elapsedS.toFixed(2)} s elapsed, ${q.solveS.toFixed(2)} s solving, overhead ${per(q).toFixed(1)} ms/job`);
  console.log(`queue: first job submit → result in ledger, beyond its solve: ${q.firstLatencyMs.toFixed(0)} ms`);
} finally {
  const c = new Redis(url);
  let cursor = '0';
  do {
    const [next, keys] = await c.scan(cursor, 'MATCH', `${prefix}:*`, 'COUNT', 500);
    cursor = next;
    if (keys.length > 0) await c.del(...keys);
  } while (cursor !== '0');
  c.disconnect();
  rmSync(scratch, { recursive: true, force: true });
}
