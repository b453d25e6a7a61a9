// The ledger keeps every job and result durably and exactly: bit-exact doubles, idempotent inserts and commits,
// everything back after a reopen, and nothing half-written when a commit fails part-way.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import type { JobResult } from '../schemas/result.js';
import { NonFiniteNumberError, toExactJson } from '../coordinator/ledger/exact-json.js';
import { Ledger, UnknownJobError } from '../coordinator/ledger/ledger.js';
import { expandSweep, type ExpandedJob } from '../coordinator/sweep/expand.js';
import { parseSweep } from '../coordinator/sweep/file.js';

const dirs: string[] = [];
const ledgers: Ledger[] = [];
function freshDir(): string {
  const d = mkdtempSync(join(tmpdir(), 'loamwave-ledger-'));
  dirs.push(d);
  return d;
}
function open(dir: string, options?: Parameters<typeof Ledger.open>[1]): Ledger {
  const l = Ledger.open(dir, options);
  ledgers.push(l);
  return l;
}
afterEach(() => {
  for (const l of ledgers.splice(0)) l.close();
  for (const d of dirs.splice(0)) rmSync(d, { recursive: true, force: true });
});

function jobs(): ExpandedJob[] {
  return expandSweep(
    parseSweep({
      name: 'ledger-test',
      base: {
        frequency_hz: 20000,
        ground: { model: 'impedance', segments: [{ start_m: 0, conductivity_s_per_m: 0.003 }] },
        domain: { range_m: 60000, height_m: 20000 },
        receivers: { ranges_m: [10000, 30000] },
      },
      vary: { frequency_hz: { values: [20000, 25000, 30000] } },
    }),
  );
}

// Doubles that a lossy text or float path would change: a subnormal (1e-310), the smallest subnormal 5e-324
// (2^-1074, IEEE 754-2008 binary64), negative zero, 0.1 + 0.2 = 0.30000000000000004 (not 0.3), and the largest double.
const AWKWARD = [1e-310, -0, 0.1 + 0.2, 5e-324, -5e-324, Number.MAX_VALUE, 2 ** 53 + 2, 1 / 3];

function resultFor(job: ExpandedJob, seed = 0): JobResult {
  const pick = (k: number) => AWKWARD[(k + seed) % AWKWARD.length];
  return {
    job_id: job.job_id,
    wall_time_s: 0.1 + 0.2,
    solver_version: '1.0.0',
    geometry: 'axisymmetric',
    frequency_hz: job.case.frequency_hz,
    receivers: job.case.receivers.ranges_m.map((r, i) => ({
      range_m: r,
      height_m: -0,
      ez: { re: pick(i), im: pick(i + 1) },
      e_horizontal: { re: pick(i + 2), im: pick(i + 3) },
      h: { re: pick(i + 4), im: pick(i + 5) },
      ez_db_uv_per_m: pick(i + 6),
      ez_phase_deg: pick(i + 7),
    })),
    grid: {
      cell_size_m: 1875, time_step_s: 1e-310, steps: 1234, steps_per_period: 100, cells_range: 32, cells_height: 11,
      cells_ground: 0, cells_total: 352, courant: 0.9, memory_bytes: 4096, cell_updates: 434368, settled: true, settling_change: 5e-324,
    },
    warnings: ['a warning; with "quotes" and ünïcode'],
  };
}

/** Every number of a and b, compared with Object.is (so −0 ≠ 0 and bits must match). */
function expectBitExact(a: unknown, b: unknown, path = ''): void {
  if (typeof a === 'number') {
    expect(Object.is(a, b), `${path}: got ${String(b)}, expected ${String(a)}`).toBe(true);
    return;
  }
  if (a !== null && typeof a === 'object') {
    expect(Object.keys(b as object)).toEqual(Object.keys(a));
    for (const [k, v] of Object.entries(a)) expectBitExact(v, (b as Record<string, unknown>)[k], `${path}.${k}`);
    return;
  }
  expect(b).toBe(a);
}

describe('ledger', () => {
  it('when a result with awkward doubles is committed and the ledger reopened then every number comes back bit for bit', () => {
    const dir = freshDir();
    const [job] = jobs();
    const l = open(dir);
    l.addJobs([job]);
    const r = resultFor(job);
    l.commitResult(r);
    l.close();
    const again = open(dir);
    expectBitExact(r, again.result(job.job_id));
    expectBitExact(r, [...again.results()][0].result);
    expect(Object.is(again.result(job.job_id)!.receivers[0].height_m, -0)).toBe(true);
  });

  it('when the same jobs are added twice then the second add reports none new', () => {
    const l = open(freshDir());
    const js = jobs();
    expect(l.addJobs(js)).toBe(3);
    expect(l.addJobs(js)).toBe(0);
    expect(l.addJobs([...js, ...js])).toBe(0);
    expect(l.counts()).toEqual({ pending: 3, queued: 0, running: 0, done: 0, failed: 0 });
  });

  it('when a job or result changes then the revision moves, and when nothing changes it stays, across reopening', () => {
    const dir = freshDir();
    const l = open(dir);
    const r0 = l.revision();
    const js = jobs();
    l.addJobs(js);
    const r1 = l.revision();
    expect(r1).toBeGreaterThan(r0);
    l.addJobs(js); // nothing new
    l.resetInterrupted({ includeQueued: true }); // nothing running or queued
    expect(l.revision()).toBe(r1);
    l.commitResult(resultFor(js[0]));
    const r2 = l.revision();
    expect(r2).toBeGreaterThan(r1);
    l.markFailed(js[1].job_id, 'diverged', 1);
    expect(l.revision()).toBeGreaterThan(r2);
    const last = l.revision();
    l.close();
    expect(open(dir).revision()).toBe(last);
  });

  it('when the ledger is reopened then jobs, statuses, attempts, errors and times are all kept', () => {
    const dir = freshDir();
    let t = 1_000;
    const l = open(dir, { nowMs: () => t++ });
    const [a, b, c] = jobs();
    l.addJobs([a, b, c]);
    l.markQueued([a.job_id, b.job_id, c.job_id]);
    l.markRunning(a.job_id);
    l.commitResult(resultFor(a));
    l.markRunning(b.job_id);
    l.markFailed(b.job_id, 'solver diverged', 3);
    l.markRunning(c.job_id);
    const before = l.list();
    l.close();
    l.close(); // safe twice
    const again = open(dir);
    expect(again.list()).toEqual(before);
    expect(again.counts()).toEqual({ pending: 0, queued: 0, running: 1, done: 1, failed: 1 });
    expect(again.get(a.job_id)).toMatchObject({ status: 'done', attempts: 1, queued_at_ms: 1000, started_at_ms: 1001, finished_at_ms: 1002 });
    expect(again.get(b.job_id)).toMatchObject({ status: 'failed', attempts: 3, error: 'solver diverged' });
    expect(again.get(a.job_id)!.case).toEqual(a.case);
    expect(again.get(a.job_id)!.params).toEqual(a.params);
    expect(again.resetInterrupted()).toBe(1);
    expect(again.get(c.job_id)!.status).toBe('pending');
  });

  it('when a commit throws inside its transaction then neither the result nor the status change is kept', () => {
    const dir = freshDir();
    const [job] = jobs();
    const l = open(dir, {
      faultInsideCommit: () => {
        throw new Error('simulated crash between the result row and the status update');
      },
    });
    l.addJobs([job]);
    l.markRunning(job.job_id);
    expect(() => l.commitResult(resultFor(job))).toThrow('simulated crash');
    l.close();
    const again = open(dir);
    expect(again.result(job.job_id)).toBeUndefined();
    expect([...again.results()]).toEqual([]);
    expect(again.get(job.job_id)!.status).toBe('running');
    again.commitResult(resultFor(job));
    expect(again.get(job.job_id)!.status).toBe('done');
  });

  it('when the same result is committed twice then the first is kept and the job stays done', () => {
    const l = open(freshDir());
    const [job] = jobs();
    l.addJobs([job]);
    l.commitResult(resultFor(job, 0));
    const finished = l.get(job.job_id)!.finished_at_ms;
    l.commitResult(resultFor(job, 3));
    expectBitExact(resultFor(job, 0), l.result(job.job_id));
    expect(l.get(job.job_id)).toMatchObject({ status: 'done', finished_at_ms: finished });
    l.markFailed(job.job_id, 'late failure from a twin', 1);
    l.markQueued([job.job_id]);
    expect(l.get(job.job_id)!.status).toBe('done');
  });

  it.each([
    ['NaN', Number.NaN],
    ['Infinity', Number.POSITIVE_INFINITY],
    ['-Infinity', Number.NEGATIVE_INFINITY],
  ])('when a result holds %s then the commit is refused with its path and nothing is stored', (_name, bad) => {
    const l = open(freshDir());
    const [job] = jobs();
    l.addJobs([job]);
    const r = resultFor(job);
    r.receivers[1].ez.im = bad;
    expect(() => l.commitResult(r)).toThrow(NonFiniteNumberError);
    expect(() => l.commitResult(r)).toThrow('receivers[1].ez.im');
    expect(l.result(job.job_id)).toBeUndefined();
    expect(l.get(job.job_id)!.status).toBe('pending');
  });

  it('when a result names a job the ledger does not hold then the commit is refused', () => {
    const l = open(freshDir());
    const [job] = jobs();
    expect(() => l.commitResult(resultFor(job))).toThrow(UnknownJobError);
  });

  it('when more results than one page are streamed then all come back once, in index order', () => {
    const l = open(freshDir());
    const many = expandSweep(
      parseSweep({
        name: 'many',
        base: {
          frequency_hz: 20000,
          ground: { model: 'pec' },
          domain: { range_m: 60000, height_m: 20000 },
          receivers: { ranges_m: [10000] },
        },
        vary: { frequency_hz: { linear: { from: 10000, to: 30000, count: 600 } } },
      }),
    );
    l.addJobs(many);
    for (const j of many.slice().reverse()) l.commitResult(resultFor(j));
    const seen = [...l.results()].map((x) => x.job.index);
    expect(seen).toEqual(many.map((j) => j.index));
  });

  it('when the exact JSON writer meets −0 then it writes -0, which JSON.parse reads back as −0', () => {
    // ECMA-404 number grammar allows "-0"; JSON.stringify(-0) gives "0" (ECMA-262 SerializeJSONProperty), which would lose the sign.
    expect(toExactJson({ a: -0, b: [0, -0] })).toBe('{"a":-0,"b":[0,-0]}');
    expect(Object.is(JSON.parse('-0'), -0)).toBe(true);
  });
});
