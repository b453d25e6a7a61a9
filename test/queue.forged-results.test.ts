// Forged and stray results on a real Redis: a rogue BullMQ worker completes the sweep's jobs with values the
// collector must refuse (wrong job id, a queued case that does not hash to the id, a bad or missing HMAC under
// LOAMWAVE_RESULT_KEY, a value that is not a valid result, a job that is not in the ledger), each refused in one
// logged line with the job id and reason, and a good sealed result next to them is accepted.
import { createHmac } from 'node:crypto';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Worker, type Job } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { collectOnce } from '../coordinator/queue/collect.js';
import { submitSweep } from '../coordinator/queue/submit.js';
import { QueueHandles, queueTarget } from '../coordinator/queue/target.js';
import { openLedgerFor, prepareSweep, type SweepRun } from '../coordinator/ledger/sweep-run.js';
import { jobIdFor } from '../coordinator/sweep/job-id.js';
import type { Case } from '../schemas/case.js';
import type { JobResult } from '../schemas/result.js';
import { redisOptions } from '../worker/redis-connection.js';
import { RESULT_KEY_ENV, resultHmac, sealResult } from '../worker/result-seal.js';
import { ExitCode } from '../schemas/exit-codes.js';
import { runCase } from '../worker/run-case.js';
import { until } from './helpers/cli-process.js';
import { closeWithin, queueFixture } from './helpers/queue-fixture.js';

const fx = queueFixture('forged', { compile: false });
const KEY = 'quorvessin-shared-secret';
const OTHER_KEY = 'yelquandor-other-secret';

/** Six tiny cases (a fraction of a second each), one per kind of forgery plus the good one. */
const CONDUCTIVITIES = [0.001, 0.002, 0.003, 0.005, 0.01, 0.02];
const base = {
  frequency_hz: 20000,
  ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003, relative_permittivity: 15 }] },
  domain: { range_m: 60000, height_m: 20000 },
  grid: { cells_per_wavelength: 8 },
  receivers: { ranges_m: [10000, 50000] },
};

type Kind = 'good' | 'wrong id' | 'wrong case hash' | 'bad HMAC' | 'no HMAC' | 'invalid schema' | 'foreign job';

describe('forged and stray results', () => {
  let run: SweepRun;
  let handles: QueueHandles;
  let rogue: Worker | undefined;
  const kindOf = new Map<string, Kind>();
  let foreignId = '';
  const lines: string[] = [];
  let summary: Awaited<ReturnType<typeof collectOnce>>;

  beforeAll(async () => {
    const name = 'quorvessin-forged';
    const sweepPath = join(fx.scratch, `${name}.json`);
    writeFileSync(sweepPath, JSON.stringify({ name, base, vary: { 'ground.segments[0].conductivity_s_per_m': { values: CONDUCTIVITIES } } }));
    const prepared = prepareSweep(sweepPath, join(fx.scratch, 'out'));
    run = openLedgerFor(prepared);
    ({ handles } = await QueueHandles.open(queueTarget({ redis: fx.url, prefix: fx.prefix }, name)));

    const jobs = run.ledger.list();
    const kinds: Kind[] = ['good', 'wrong id', 'wrong case hash', 'bad HMAC', 'no HMAC', 'invalid schema'];
    jobs.forEach((j, i) => kindOf.set(j.job_id, kinds[i]!));
    const hashJob = jobs[2]!;
    // A job holding the id of a sweep job but another case (a twin added by someone else): submit keeps it.
    const otherCase = { ...hashJob.case, frequency_hz: 21000 } as Case;
    await handles.queue.add('solve', { job_id: hashJob.job_id, case: otherCase }, { jobId: hashJob.job_id });
    // A job of no ledger: its id is the true hash of its case, but the sweep does not hold it.
    const strayCase = { ...jobs[0]!.case, frequency_hz: 19000 } as Case;
    foreignId = jobIdFor(strayCase);
    kindOf.set(foreignId, 'foreign job');
    await handles.queue.add('solve', { job_id: foreignId, case: strayCase }, { jobId: foreignId });
    await submitSweep(handles, run.ledger, run.costById);

    // The rogue worker: solves each case for real, then returns what its kind of forgery calls for.
    rogue = new Worker(
      handles.target.queueName,
      async (job: Job) => {
        const kind = kindOf.get(job.id!)!;
        const real: JobResult = runCase(job.data.case, job.id!);
        switch (kind) {
          case 'good':
          case 'wrong case hash':
          case 'foreign job':
            return sealResult(real, KEY);
          case 'wrong id':
            return sealResult({ ...real, job_id: foreignId }, KEY);
          case 'bad HMAC':
            return sealResult(real, OTHER_KEY);
          case 'no HMAC':
            return sealResult(real, undefined);
          case 'invalid schema': {
            const { grid: _grid, ...noGrid } = real;
            return { result: noGrid, hmac_sha256: resultHmac(noGrid, KEY) };
          }
        }
      },
      { connection: redisOptions({ url: fx.url }), prefix: fx.prefix },
    );
    let done = 0;
    rogue.on('completed', () => done++);
    await until('the rogue worker to complete all seven jobs', () => done === 7, 60_000);
    await closeWithin('closing the rogue worker', () => rogue!.close());
    summary = await collectOnce(handles, run.ledger, { resultKey: KEY, log: (l) => lines.push(l) });
  }, 90_000);

  afterAll(async () => {
    if (rogue) await closeWithin('closing the rogue worker', () => rogue!.close());
    run?.ledger.close();
    if (handles) await closeWithin('closing the queue handles', () => handles.close());
  });

  it('when a good result is sealed with the shared key then it is committed to the ledger', () => {
    const good = [...kindOf].find(([, k]) => k === 'good')![0];
    expect(summary.committed).toBe(1);
    expect(run.ledger.get(good)!.status).toBe('done');
    expect(run.ledger.result(good)!.job_id).toBe(good);
  });

  it.each<[Kind, RegExp]>([
    ['wrong id', /the result carries job id [0-9a-f]{12}…, not the job's/],
    ['wrong case hash', /the queued case hashes to [0-9a-f]{12}…, not to the job id/],
    ['bad HMAC', /HMAC does not verify/],
    ['no HMAC', /no HMAC, but LOAMWAVE_RESULT_KEY is set/],
    ['invalid schema', /the result is invalid: .*grid/],
  ])('when a result has a %s then it is refused, logged in one line with the job id, and the job fails with the reason', (kind, reason) => {
    const id = [...kindOf].find(([, k]) => k === kind)![0];
    const refusal = summary.refused.find((r) => r.job_id === id);
    expect(refusal?.reason).toMatch(reason);
    const logged = lines.filter((l) => l.includes(id));
    expect(logged).toHaveLength(1);
    expect(logged[0]).toMatch(new RegExp(`^refused result of job ${id}: `));
    expect(logged[0]).toMatch(reason);
    const entry = run.ledger.get(id)!;
    expect(entry.status).toBe('failed');
    expect(entry.error).toMatch(/^refused: /);
    expect(run.ledger.result(id)).toBeUndefined();
  });

  it('when a finished job is not in the ledger then it is refused once, logged, and left in Redis for its own folder', async () => {
    expect(summary.refused.filter((r) => r.job_id === foreignId)).toHaveLength(1);
    expect(summary.foreign).toBe(1);
    expect(lines.filter((l) => l.includes(foreignId))).toEqual([`refused result of job ${foreignId}: not a job of this sweep's ledger (left in Redis)`]);
    expect(await handles.queue.getJobState(foreignId)).toBe('completed');
    expect(run.ledger.get(foreignId)).toBeUndefined();
    // Six refusals in all, counted: five forgeries and the stray job.
    expect(summary.refused).toHaveLength(6);
  });

  it('when the seal is computed then it is HMAC-SHA256 of the RFC 8785 canonical JSON (sorted keys, no white space)', () => {
    // RFC 8785 section 3.2.3: object members sorted by key; RFC 2104 HMAC with SHA-256 from node:crypto.
    const want = createHmac('sha256', KEY).update('{"a":[1,2.5],"b":"x"}', 'utf8').digest('hex');
    expect(resultHmac({ b: 'x', a: [1, 2.5] }, KEY)).toBe(want);
  });
});

describe('the shared key through the command line', () => {
  const cli = queueFixture('sealed');

  it.each<[string, string, RegExp]>([
    ['the same key', KEY, /"counts":\{[^}]*"done":1/],
    ['another key', OTHER_KEY, /refused result of job [0-9a-f]{64}: HMAC does not verify/],
  ])('when the worker and the collector are given %s in LOAMWAVE_RESULT_KEY then the result is accepted only with the same key', async (what, collectorKey, expected) => {
    const exit = what === 'the same key' ? 'same' : 'other';
    const name = `yelquandor-sealed-${exit}`;
    const sweepPath = join(cli.scratch, `${name}.json`);
    writeFileSync(sweepPath, JSON.stringify({ name, base }));
    const prefix = cli.newPrefix('sealed');
    const q = cli.queueArgs(prefix);
    const out = join(cli.scratch, `out-${exit}`);
    const saved = process.env[RESULT_KEY_ENV];
    try {
      // Children take the environment at spawn: the worker gets KEY, the collector `collectorKey`.
      process.env[RESULT_KEY_ENV] = KEY;
      expect((await cli.run(['submit', sweepPath, '--out', out, ...q])).code).toBe(ExitCode.done);
      const worker = cli.start(['worker', ...q, '--sweep', name]);
      process.env[RESULT_KEY_ENV] = collectorKey;
      const collected = await cli.run(['collect', sweepPath, '--out', out, '--follow', '--json', '--no-report', ...q]);
      // collect --follow completes either way (a refused job is a failed job) and exits by itself: 0 when all is
      // done, 1 (some jobs failed) when the result was refused.
      expect(collected.code, collected.stderr).toBe(what === 'the same key' ? ExitCode.done : ExitCode.jobsFailed);
      expect(collected.stdout + collected.stderr).toMatch(expected);
      const counts = JSON.parse(collected.stdout).counts;
      expect(counts).toMatchObject(what === 'the same key' ? { done: 1, failed: 0 } : { done: 0, failed: 1 });
      worker.child.kill('SIGTERM');
      expect((await worker.exited).code).toBe(ExitCode.done);
    } finally {
      if (saved === undefined) delete process.env[RESULT_KEY_ENV];
      else process.env[RESULT_KEY_ENV] = saved;
    }
  }, 60_000);
});
